/* Seawater-range brine state: reference composition of seawater, and the
 * state of a sample from conductivity (PSS-78) or from density (EOS-80
 * inverted), with specific gravity and degree Baume at a reference
 * temperature and the concentration factor against a seawater feed.
 *
 * Composition: Millero, Feistel, Wright & McDougall (2008), Deep-Sea Res. I
 * 55, 50, "The composition of Standard Seawater and the definition of the
 * Reference-Composition Salinity Scale", table 4 (mass fractions at
 * S_R = 35.16504 g/kg). Reference composition scales with salinity: every
 * ion keeps its ratio to chlorinity, so each molality follows from S_R.
 *
 * Lumping rule for a Na-K-Mg-Ca-Cl-SO4(-HCO3-CO3) model (HC_SW_LUMP):
 *   - Br- is added to Cl- and Sr2+ to Ca2+, mole for mole (same charge);
 *   - HCO3- and CO3 2- are kept, unless HC_SW_DROP_CARBONATE is also given,
 *     in which case they are dropped;
 *   - the minor species of the reference composition that no major-ion
 *     model carries (B(OH)4-, F-, OH-, B(OH)3, CO2; together 0.029 g/kg)
 *     are dropped;
 *   - electroneutrality is then restored by adjusting Cl-, and the change
 *     is reported (cl_adjustment_mol_kg).
 *
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure.
 * Pure and re-entrant; no allocation. */
#ifndef HC_SEAWATER_H
#define HC_SEAWATER_H

#include "hc_state.h"
#include "hc_status.h"

/* Reference-composition salinity of standard seawater of S_P = 35 [g/kg]
 * (Millero et al. 2008, eq. 7): S_R = (35.16504 / 35) S_P. */
#define HC_SW_SR_35 35.16504
/* Feed salinity used when none is given: standard seawater [1]. */
#define HC_SW_FEED_SP_DEFAULT 35.0

typedef enum {
    HC_SW_NA,
    HC_SW_K,
    HC_SW_MG,
    HC_SW_CA,
    HC_SW_SR,
    HC_SW_CL,
    HC_SW_SO4,
    HC_SW_HCO3,
    HC_SW_CO3,
    HC_SW_BR,
    HC_SW_ION_COUNT
} hc_sw_ion;

enum {
    HC_SW_LUMP = 1u << 0,           /* Br into Cl, Sr into Ca, balance with Cl */
    HC_SW_DROP_CARBONATE = 1u << 1  /* with HC_SW_LUMP: drop HCO3 and CO3 too */
};

typedef struct {
    double molality[HC_SW_ION_COUNT]; /* [mol per kg of water] */
    double salinity_g_kg;             /* S_R, dissolved salts per kg of seawater [g/kg] */
    double cl_adjustment_mol_kg;      /* added to Cl- for electroneutrality [mol/kg water];
                                         0 unless HC_SW_LUMP */
} hc_sw_composition;

/* "Na", "K", "Mg", "Ca", "Sr", "Cl", "SO4", "HCO3", "CO3", "Br"; NULL if invalid. */
const char *hc_sw_ion_name(hc_sw_ion ion);
/* Charge number z of the ion; 0 if invalid. */
int hc_sw_ion_charge(hc_sw_ion ion);
/* Molar mass [g/mol] (IUPAC 2013 standard atomic weights); NaN if invalid. */
double hc_sw_ion_molar_mass(hc_sw_ion ion);

/* Reference-composition seawater at practical salinity sp.
 *   sp     S_P [1], 0..42 (beyond 42 the composition of a brine depends on
 *          what has precipitated: that is the evaporation path's job)
 *   flags  0 or HC_SW_LUMP [| HC_SW_DROP_CARBONATE]
 *   out    molalities [mol/kg water], S_R, Cl adjustment
 * m_i = (w_i (S_R / 35.16504) / M_i) / (1 - S_R / 1000).
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_SALINITY_RANGE,
 * HC_ERR_ARGUMENT (unknown flag bits, or DROP_CARBONATE without LUMP). */
hc_status hc_seawater_composition(double sp, unsigned flags, hc_sw_composition *out);

/* Concentration factor of seawater of S_P = sp against a feed of S_P =
 * feed_sp: initial over remaining mass of water. With conserved salt,
 * CF = [S_R / (1000 - S_R)] / [S_R,feed / (1000 - S_R,feed)].
 *   sp 0..42, feed_sp in (0, 42]; cf out [1].
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_SALINITY_RANGE,
 * HC_ERR_ARGUMENT (feed_sp <= 0). */
hc_status hc_seawater_cf(double sp, double feed_sp, double *cf);

/* How a state is reported. */
typedef struct {
    double feed_sp;                 /* S_P of the feed [1]; default 35 */
    double reference_temperature_c; /* t_ref for SG and deg Be [degC]; default 15 */
    double baume_modulus;           /* m [deg Be]; default 145 */
} hc_seawater_options;

/* Fills the defaults: feed S_P 35, t_ref 15 degC, modulus 145. */
void hc_seawater_options_default(hc_seawater_options *opt);

/* The brine state of a seawater-range sample of known practical salinity.
 *   sp       S_P [1], 0..42
 *   t90_c    sample temperature, ITS-90 [degC], -2..45
 *   p_dbar   sea pressure at the sensor [dbar], 0..10000
 *   opt      reporting options, or NULL for the defaults
 *   out      filled: practical_salinity, salinity_g_kg (S_R), density_kg_m3
 *            (EOS-80 at t, p), specific_gravity and baume (EOS-80 at t_ref
 *            and one atmosphere for the same S_P, against SMOW at t_ref),
 *            reference_temperature_c, baume_modulus, concentration_factor,
 *            stage = seawater, next_stage none, method = none (the callers
 *            below set it). Warnings: HC_WARN_BELOW_FEED when CF < 0.999
 *            (within 0.1 % of the feed, about a conductivity sensor's
 *            accuracy, counts as feed: common practice, no source);
 *            HC_WARN_TEMPERATURE_EXTRAPOLATED when t or t_ref is above 40 degC.
 * Errors: those of hc_eos80_rho, hc_baume_*, hc_seawater_cf; HC_ERR_ARGUMENT
 * for a bad option (modulus <= 0, feed S_P outside (0, 42]). */
hc_status hc_seawater_state_from_sp(double sp, double t90_c, double p_dbar,
                                    const hc_seawater_options *opt, hc_brine_state *out);

/* The state from conductivity: PSS-78 then as hc_seawater_state_from_sp;
 * method pss78; HC_WARN_HILL_EXTENSION below S_P = 2.
 *   cond_ms_cm [mS/cm] >= 0; others as above.
 * Errors: those of hc_pss78_sp_from_c (HC_ERR_SALINITY_RANGE beyond S_P 42:
 * brine needs the brine model) and of hc_seawater_state_from_sp. */
hc_status hc_seawater_state_from_conductivity(double cond_ms_cm, double t90_c, double p_dbar,
                                              const hc_seawater_options *opt,
                                              hc_brine_state *out);

/* The state from density measured at (t, p): EOS-80 inverted for S_P, then
 * as hc_seawater_state_from_sp; method density.
 *   rho_kg_m3 [kg/m3]; others as above.
 * Errors: those of hc_eos80_sp_from_rho (HC_ERR_SALINITY_RANGE above the
 * density of S_P 42 seawater: brine needs the brine model; HC_ERR_DOMAIN
 * below pure water) and of hc_seawater_state_from_sp. */
hc_status hc_seawater_state_from_density(double rho_kg_m3, double t90_c, double p_dbar,
                                         const hc_seawater_options *opt, hc_brine_state *out);

#endif
