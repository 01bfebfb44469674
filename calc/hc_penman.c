/* Penman open-water evaporation with FAO-56 auxiliaries (see hc_penman.h). */
#include "hc_penman.h"

#include <math.h>
#include <stddef.h>

#define SOLAR_CONSTANT 0.0820   /* Gsc [MJ m-2 min-1], FAO-56 eq. 21 */
#define STEFAN_BOLTZMANN 4.903e-9 /* sigma [MJ K-4 m-2 day-1], FAO-56 eq. 39 */
#define ANGSTROM_A 0.25         /* a_s, FAO-56 eq. 35 (no local calibration) */
#define ANGSTROM_B 0.50         /* b_s, FAO-56 eq. 35 */

double hc_sat_vapour_pressure_kpa(double t_c)
{
    /* FAO-56 eq. 11 [kPa], T [degC]. */
    return 0.6108 * exp(17.27 * t_c / (t_c + 237.3));
}

double hc_sat_vapour_slope_kpa_k(double t_c)
{
    /* FAO-56 eq. 13 [kPa/K]. */
    double d = t_c + 237.3;
    return 4098.0 * hc_sat_vapour_pressure_kpa(t_c) / (d * d);
}

double hc_air_pressure_kpa(double z_m)
{
    /* FAO-56 eq. 7 [kPa], z [m]. */
    return 101.3 * pow((293.0 - 0.0065 * z_m) / 293.0, 5.26);
}

double hc_psychrometric_kpa_k(double p_kpa)
{
    /* FAO-56 eq. 8: cp P / (epsilon lambda) = 0.665e-3 P [kPa/K]. */
    return 0.665e-3 * p_kpa;
}

/* Error convention: hc_status. */
hc_status hc_extraterrestrial_radiation(double lat_deg, int doy, double *ra, double *n_hours)
{
    if (ra == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(lat_deg))
        return HC_ERR_NOT_FINITE;
    if (doy < 1 || doy > 366 || fabs(lat_deg) > 90)
        return HC_ERR_DOMAIN;
    double phi = lat_deg * M_PI / 180.0;
    double dr = 1 + 0.033 * cos(2 * M_PI * doy / 365.0);          /* FAO-56 eq. 23 */
    double decl = 0.409 * sin(2 * M_PI * doy / 365.0 - 1.39);     /* eq. 24 [rad] */
    double x = -tan(phi) * tan(decl);
    double ws = x >= 1 ? 0 : x <= -1 ? M_PI : acos(x);            /* eq. 25 [rad] */
    /* eq. 21 [MJ m-2 day-1]. */
    *ra = 24 * 60 / M_PI * SOLAR_CONSTANT * dr *
          (ws * sin(phi) * sin(decl) + cos(phi) * cos(decl) * sin(ws));
    if (n_hours != NULL)
        *n_hours = 24 / M_PI * ws;                                /* eq. 34 [h] */
    return HC_OK;
}

hc_status hc_net_longwave(double t_min_c, double t_max_c, double ea_kpa, double rs, double rso,
                          double *rnl)
{
    if (rnl == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(t_min_c) || !isfinite(t_max_c) || !isfinite(ea_kpa) || !isfinite(rs) ||
        !isfinite(rso))
        return HC_ERR_NOT_FINITE;
    if (ea_kpa < 0 || rs < 0 || !(rso > 0))
        return HC_ERR_DOMAIN;
    double tk_max = t_max_c + 273.16, tk_min = t_min_c + 273.16;
    double ratio = fmin(1.0, rs / rso);
    /* FAO-56 eq. 39 [MJ m-2 day-1]. */
    *rnl = STEFAN_BOLTZMANN * 0.5 * (pow(tk_max, 4) + pow(tk_min, 4)) *
           (0.34 - 0.14 * sqrt(ea_kpa)) * (1.35 * ratio - 0.35);
    return HC_OK;
}

