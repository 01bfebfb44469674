/* Built-in conductivity model for seawater brines beyond PSS-78 (S > 42),
 * used only when a site has no hydrometer calibration; states computed
 * from it carry HC_WARN_BRINE_MODEL.
 *
 * No published relation covers seawater brine up to halite saturation, so
 * the model is stated here in full:
 *  1. kappa_20(w) = s * kappa_NaCl,20(w): the NaCl(aq) conductivity at 20 degC
 *     at the same mass fraction w of dissolved salts, interpolated linearly
 *     in the CRC Handbook table ("Electrical conductivity of aqueous
 *     solutions", 0.5 to 25 mass %), zero at w = 0.
 *  2. s joins it to PSS-78 at S_P = 42: s = C(42, 20 degC, 0) / kappa_NaCl,20(w42)
 *     with C(42, 20, 0) = 56.3278 mS/cm (TEOS-10 gsw.C_from_SP) and
 *     w42 = 42 * 35.16504 / 35 g/kg (Millero et al. 2008 S_R).
 *  3. Temperature: linear 2 %/K about 20 degC, the usual compensation for
 *     brines (ISO 7888's table is for fresh water).
 * It rises monotonically with w, as NaCl does to saturation; real bittern
 * conductivity falls as Mg rises, so past halite saturation a conductivity
 * reading cannot give density (the path warns and prefers density).
 * Error convention: hc_status (HC_OK = 0). Pure. */
#ifndef HC_BRINE_COND_H
#define HC_BRINE_COND_H

#include "hc_status.h"

#define HC_COND_ALPHA_PER_K 0.02 /* linear temperature coefficient [1/K] */

/* Conductivity [mS/cm] of a seawater brine with salt mass fraction
 * w_g_kg [g per kg brine] at t_c [degC].
 * HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_SALINITY_RANGE (w > 400),
 * HC_ERR_TEMPERATURE_RANGE (outside -5..60), else HC_OK. */
hc_status hc_brine_conductivity(double w_g_kg, double t_c, double *cond_ms_cm);

/* Conductivity referred to t_ref_c with the linear 2 %/K compensation:
 * kappa_ref = kappa / (1 + alpha (t - t_ref)). HC_ERR_NOT_FINITE,
 * HC_ERR_NEGATIVE, HC_ERR_TEMPERATURE_RANGE, else HC_OK. */
hc_status hc_cond_compensate(double cond_ms_cm, double t_c, double t_ref_c, double *cond_ref);

#endif
