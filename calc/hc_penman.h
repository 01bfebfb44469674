/* Open-water evaporation from daily weather: the Penman (1948) combination
 * equation in the SI open-water form of Shuttleworth (1993, Handbook of
 * Hydrology, ch. 4), with the FAO-56 procedures (Allen, Pereira, Raes &
 * Smith 1998, FAO Irrigation and Drainage Paper 56, ch. 3) for the
 * saturation vapour pressure, its slope, the psychrometric constant and the
 * net radiation. A brine evaporates less: scale the estimate by
 * hc_evaporation_activity_factor (hc_balance.h; Salhotra, Adams & Harleman
 * 1985).
 *
 * Units: temperature [degC], pressure [kPa], radiation [MJ m-2 day-1], wind
 * at 2 m [m/s], evaporation [mm/day], relative humidity as a fraction [0, 1].
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure.
 * Pure: no I/O, no allocation. */
#ifndef HC_PENMAN_H
#define HC_PENMAN_H

#include "hc_status.h"

/* Latent heat of vaporisation used by FAO-56 and Shuttleworth [MJ/kg]. */
#define HC_PENMAN_LAMBDA_MJ_KG 2.45
/* Albedo of open water (Shuttleworth 1993, ch. 4: 0.08; from memory). */
#define HC_PENMAN_WATER_ALBEDO 0.08

/* FAO-56 eq. 11: e0(T) = 0.6108 exp(17.27 T / (T + 237.3)) [kPa]. */
double hc_sat_vapour_pressure_kpa(double t_c);
/* FAO-56 eq. 13: slope 4098 e0(T) / (T + 237.3)^2 [kPa/K]. */
double hc_sat_vapour_slope_kpa_k(double t_c);
/* FAO-56 eq. 7: P = 101.3 ((293 - 0.0065 z) / 293)^5.26 [kPa], z [m]. */
double hc_air_pressure_kpa(double elevation_m);
/* FAO-56 eq. 8: gamma = 0.665e-3 P [kPa/K]. */
double hc_psychrometric_kpa_k(double pressure_kpa);

/* FAO-56 eqs. 21-25: extraterrestrial radiation for a day of the year
 * (1..366) at a latitude [degrees, north positive] [MJ m-2 day-1]; also the
 * daylight hours N (eq. 34) when n_hours is not NULL. */
hc_status hc_extraterrestrial_radiation(double latitude_deg, int day_of_year, double *ra,
                                        double *n_hours);

/* One day's weather. NaN marks what the site does not measure: give
 * solar_mj_m2 or sunshine_h (with latitude and day), the rest is needed.
 * Daily minimum and maximum air temperatures give the FAO-56 mean
 * saturation vapour pressure (eq. 12) and the longwave term (eq. 39); when
 * only a mean is known, pass it as both. */
typedef struct {
    double t_min_c, t_max_c;    /* air temperature [degC] */
    double relative_humidity;   /* daily mean, fraction [0, 1] */
    double wind_2m_m_s;         /* at 2 m [m/s]; FAO-56 eq. 47 converts other heights */
    double solar_mj_m2;         /* incoming shortwave Rs [MJ m-2 day-1]; NaN: from sunshine */
    double sunshine_h;          /* bright sunshine n [h]; used when solar is NaN */
    double latitude_deg;
    int day_of_year;            /* 1..366 */
    double elevation_m;
} hc_weather_day;

typedef struct {
    double es_kpa, ea_kpa;      /* mean saturation and actual vapour pressure */
    double delta_kpa_k, gamma_kpa_k;
    double rs_mj_m2, rso_mj_m2, rn_mj_m2; /* incoming, clear-sky, net radiation */
    double evaporation_mm_day;  /* open fresh water, Penman (Shuttleworth 1993) */
} hc_penman_result;

/* FAO-56 eq. 39 with eq. 37 (Rso = (0.75 + 2e-5 z) Ra): net longwave
 * radiation [MJ m-2 day-1] from Tmin, Tmax [degC], ea [kPa], Rs and Rso;
 * Rs/Rso is capped at 1. */
hc_status hc_net_longwave(double t_min_c, double t_max_c, double ea_kpa, double rs, double rso,
                          double *rnl);

/* The day's open-water evaporation. HC_ERR_ARGUMENT when neither radiation
 * nor sunshine (with latitude and day) is given; HC_ERR_NOT_FINITE for a
 * missing temperature, humidity or wind; HC_ERR_DOMAIN for humidity outside
 * [0, 1], negative wind or radiation. Negative results (dewfall) are
 * returned as they are. */
hc_status hc_penman_open_water(const hc_weather_day *w, hc_penman_result *out);

/* Calibration of an estimate against what the ponds achieved: the
 * least-squares factor through the origin k = sum(a e) / sum(e e), the
 * root-mean-square residual of a - k e and the coefficient of
 * determination R^2 = 1 - SS_res / SS_tot (about the mean of a). n >= 1;
 * pairs with a non-finite member are skipped (*used says how many were
 * kept); HC_ERR_DOMAIN when none or all estimates are zero. */
hc_status hc_evaporation_fit(const double *estimate_mm_day, const double *achieved_mm_day, int n,
                             double *k, double *rms_mm_day, double *r2, int *used);

#endif