hc_status hc_penman_open_water(const hc_weather_day *w, hc_penman_result *out)
{
    if (w == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(w->t_min_c) || !isfinite(w->t_max_c) || !isfinite(w->relative_humidity) ||
        !isfinite(w->wind_2m_m_s))
        return HC_ERR_NOT_FINITE;
    if (w->relative_humidity < 0 || w->relative_humidity > 1 || w->wind_2m_m_s < 0 ||
        w->t_max_c < w->t_min_c)
        return HC_ERR_DOMAIN;
    double z = isfinite(w->elevation_m) ? w->elevation_m : 0;
    double tmean = 0.5 * (w->t_min_c + w->t_max_c);               /* FAO-56 eq. 9 */
    /* eq. 12: mean of e0 at the extremes [kPa]. */
    out->es_kpa = 0.5 * (hc_sat_vapour_pressure_kpa(w->t_min_c) +
                         hc_sat_vapour_pressure_kpa(w->t_max_c));
    out->ea_kpa = w->relative_humidity * out->es_kpa;             /* eq. 19 with RHmean */
    out->delta_kpa_k = hc_sat_vapour_slope_kpa_k(tmean);          /* at Tmean, FAO-56 ch. 3 */
    out->gamma_kpa_k = hc_psychrometric_kpa_k(hc_air_pressure_kpa(z));

    double ra = NAN, n_day = NAN;
    int have_sky = isfinite(w->latitude_deg) && w->day_of_year >= 1 && w->day_of_year <= 366;
    if (have_sky) {
        hc_status st = hc_extraterrestrial_radiation(w->latitude_deg, w->day_of_year, &ra, &n_day);
        if (st != HC_OK)
            return st;
    }
    if (isfinite(w->solar_mj_m2)) {
        out->rs_mj_m2 = w->solar_mj_m2;
    } else if (isfinite(w->sunshine_h) && have_sky) {
        if (w->sunshine_h < 0)
            return HC_ERR_DOMAIN;
        double frac = n_day > 0 ? fmin(1.0, w->sunshine_h / n_day) : 0;
        out->rs_mj_m2 = (ANGSTROM_A + ANGSTROM_B * frac) * ra;   /* eq. 35 */
    } else {
        return HC_ERR_ARGUMENT;
    }
    if (out->rs_mj_m2 < 0)
        return HC_ERR_DOMAIN;
    /* Clear-sky radiation, eq. 37; without the sky geometry the measured
     * radiation is taken as clear-sky (cloudless longwave: an upper bound). */
    out->rso_mj_m2 = have_sky ? (0.75 + 2e-5 * z) * ra : out->rs_mj_m2;
    double rnl = 0;
    if (out->rso_mj_m2 > 0) {
        hc_status st = hc_net_longwave(w->t_min_c, w->t_max_c, out->ea_kpa, out->rs_mj_m2,
                                       out->rso_mj_m2, &rnl);
        if (st != HC_OK)
            return st;
    }
    /* FAO-56 eq. 38 with the open-water albedo, then eq. 40 [MJ m-2 day-1]. */
    out->rn_mj_m2 = (1 - HC_PENMAN_WATER_ALBEDO) * out->rs_mj_m2 - rnl;
    /* Shuttleworth (1993, ch. 4), Penman for open water [mm/day]:
     * E = (Delta Rn + gamma 6.43 (1 + 0.536 u2) (es - ea)) / (lambda (Delta + gamma)). */
    double d = out->delta_kpa_k, g = out->gamma_kpa_k;
    out->evaporation_mm_day =
        (d * out->rn_mj_m2 + g * 6.43 * (1 + 0.536 * w->wind_2m_m_s) * (out->es_kpa - out->ea_kpa)) /
        (HC_PENMAN_LAMBDA_MJ_KG * (d + g));
    return HC_OK;
}

hc_status hc_evaporation_fit(const double *e, const double *a, int n, double *k, double *rms,
                             double *r2, int *used)
{
    if (e == NULL || a == NULL || k == NULL || rms == NULL || r2 == NULL || n < 1)
        return HC_ERR_ARGUMENT;
    double see = 0, sae = 0, sa = 0;
    int m = 0;
    for (int i = 0; i < n; i++) {
        if (!isfinite(e[i]) || !isfinite(a[i]))
            continue;
        see += e[i] * e[i];
        sae += a[i] * e[i];
        sa += a[i];
        m++;
    }
    if (used != NULL)
        *used = m;
    if (m == 0 || !(see > 0))
        return HC_ERR_DOMAIN;
    *k = sae / see; /* least squares through the origin */
    double mean = sa / m, ss_res = 0, ss_tot = 0;
    for (int i = 0; i < n; i++) {
        if (!isfinite(e[i]) || !isfinite(a[i]))
            continue;
        double r = a[i] - *k * e[i];
        ss_res += r * r;
        ss_tot += (a[i] - mean) * (a[i] - mean);
    }
    *rms = sqrt(ss_res / m);
    *r2 = ss_tot > 0 ? 1 - ss_res / ss_tot : NAN;
    return HC_OK;
}
