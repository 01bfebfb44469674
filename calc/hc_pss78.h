/* Practical Salinity Scale 1978 (PSS-78): conductivity ratio <-> practical
 * salinity, with the pressure term and the Hill et al. (1986) extension
 * below S = 2.
 *
 * Sources: UNESCO (1981) Tech. Pap. Mar. Sci. 37; Fofonoff & Millard (1983)
 * UNESCO Tech. Pap. Mar. Sci. 44, pp. 6-12; Hill, Dauphinee & Woods (1986)
 * IEEE J. Oceanic Eng. 11, 109. The join of the Hill extension at S = 2 is
 * scaled as TEOS-10 does (IOC et al. 2010, appendix E), so the result is
 * continuous there.
 *
 * Inputs are ITS-90 temperatures; the formulas want IPTS-68 and convert
 * internally (t68 = 1.00024 t90). Pressure is sea pressure in dbar
 * (0 at the surface), as PSS-78 defines it.
 *
 * Error convention: every function returns an hc_status (HC_OK = 0); on
 * failure the outputs are left unchanged. Pure and re-entrant. */
#ifndef HC_PSS78_H
#define HC_PSS78_H

#include "hc_status.h"

/* C(35, 15 degC IPTS-68, 0 dbar): conductivity of standard seawater
 * [mS/cm] (Culkin & Smith 1980, adopted by PSS-78). */
#define HC_PSS78_C35_MS_CM 42.914

/* Range of validity of PSS-78 proper [1]; below the minimum the Hill
 * extension applies down to 0, above the maximum nothing does. */
#define HC_PSS78_SP_MIN 2.0
#define HC_PSS78_SP_MAX 42.0

/* Input ranges accepted by this module: temperature [degC, ITS-90] and sea
 * pressure [dbar]. */
#define HC_PSS78_T_MIN_C (-2.0)
#define HC_PSS78_T_MAX_C 45.0
#define HC_PSS78_P_MAX_DBAR 10000.0

/* Practical salinity from conductivity.
 *   cond_ms_cm  C, conductivity of the sample [mS/cm], >= 0
 *   t90_c       t, in-situ temperature, ITS-90 [degC], -2..45
 *   p_dbar      p, sea pressure [dbar], 0..10000
 *   sp          out: S_P [1] (may be NULL)
 *   warnings    out: HC_WARN_HILL_EXTENSION is OR-ed in when S_P < 2
 *               (may be NULL; other bits are left alone)
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE (C < 0),
 * HC_ERR_TEMPERATURE_RANGE, HC_ERR_PRESSURE_RANGE, HC_ERR_SALINITY_RANGE
 * (S_P > 42 + 1e-9, the 1e-9 only absorbing rounding: brine needs the
 * brine model; never extrapolated). */
hc_status hc_pss78_sp_from_c(double cond_ms_cm, double t90_c, double p_dbar,
                             double *sp, unsigned *warnings);

/* Conductivity from practical salinity: the inverse of hc_pss78_sp_from_c.
 *   sp          S_P [1], 0..42
 *   t90_c, p_dbar as above
 *   cond_ms_cm  out: C [mS/cm]
 * Newton iteration on sqrt(Rt) then a closed-form quadratic for the
 * pressure term. Over the whole range (grid of 0.013 in S_P, 1.7 degC,
 * 2500 dbar) Newton stops within 5 steps (plus 5 in the Hill range) and
 * S_P(C(S_P)) returns S_P within 1e-10; against gsw C_from_SP within 1e-13
 * mS/cm (tests/unit/test_reference.c).
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE (S_P < 0),
 * HC_ERR_TEMPERATURE_RANGE, HC_ERR_PRESSURE_RANGE, HC_ERR_SALINITY_RANGE
 * (S_P > 42), HC_ERR_NO_CONVERGENCE. */
hc_status hc_pss78_c_from_sp(double sp, double t90_c, double p_dbar, double *cond_ms_cm);

#endif
