/* The evaporation path as a CF-indexed table for hydrology. */
#include "hc_brine_curve.h"

#include <math.h>

/* Error convention: hc_status. */
hc_status hc_curve_check(const hc_brine_curve *c, size_t *bad_row)
{
    size_t dummy;
    if (bad_row == NULL)
        bad_row = &dummy;
    *bad_row = 0;
    if (c == NULL || c->n < 2 || c->cf == NULL || c->density_kg_m3 == NULL ||
        c->dissolved_kg_per_kg_water == NULL || c->deposited_kg_per_kg_feed_water == NULL)
        return HC_ERR_ARGUMENT;
    for (size_t i = 0; i < c->n; i++) {
        *bad_row = i;
        double aw = c->water_activity != NULL ? c->water_activity[i] : 1;
        if (!isfinite(c->cf[i]) || !isfinite(c->density_kg_m3[i]) ||
            !isfinite(c->dissolved_kg_per_kg_water[i]) ||
            !isfinite(c->deposited_kg_per_kg_feed_water[i]) || !isfinite(aw))
            return HC_ERR_NOT_FINITE;
        if (c->density_kg_m3[i] <= 0 || c->dissolved_kg_per_kg_water[i] < 0 ||
            c->deposited_kg_per_kg_feed_water[i] < 0 || aw < 0 || aw > 1)
            return HC_ERR_NEGATIVE;
        if (c->cf[i] < 1)
            return HC_ERR_ARGUMENT;
        if (i == 0)
            continue;
        if (!(c->cf[i] > c->cf[i - 1]) || c->density_kg_m3[i] < c->density_kg_m3[i - 1] ||
            c->deposited_kg_per_kg_feed_water[i] < c->deposited_kg_per_kg_feed_water[i - 1])
            return HC_ERR_ARGUMENT;
    }
    *bad_row = 0;
    return HC_OK;
}

static double lerp(const double *y, size_t k, double s)
{
    return y[k] + s * (y[k + 1] - y[k]);
}

hc_status hc_curve_at_cf(const hc_brine_curve *c, double cf, hc_curve_point *pt)
{
    if (c == NULL || c->n < 2 || pt == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(cf))
        return HC_ERR_NOT_FINITE;
    /* A relative slack of 1e-12 absorbs the rounding of CF = W0/W. */
    if (cf < c->cf[0] * (1 - 1e-12) || cf > c->cf[c->n - 1] * (1 + 1e-12))
        return HC_ERR_DOMAIN;
    if (cf < c->cf[0])
        cf = c->cf[0];
    if (cf > c->cf[c->n - 1])
        cf = c->cf[c->n - 1];
    size_t lo = 0, hi = c->n - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (c->cf[mid] <= cf)
            lo = mid;
        else
            hi = mid;
    }
    double s = log(cf / c->cf[lo]) / log(c->cf[lo + 1] / c->cf[lo]);
    pt->cf = cf;
    pt->density_kg_m3 = lerp(c->density_kg_m3, lo, s);
    pt->dissolved_kg_per_kg_water = lerp(c->dissolved_kg_per_kg_water, lo, s);
    pt->deposited_kg_per_kg_feed_water = lerp(c->deposited_kg_per_kg_feed_water, lo, s);
    pt->water_activity = c->water_activity != NULL ? lerp(c->water_activity, lo, s) : NAN;
    return HC_OK;
}

hc_status hc_curve_cf_at_density(const hc_brine_curve *c, double rho, double *cf)
{
    if (c == NULL || c->n < 2 || cf == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(rho))
        return HC_ERR_NOT_FINITE;
    if (rho < c->density_kg_m3[0] || rho > c->density_kg_m3[c->n - 1])
        return HC_ERR_DOMAIN;
    for (size_t k = 0; k + 1 < c->n; k++) {
        double r0 = c->density_kg_m3[k], r1 = c->density_kg_m3[k + 1];
        if (rho > r1)
            continue;
        double s = r1 > r0 ? (rho - r0) / (r1 - r0) : 0;
        /* Inverse of the ln-CF interpolation used by hc_curve_at_cf. */
        *cf = c->cf[k] * exp(s * log(c->cf[k + 1] / c->cf[k]));
        return HC_OK;
    }
    *cf = c->cf[c->n - 1];
    return HC_OK;
}

hc_status hc_curve_salinity_at_cf(const hc_brine_curve *c, double cf, double *w)
{
    if (w == NULL)
        return HC_ERR_ARGUMENT;
    hc_curve_point pt;
    hc_status st = hc_curve_at_cf(c, cf, &pt);
    if (st != HC_OK)
        return st;
    /* Mass fraction from salt per kg water: s / (1 + s) [kg/kg]. */
    *w = pt.dissolved_kg_per_kg_water / (1 + pt.dissolved_kg_per_kg_water);
    return HC_OK;
}

hc_status hc_curve_deposit_between(const hc_brine_curve *c, double water_kg, double cf_from,
                                   double cf_to, double *deposited_kg)
{
    if (deposited_kg == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(water_kg))
        return HC_ERR_NOT_FINITE;
    if (water_kg < 0)
        return HC_ERR_NEGATIVE;
    hc_curve_point a, b;
    hc_status st = hc_curve_at_cf(c, cf_from, &a);
    if (st == HC_OK)
        st = hc_curve_at_cf(c, cf_to, &b);
    if (st != HC_OK)
        return st;
    /* Feed water behind the brine: W cf (definition of CF) [kg]. */
    *deposited_kg = water_kg * a.cf *
                    (b.deposited_kg_per_kg_feed_water - a.deposited_kg_per_kg_feed_water);
    return HC_OK;
}
