/* Pond water and salt balance (see hc_balance.h). */
#include "hc_balance.h"

#include <math.h>
#include <stddef.h>

/* Fresh water at 20 degC [kg/m3] (Bigg 1967, SMOW polynomial). */
#define FRESH_WATER_20C 998.2

/* Error convention: hc_status. */
hc_status hc_brine_mass_of(double v_m3, double rho_kg_m3, double w_kg_kg, hc_brine_mass *out)
{
    if (out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3) || !isfinite(rho_kg_m3) || !isfinite(w_kg_kg))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < 0 || rho_kg_m3 <= 0 || w_kg_kg < 0)
        return HC_ERR_NEGATIVE;
    if (w_kg_kg >= 1)
        return HC_ERR_DOMAIN;
    double m = rho_kg_m3 * v_m3; /* brine mass [kg] */
    out->salt_kg = w_kg_kg * m;
    out->water_kg = m - out->salt_kg;
    return HC_OK;
}

hc_status hc_pumped_volume(double run_time_s, double rated_flow_m3_h, double *v_m3)
{
    if (v_m3 == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(run_time_s) || !isfinite(rated_flow_m3_h))
        return HC_ERR_NOT_FINITE;
    if (run_time_s < 0 || rated_flow_m3_h < 0)
        return HC_ERR_NEGATIVE;
    *v_m3 = rated_flow_m3_h * run_time_s / 3600.0; /* [m3/h] x [h] */
    return HC_OK;
}

static int mass_ok(const hc_brine_mass *m)
{
    return isfinite(m->water_kg) && isfinite(m->salt_kg);
}

static int mass_nonneg(const hc_brine_mass *m)
{
    return m->water_kg >= 0 && m->salt_kg >= 0;
}

hc_status hc_balance_close(const hc_balance_input *in, hc_balance_result *out)
{
    if (in == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(in->duration_days) || !isfinite(in->mean_area_m2) || !isfinite(in->rain_mm) ||
        !isfinite(in->deposited_salt_kg) || !mass_ok(&in->start) || !mass_ok(&in->end) ||
        !mass_ok(&in->received) || !mass_ok(&in->sent))
        return HC_ERR_NOT_FINITE;
    if (in->rain_mm < 0 || in->deposited_salt_kg < 0 || !mass_nonneg(&in->start) ||
        !mass_nonneg(&in->end) || !mass_nonneg(&in->received) || !mass_nonneg(&in->sent))
        return HC_ERR_NEGATIVE;
    if (in->duration_days <= 0 || in->mean_area_m2 <= 0)
        return HC_ERR_ARGUMENT;
    /* Rain as a water depth on the wetted area: mm / 1000 x A x rho [kg]. */
    double rain_kg = in->rain_mm / 1000.0 * in->mean_area_m2 * HC_WATER_DEPTH_DENSITY;
    /* Water: start + in + rain - out - end = evaporated (+ seepage) [kg]. */
    out->evaporated_kg = in->start.water_kg + in->received.water_kg + rain_kg -
                         in->sent.water_kg - in->end.water_kg;
    /* As a depth per day: kg / (rho A) m -> mm, over the window [mm/day]. */
    out->net_evaporation_mm_day = out->evaporated_kg / (HC_WATER_DEPTH_DENSITY * in->mean_area_m2) *
                                  1000.0 / in->duration_days;
    /* Salt is conserved except what crystallises [kg]. */
    out->salt_residual_kg = in->start.salt_kg + in->received.salt_kg - in->sent.salt_kg -
                            in->deposited_salt_kg - in->end.salt_kg;
    out->salt_residual_fraction =
        in->end.salt_kg > 0 ? out->salt_residual_kg / in->end.salt_kg : NAN;
    return HC_OK;
}

hc_status hc_balance_density_check(const hc_balance_input *in, const hc_balance_result *res,
                                   double end_volume_m3, double end_density_kg_m3,
                                   double tolerance_kg_m3, double *rho_predicted, int *drift)
{
    if (in == NULL || res == NULL || rho_predicted == NULL || drift == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(end_volume_m3) || !isfinite(end_density_kg_m3) || !isfinite(tolerance_kg_m3) ||
        !isfinite(res->salt_residual_kg))
        return HC_ERR_NOT_FINITE;
    if (end_volume_m3 <= 0 || tolerance_kg_m3 < 0)
        return HC_ERR_NEGATIVE;
    if (end_density_kg_m3 <= FRESH_WATER_20C || in->end.salt_kg <= 0)
        return HC_ERR_DOMAIN; /* no salt to compare against */
    double c_meas = in->end.salt_kg / end_volume_m3;                        /* [kg/m3] */
    double c_pred = (in->end.salt_kg + res->salt_residual_kg) / end_volume_m3; /* [kg/m3] */
    double slope = c_meas / (end_density_kg_m3 - FRESH_WATER_20C);          /* dc/drho [1] */
    *rho_predicted = end_density_kg_m3 + (c_pred - c_meas) / slope;
    *drift = fabs(*rho_predicted - end_density_kg_m3) > tolerance_kg_m3;
    return HC_OK;
}

hc_status hc_evaporation_activity_factor(double aw, double rh, double *factor)
{
    if (factor == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(aw) || !isfinite(rh))
        return HC_ERR_NOT_FINITE;
    if (aw < 0 || rh < 0)
        return HC_ERR_NEGATIVE;
    if (aw > 1 || rh >= 1)
        return HC_ERR_DOMAIN;
    /* (a_w e_s - RH e_s) / (e_s - RH e_s) [1]. */
    *factor = (aw - rh) / (1 - rh);
    return HC_OK;
}

hc_status hc_evaporation_expected(double pan_mm_day, double pan_coefficient, double aw, double rh,
                                  double *e_mm_day)
{
    if (e_mm_day == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(pan_mm_day) || !isfinite(pan_coefficient))
        return HC_ERR_NOT_FINITE;
    if (pan_mm_day < 0 || pan_coefficient <= 0)
        return HC_ERR_NEGATIVE;
    double f;
    hc_status st = hc_evaporation_activity_factor(aw, rh, &f);
    if (st != HC_OK)
        return st;
    *e_mm_day = pan_mm_day * pan_coefficient * f; /* [mm/day] */
    return HC_OK;
}
