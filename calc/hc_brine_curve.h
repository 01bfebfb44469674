/* A brine's evaporation path sampled as a table against the concentration
 * factor CF (initial water mass / remaining water mass), for hydrology:
 * density, dissolved salt, salt deposited so far and water activity. The
 * thermodynamic model (hc_path) fills it; tests may fill it by hand. All
 * amounts are per kg of water, so a pond's numbers follow by scaling.
 *
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure.
 * Pure; the arrays belong to the caller and must outlive the curve. */
#ifndef HC_BRINE_CURVE_H
#define HC_BRINE_CURVE_H

#include <stddef.h>

#include "hc_status.h"

typedef struct {
    size_t n;                         /* rows, >= 2 */
    const double *cf;                 /* strictly increasing, >= 1 [1] */
    const double *density_kg_m3;      /* non-decreasing, at one temperature [kg/m3] */
    const double *dissolved_kg_per_kg_water; /* dissolved salt per kg of water present [kg/kg] */
    const double *deposited_kg_per_kg_feed_water; /* solids deposited so far per kg of the
                                                    feed's water, non-decreasing [kg/kg] */
    const double *water_activity;     /* optional (NULL) [1] */
} hc_brine_curve;

/* One point of the curve. */
typedef struct {
    double cf;
    double density_kg_m3;
    double dissolved_kg_per_kg_water;
    double deposited_kg_per_kg_feed_water;
    double water_activity; /* NaN when the curve has none */
} hc_curve_point;

/* Checks the curve; *bad_row (may be NULL) gets the first offending row.
 * HC_ERR_ARGUMENT: too few rows, CF not increasing or below 1, density or
 * deposit decreasing; HC_ERR_NOT_FINITE; HC_ERR_NEGATIVE. */
hc_status hc_curve_check(const hc_brine_curve *curve, size_t *bad_row);

/* The curve at cf, linear in ln CF between rows (the path is sampled
 * geometrically in CF). Outside [cf_0, cf_n-1]: HC_ERR_DOMAIN. */
hc_status hc_curve_at_cf(const hc_brine_curve *curve, double cf, hc_curve_point *point);

/* The smallest CF whose density reaches rho (linear between rows). Below
 * the first row's density: HC_ERR_DOMAIN (more dilute than the feed); above
 * the last: HC_ERR_DOMAIN (beyond the path). */
hc_status hc_curve_cf_at_density(const hc_brine_curve *curve, double rho_kg_m3, double *cf);

/* Salt mass fraction of the brine at cf: s / (1 + s), s dissolved per kg
 * water [kg salt / kg brine]. */
hc_status hc_curve_salinity_at_cf(const hc_brine_curve *curve, double cf, double *w_kg_kg);

/* Salt deposited when water_kg of brine at cf_from concentrates to cf_to in
 * a closed pond: water_kg cf_from (D(cf_to) - D(cf_from)) [kg], where
 * water_kg cf_from is the feed water the brine came from (definition of CF)
 * and D the cumulative deposit per kg of feed water. */
hc_status hc_curve_deposit_between(const hc_brine_curve *curve, double water_kg, double cf_from,
                                   double cf_to, double *deposited_kg);

#endif
