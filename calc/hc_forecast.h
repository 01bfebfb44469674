/* Forecast: days until a pond's brine reaches a concentration, integrating
 * the water balance along the evaporation path at a given net evaporation
 * rate. The pond is taken as closed (no transfers) from now on: operators
 * ask "if we leave it, when is it ready?".
 *
 * Model (worked by hand from the balance in hc_balance.h): water W falls as
 * dW/dt = -rho_d A(h) E(CF), where rho_d = 1000 kg/m3 turns the depth rate E
 * into mass; CF = W0 CF0 / W; the brine volume V = W (1 + s(CF)) / rho(CF)
 * sets the level h and so the wetted area A. With u = ln CF,
 *     t = integral W0 CF0 / (CF rho_d A(CF) E(CF)) du,
 * evaluated by composite Simpson's rule on 256 panels in u.
 * E(CF) = E0 f(a_w(CF)) / f(a_w(CF0)) when scaling by water activity
 * (hc_evaporation_activity_factor), else E0.
 *
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure. */
#ifndef HC_FORECAST_H
#define HC_FORECAST_H

#include "hc_brine_curve.h"
#include "hc_geometry.h"
#include "hc_status.h"

typedef struct {
    const hc_pond_shape *shape;
    const hc_brine_curve *curve;
    double level_m;           /* brine level now [m] */
    double cf;                /* concentration factor now [1] */
    double net_evap_mm_day;   /* recent net evaporation [mm/day] */
    int scale_by_activity;    /* 1: slow the rate as a_w falls (needs the curve's a_w) */
    double relative_humidity; /* [0, 1) for the activity scaling; 0 if unknown */
} hc_forecast_input;

/* Days until CF reaches cf_target. 0 when it already has. INFINITY (and
 * HC_OK) when the rate is not positive, or when the brine stops
 * evaporating before the target (a_w falls to the air's humidity).
 * HC_ERR_DOMAIN when the pond would run dry or the target lies beyond the
 * curve. */
hc_status hc_forecast_days_to_cf(const hc_forecast_input *in, double cf_target, double *days);

/* Days until the density reaches rho_target (through the curve's CF). */
hc_status hc_forecast_days_to_density(const hc_forecast_input *in, double rho_target_kg_m3,
                                      double *days);

/* A rate and its spread from n daily rates [mm/day]: the mean, and
 * mean -/+ z s with s the sample standard deviation (n >= 2; n = 1 gives
 * low = high = mean). */
hc_status hc_rate_spread(const double *rates_mm_day, int n, double z, double *low, double *mean,
                         double *high);

#endif
