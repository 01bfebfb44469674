/* Pitzer ion-interaction model for Na-K-Mg-Ca-Cl-SO4-HCO3-CO3-H2O.
 *
 * Parameters: Harvie, Moller & Weare (1984, Geochim. Cosmochim. Acta 48,
 * 723) "HMW84" at 25 degC, with unsymmetrical mixing (E-theta, Pitzer 1975,
 * J. Solution Chem. 4, 249, J(x) from eq. 47).
 *
 * Temperature, 0 to 50 degC: A_phi(T) and the Na-Cl and Ca-SO4 parameters
 * follow Moller (1988, Geochim. Cosmochim. Acta 52, 821, eq. 13 and Table 1),
 * applied as increments from 25 degC so that 25 degC is exactly HMW84. The
 * other parameters keep their 25 degC values. Outside 0..50 degC the result
 * carries HC_WARN_TEMPERATURE_EXTRAPOLATED; outside -5..80 degC it is refused.
 *
 * Carbonate: the HMW84 binary carbonate parameters, theta and psi values
 * are included (at their 25 degC values); Ca-CO3 and Mg-CO3 have no
 * parameters because HMW84 treats them as the ion pairs CaCO3(aq) and
 * MgCO3(aq), which hc_carbonate.h speciates.
 *
 * Error convention: hc_status (HC_OK = 0). Pure and re-entrant. */
#ifndef HC_PITZER_H
#define HC_PITZER_H

#include "hc_ion.h"
#include "hc_status.h"

#define HC_PITZER_NCAT 4 /* Na, K, Mg, Ca */
#define HC_PITZER_NAN  4 /* Cl, SO4, HCO3, CO3 */

/* Parameters evaluated at one temperature. Build once per temperature with
 * hc_pitzer_params_at(); evaluation then needs no further set-up. */
typedef struct {
    double t_c;         /* [degC] */
    double a_phi;       /* Debye-Hueckel slope for the osmotic coefficient [kg^1/2 mol^-1/2] */
    double beta0[HC_PITZER_NCAT][HC_PITZER_NAN];
    double beta1[HC_PITZER_NCAT][HC_PITZER_NAN];
    double beta2[HC_PITZER_NCAT][HC_PITZER_NAN];
    double cmx[HC_PITZER_NCAT][HC_PITZER_NAN];   /* C = Cphi / (2 sqrt|zM zX|) */
    double alpha1[HC_PITZER_NCAT][HC_PITZER_NAN];
    double alpha2[HC_PITZER_NCAT][HC_PITZER_NAN];
    double theta_cc[HC_PITZER_NCAT][HC_PITZER_NCAT];
    double theta_aa[HC_PITZER_NAN][HC_PITZER_NAN];
    double psi_cca[HC_PITZER_NCAT][HC_PITZER_NCAT][HC_PITZER_NAN];
    double psi_aac[HC_PITZER_NAN][HC_PITZER_NAN][HC_PITZER_NCAT];
    unsigned warnings;  /* HC_WARN_* bits (temperature outside 0..50 degC) */
} hc_pitzer_params;

typedef struct {
    double ionic_strength;      /* I [mol/kg] */
    double osmotic_coefficient; /* phi [1] */
    double water_activity;      /* a_w = exp(-phi M_w sum m_i) [1] */
    double ln_gamma[HC_ION_COUNT]; /* natural log of molal activity coefficients */
    double gamma[HC_ION_COUNT];    /* molal activity coefficients [1] */
} hc_pitzer_result;

/* Fills *out with the parameters at t_c [degC].
 * HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE (outside -5..80), else HC_OK. */
hc_status hc_pitzer_params_at(double t_c, hc_pitzer_params *out);

/* Activity coefficients, osmotic coefficient and water activity of a brine
 * with molality[] [mol/kg water] (HMW84 eqs. 1-6 with E-theta).
 * HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_SALINITY_RANGE (I > 40), else HC_OK.
 * No allocation; about 1 us per call (see make bench). */
hc_status hc_pitzer_eval(const hc_pitzer_params *p, const double molality[HC_ION_COUNT],
                         hc_pitzer_result *out);

/* Mean activity coefficient of the salt of `cation` and `anion` [1]:
 * ln g+- = (nu+ ln g+ + nu- ln g-) / (nu+ + nu-), nu from the charges. */
double hc_pitzer_mean_gamma(const hc_pitzer_result *r, hc_ion cation, hc_ion anion);

#endif
