/* EOS-80: the International Equation of State of Seawater 1980 (Millero &
 * Poisson 1981, Deep-Sea Res. 28A, 625; UNESCO 1981 Tech. Pap. Mar. Sci. 36;
 * algorithm as in Fofonoff & Millard 1983, UNESCO Tech. Pap. Mar. Sci. 44,
 * pp. 15-24): density of seawater from practical salinity, temperature and
 * pressure, through the one-atmosphere equation and the secant bulk modulus.
 *
 * Temperatures are ITS-90 and converted to IPTS-68 inside (t68 = 1.00024
 * t90). Pressure arguments are sea pressure in dbar; the secant bulk modulus
 * equation is written in bar, so the code divides by 10 (1 bar = 10 dbar).
 *
 * Validity: S_P 0..42, t -2..40 degC, p 0..10000 dbar. This module accepts
 * t up to HC_EOS80_T_MAX_C (45 degC, summer pond surfaces); 40..45 degC is
 * a mild extrapolation that callers should flag
 * (HC_WARN_TEMPERATURE_EXTRAPOLATED), see hc_eos80_t_extrapolated().
 *
 * Error convention: hc_status (HC_OK = 0); outputs unchanged on failure.
 * Pure and re-entrant. */
#ifndef HC_EOS80_H
#define HC_EOS80_H

#include "hc_status.h"

#define HC_EOS80_SP_MAX 42.0
#define HC_EOS80_T_MIN_C (-2.0)
#define HC_EOS80_T_VALID_MAX_C 40.0 /* published validity [degC] */
#define HC_EOS80_T_MAX_C 45.0       /* accepted, with a warning above 40 [degC] */
#define HC_EOS80_P_MAX_DBAR 10000.0

/* Density of seawater rho(S, t, p).
 *   sp         S_P, practical salinity [1], 0..42
 *   t90_c      t, temperature ITS-90 [degC], -2..45
 *   p_dbar     p, sea pressure [dbar], 0..10000
 *   rho_kg_m3  out: rho [kg/m3]
 * rho = rho(S,t,0) / (1 - p / K(S,t,p)) (UNESCO 44, EOS-80).
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE (S < 0), HC_ERR_SALINITY_RANGE
 * (S > 42), HC_ERR_TEMPERATURE_RANGE, HC_ERR_PRESSURE_RANGE. */
hc_status hc_eos80_rho(double sp, double t90_c, double p_dbar, double *rho_kg_m3);

/* Density of pure water (SMOW, Bigg 1967, as adopted by EOS-80) at one
 * atmosphere [kg/m3]; t90_c ITS-90 [degC]. NaN when t is not finite or
 * outside -2..45 degC (no error code: it cannot fail otherwise). */
double hc_eos80_rho_water(double t90_c);

/* Practical salinity from density: the inverse of hc_eos80_rho in S.
 *   rho_kg_m3  rho [kg/m3] at (t, p)
 *   t90_c, p_dbar as for hc_eos80_rho
 *   sp         out: S_P [1], 0..42
 * Newton iteration in S started from a linear estimate; rho is monotone in
 * S. Over the whole range (grid of 0.013 in S_P, 1.7 degC, 2500 dbar) it
 * reaches |rho(S) - rho| < 1e-10 kg/m3 within 3 steps (30 allowed).
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE, HC_ERR_PRESSURE_RANGE,
 * HC_ERR_DOMAIN (rho below pure water at t, p), HC_ERR_SALINITY_RANGE
 * (rho above seawater of S = 42: brine needs the brine model),
 * HC_ERR_NO_CONVERGENCE. */
hc_status hc_eos80_sp_from_rho(double rho_kg_m3, double t90_c, double p_dbar, double *sp);

/* 1 when t90_c lies beyond EOS-80's published validity but inside what
 * this module accepts (40..45 degC), else 0. */
int hc_eos80_t_extrapolated(double t90_c);

#endif
