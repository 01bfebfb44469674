/* Days to a target concentration along the evaporation path (see
 * hc_forecast.h for the model). */
#include "hc_forecast.h"

#include <math.h>
#include <stddef.h>

#include "hc_balance.h"

#define PANELS 256 /* even; Simpson on ln CF */

/* Integrand of t(u) at CF: W0 CF0 / (CF rho_d A E) [day per unit ln CF].
 * Returns HC_OK and sets *stalled when the brine no longer evaporates. */
static hc_status integrand(const hc_forecast_input *in, double water0_kg, double f0, double cf,
                           double *value, int *stalled)
{
    hc_curve_point pt;
    hc_status st = hc_curve_at_cf(in->curve, cf, &pt);
    if (st != HC_OK)
        return st;
    double water_kg = water0_kg * in->cf / cf;                                 /* [kg] */
    double v_m3 = water_kg * (1 + pt.dissolved_kg_per_kg_water) / pt.density_kg_m3; /* [m3] */
    double h_m, area_m2;
    st = hc_shape_level_of_volume(in->shape, v_m3, &h_m);
    if (st == HC_OK)
        st = hc_shape_at_level(in->shape, h_m, NULL, &area_m2);
    if (st != HC_OK)
        return HC_ERR_DOMAIN; /* the brine no longer fits the shape: dry or overflowing */
    double e = in->net_evap_mm_day;
    if (in->scale_by_activity) {
        double f;
        st = hc_evaporation_activity_factor(pt.water_activity, in->relative_humidity, &f);
        if (st != HC_OK)
            return st;
        e *= f / f0;
    }
    if (!(e > 0) || !(area_m2 > 0)) {
        *stalled = 1;
        return HC_OK;
    }
    /* E [mm/day] -> [m/day]; dW/dt = rho_d A E [kg/day]. */
    *value = water0_kg * in->cf / (cf * HC_WATER_DEPTH_DENSITY * area_m2 * e / 1000.0);
    return HC_OK;
}

/* Error convention: hc_status. */
hc_status hc_forecast_days_to_cf(const hc_forecast_input *in, double cf_target, double *days)
{
    if (in == NULL || in->shape == NULL || in->curve == NULL || days == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(in->level_m) || !isfinite(in->cf) || !isfinite(in->net_evap_mm_day) ||
        !isfinite(cf_target) || !isfinite(in->relative_humidity))
        return HC_ERR_NOT_FINITE;
    if (in->level_m < 0 || in->cf < 1 || cf_target < 1)
        return in->level_m < 0 ? HC_ERR_NEGATIVE : HC_ERR_ARGUMENT;
    if (in->scale_by_activity && in->curve->water_activity == NULL)
        return HC_ERR_ARGUMENT;
    if (cf_target <= in->cf) {
        *days = 0;
        return HC_OK;
    }
    if (!(in->net_evap_mm_day > 0)) {
        *days = INFINITY;
        return HC_OK;
    }
    hc_curve_point now;
    hc_status st = hc_curve_at_cf(in->curve, in->cf, &now);
    if (st == HC_OK)
        st = hc_curve_at_cf(in->curve, cf_target, &(hc_curve_point){0});
    if (st != HC_OK)
        return st;
    double v0_m3;
    st = hc_shape_at_level(in->shape, in->level_m, &v0_m3, NULL);
    if (st != HC_OK)
        return st;
    if (!(v0_m3 > 0))
        return HC_ERR_DOMAIN;
    /* Water now: brine mass rho V over (1 + s) [kg]. */
    double water0_kg = v0_m3 * now.density_kg_m3 / (1 + now.dissolved_kg_per_kg_water);
    double f0 = 1;
    if (in->scale_by_activity) {
        st = hc_evaporation_activity_factor(now.water_activity, in->relative_humidity, &f0);
        if (st != HC_OK)
            return st;
        if (!(f0 > 0)) {
            *days = INFINITY;
            return HC_OK;
        }
    }
    double u0 = log(in->cf), u1 = log(cf_target), du = (u1 - u0) / PANELS;
    double sum = 0;
    for (int i = 0; i <= PANELS; i++) {
        double cf = exp(u0 + i * du), g = 0;
        int stalled = 0;
        if (i == PANELS)
            cf = cf_target;
        st = integrand(in, water0_kg, f0, cf, &g, &stalled);
        if (st != HC_OK)
            return st;
        if (stalled) {
            *days = INFINITY;
            return HC_OK;
        }
        /* Simpson weights 1, 4, 2, ..., 4, 1. */
        sum += g * ((i == 0 || i == PANELS) ? 1 : (i % 2 ? 4 : 2));
    }
    *days = sum * du / 3;
    return HC_OK;
}

hc_status hc_forecast_days_to_density(const hc_forecast_input *in, double rho_target_kg_m3,
                                      double *days)
{
    if (in == NULL || in->curve == NULL || days == NULL)
        return HC_ERR_ARGUMENT;
    double cf_target;
    hc_status st = hc_curve_cf_at_density(in->curve, rho_target_kg_m3, &cf_target);
    if (st != HC_OK)
        return st;
    return hc_forecast_days_to_cf(in, cf_target, days);
}

hc_status hc_rate_spread(const double *r, int n, double z, double *low, double *mean, double *high)
{
    if (r == NULL || n < 1 || low == NULL || mean == NULL || high == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(z))
        return HC_ERR_NOT_FINITE;
    if (z < 0)
        return HC_ERR_NEGATIVE;
    double s = 0;
    for (int i = 0; i < n; i++) {
        if (!isfinite(r[i]))
            return HC_ERR_NOT_FINITE;
        s += r[i];
    }
    double m = s / n, ss = 0;
    for (int i = 0; i < n; i++)
        ss += (r[i] - m) * (r[i] - m);
    /* Sample standard deviation (n - 1 in the denominator) [mm/day]. */
    double sd = n > 1 ? sqrt(ss / (n - 1)) : 0;
    *mean = m;
    *low = m - z * sd;
    *high = m + z * sd;
    return HC_OK;
}
