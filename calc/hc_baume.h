/* Specific gravity at a reference temperature, and degree Baume on the
 * heavy-liquid scale.
 *
 *   deg Be = m (1 - 1/SG),   SG = m / (m - deg Be)
 *
 * where SG = rho_brine(t_ref) / rho_water(t_ref) ("t_ref/t_ref") and m is
 * the scale's modulus. The moduli in use: 145 (US scale, SG at 60/60 degF),
 * 144.3 ("rational" scale), 146.78 (Gerlach scale), 144 (old Dutch scale)
 * (e.g. NBS Circular 59, 1916; Perry's Chemical Engineers' Handbook, "Specific
 * gravity scales"). Any positive modulus is accepted; record it with the
 * reading, and both reference temperatures.
 *
 * The brine's density at t_ref is not the density measured at pond
 * temperature: callers evaluate their density model at t_ref for the same
 * composition and pass that here.
 *
 * Error convention: hc_status (HC_OK = 0); outputs unchanged on failure.
 * Pure and re-entrant. */
#ifndef HC_BAUME_H
#define HC_BAUME_H

#include "hc_status.h"

#define HC_BAUME_MODULUS_US 145.0
#define HC_BAUME_MODULUS_RATIONAL 144.3
#define HC_BAUME_MODULUS_GERLACH 146.78
#define HC_BAUME_MODULUS_DUTCH 144.0
#define HC_BAUME_MODULUS_DEFAULT HC_BAUME_MODULUS_US

/* Reference temperatures [degC, ITS-90]; 60 degF = 15.5556 degC. */
#define HC_TREF_15C 15.0
#define HC_TREF_20C 20.0
#define HC_TREF_60F ((60.0 - 32.0) * 5.0 / 9.0)
#define HC_TREF_DEFAULT HC_TREF_15C

/* Specific gravity t_ref/t_ref from the brine's density at t_ref.
 *   rho_at_tref_kg_m3  rho_brine(t_ref) at one atmosphere [kg/m3], > 0
 *   t_ref_c            t_ref, ITS-90 [degC], -2..45 (pure water by
 *                      EOS-80's SMOW, Bigg 1967)
 *   sg                 out: SG [1]
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE (rho <= 0),
 * HC_ERR_TEMPERATURE_RANGE. */
hc_status hc_baume_sg(double rho_at_tref_kg_m3, double t_ref_c, double *sg);

/* Degree Baume from specific gravity: deg Be = m (1 - 1/SG).
 *   sg       SG [1], >= 1 (the heavy-liquid scale is for liquids at least as
 *            dense as water)
 *   modulus  m [deg Be], > 0
 *   baume    out [deg Be]
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_ARGUMENT (m <= 0), HC_ERR_DOMAIN
 * (SG < 1). */
hc_status hc_baume_from_sg(double sg, double modulus, double *baume);

/* Specific gravity from degree Baume: SG = m / (m - deg Be).
 *   baume    deg Be, 0 <= deg Be < m
 *   modulus  m, > 0
 *   sg       out [1]
 * Errors: HC_ERR_NOT_FINITE, HC_ERR_ARGUMENT (m <= 0), HC_ERR_NEGATIVE
 * (deg Be < 0), HC_ERR_DOMAIN (deg Be >= m). */
hc_status hc_sg_from_baume(double baume, double modulus, double *sg);

/* 1 when m is a usable modulus (finite and > 0), else 0. */
int hc_baume_modulus_valid(double modulus);

#endif
