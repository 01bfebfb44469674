/* Pond geometry: level above the floor -> wetted (surface) area and stored
 * volume, and back, either from a surveyed stage-storage table or from a
 * simple shape (rectangular floor with sloped dikes).
 *
 * Units: level h [m] above the pond floor datum, area A [m2], volume V [m3].
 * Error convention: every fallible function returns an hc_status (HC_OK = 0);
 * outputs are unspecified on failure. Pure: no I/O, no allocation; the table
 * arrays belong to the caller and must outlive the hc_stage_table that
 * points at them. */
#ifndef HC_GEOMETRY_H
#define HC_GEOMETRY_H

#include <stddef.h>

#include "hc_status.h"

/* A stage-storage table: n >= 2 rows with strictly increasing level, and
 * volume increasing with level (non-decreasing, and strictly increasing
 * after the first row). area_m2 may be NULL: the area is then the slope
 * dV/dh of the volume interpolant. When given, area must be >= 0. */
typedef struct {
    size_t n;
    const double *level_m;
    const double *volume_m3;
    const double *area_m2; /* optional (NULL) */
} hc_stage_table;

/* Checks a table. On a defect, returns HC_ERR_ARGUMENT (too few rows, a
 * non-increasing level or a decreasing volume), HC_ERR_NOT_FINITE or
 * HC_ERR_NEGATIVE, and sets *bad_row (if not NULL) to the 0-based index of
 * the first offending row. */
hc_status hc_stage_table_check(const hc_stage_table *table, size_t *bad_row);

/* Volume and area at level h [m], by monotone piecewise-cubic Hermite
 * interpolation of V(h) (Fritsch & Carlson 1980, SIAM J. Numer. Anal. 17,
 * 238: slopes limited so the interpolant never overshoots a monotone table).
 * The area is linear in the table's area column when it has one, else dV/dh
 * of the interpolant. Levels below the first row give HC_ERR_DOMAIN, above
 * the last HC_ERR_DOMAIN (the pond would overflow the survey). Either output
 * may be NULL. The table must have passed hc_stage_table_check. */
hc_status hc_stage_table_at_level(const hc_stage_table *table, double h_m,
                                  double *volume_m3, double *area_m2);

/* Inverse: the level at which the table holds volume v [m3] (bisection on
 * the monotone interpolant to 1e-9 m). HC_ERR_DOMAIN outside the table. */
hc_status hc_stage_table_level_of_volume(const hc_stage_table *table, double v_m3,
                                         double *h_m);

/* A simple pond: a rectangular floor of area floor_area_m2 and perimeter
 * floor_perimeter_m (0 means square: 4 sqrt(A0)), dikes sloped at
 * side_slope horizontal per 1 vertical (0 = vertical walls), up to a crest
 * at max_level_m above the floor. */
typedef struct {
    double floor_area_m2;
    double floor_perimeter_m;
    double side_slope;
    double max_level_m;
} hc_prism;

hc_status hc_prism_check(const hc_prism *prism);

/* A(h) = A0 + s P0 h + 4 s^2 h^2 and V(h) = A0 h + s P0 h^2 / 2 +
 * (4/3) s^2 h^3: a rectangle whose sides each move out by s h (worked by
 * hand from the plan geometry). h in [0, max_level_m], else HC_ERR_DOMAIN. */
hc_status hc_prism_at_level(const hc_prism *prism, double h_m, double *volume_m3,
                            double *area_m2);
/* Inverse by Newton's method on the convex V(h), safeguarded by bisection
 * (converges to 1e-9 m in under 60 steps). */
hc_status hc_prism_level_of_volume(const hc_prism *prism, double v_m3, double *h_m);

/* Either kind behind one handle, so callers need not care which a pond has. */
typedef struct {
    int is_table; /* 1: table, 0: prism */
    hc_stage_table table;
    hc_prism prism;
} hc_pond_shape;

hc_status hc_shape_at_level(const hc_pond_shape *shape, double h_m, double *volume_m3,
                            double *area_m2);
hc_status hc_shape_level_of_volume(const hc_pond_shape *shape, double v_m3, double *h_m);
/* Highest level the shape describes [m] (last table row or the prism crest). */
double hc_shape_max_level(const hc_pond_shape *shape);

#endif
