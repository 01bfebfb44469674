/* Density of a brine from its composition: the mixture model of Laliberte &
 * Cooper (2004, J. Chem. Eng. Data 49, 1141) with the Laliberte (2009, JCED
 * 54, 1725) apparent-density parameters of NaCl, KCl, MgCl2, MgSO4, CaCl2,
 * Na2SO4 and K2SO4.
 *
 * Ions are split into those neutral salts by one stated rule
 * (hc_brine_salts): SO4 goes first to Mg (MgSO4), then to Na (Na2SO4), then
 * to K (K2SO4); CO3 and HCO3 then go to Na (Na2CO3, NaHCO3); Ca, K, Mg and
 * Na then take Cl in that order (CaCl2, KCl, MgCl2, NaCl), and cations left
 * without an anion (an unbalanced input) count as chlorides. Calcium is never
 * paired with sulfate because the model has no CaSO4 parameters (gypsum
 * keeps dissolved Ca below 0.03 mol/kg anyway). The sodium carbonates have
 * no parameters here either: each takes its own mass with the apparent
 * density of the sodium salt of the same charge type (Na2CO3 that of
 * Na2SO4, NaHCO3 that of NaCl), within about 0.5 % of measured Na2CO3
 * solutions (test); carbonate left without sodium is left out (0.12 g/kg in
 * seawater, under 0.1 kg/m3 of density).
 * In the seawater range the result agrees with EOS-80 within 0.5 kg/m3 (test).
 * Error convention: hc_status (HC_OK = 0). Pure, no allocation. */
#ifndef HC_BRINE_DENSITY_H
#define HC_BRINE_DENSITY_H

#include "hc_ion.h"
#include "hc_status.h"

typedef enum {
    HC_SALT_NACL,
    HC_SALT_KCL,
    HC_SALT_MGCL2,
    HC_SALT_MGSO4,
    HC_SALT_CACL2,
    HC_SALT_NA2SO4,
    HC_SALT_K2SO4,
    HC_SALT_NA2CO3, /* by the Na2SO4 parameters (stated surrogate, see above) */
    HC_SALT_NAHCO3, /* by the NaCl parameters (stated surrogate) */
    HC_SALT_COUNT
} hc_salt;

/* Pure water density [kg/m3] at t_c [degC], Laliberte & Cooper (2004) eq. 8. */
double hc_water_density_lc(double t_c);

/* Splits molality[] [mol/kg water] into salt molalities [mol/kg water] by the
 * rule above. Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_NEGATIVE. */
hc_status hc_brine_salts(const double molality[HC_ION_COUNT], double salt_molality[HC_SALT_COUNT]);

/* The Laliberte (2009) mixture density alone [kg/m3], without the EOS-80
 * join below (for checks against the paper's own values). Errors as
 * hc_brine_density. */
hc_status hc_brine_density_mixture(const double molality[HC_ION_COUNT], double t_c,
                                   double *rho_kg_m3);

/* Brine density rho [kg/m3] at t_c [degC] (Laliberte 2009 eqs. 11-14),
 * joined to EOS-80: the mixture model reads 0.2 to 1 kg/m3 low for
 * seawater, so its offset from EOS-80 at S = 35 is added in proportion to
 * the solute mass up to seawater's and as a constant beyond.
 * Valid 0..100 degC; HC_ERR_TEMPERATURE_RANGE outside -5..100,
 * HC_ERR_SALINITY_RANGE above 60 % dissolved solids, HC_ERR_NOT_FINITE,
 * HC_ERR_NEGATIVE, else HC_OK. About 0.5 us per call. */
hc_status hc_brine_density(const double molality[HC_ION_COUNT], double t_c, double *rho_kg_m3);

/* Specific gravity rho(t_ref) / rho_water(t_ref) [1] of the same composition. */
hc_status hc_brine_specific_gravity(const double molality[HC_ION_COUNT], double t_ref_c,
                                    double *sg);

#endif
