/* Physical plausibility limits; see hs_plausible.h (every number here is
 * common practice, no source). */
#include <math.h>

#include "hs_plausible.h"

#define STANDARD_GRAVITY 9.80665   /* g_n [m/s2], CGPM 1901 */
#define BELOW_FLOOR_M 0.2          /* zero drift, a sensor set a little low */
#define ABOVE_CREST_M 0.5          /* an overflowing pond, waves */
#define DEPTH_FALLBACK_M 5.0       /* no crest or level_max known */
#define RHO_LIGHT 1000.0           /* [kg/m3] for the lowest pressure */
#define RHO_HEAVY 1400.0           /* [kg/m3] for the highest pressure */

/* Deepest plausible brine above the floor [m]. */
static double deepest_m(const hs_pond *p)
{
    if (p != NULL && isfinite(p->freeboard_m))
        return p->freeboard_m + ABOVE_CREST_M;
    if (p != NULL && isfinite(p->level_max_m))
        return p->level_max_m + 2.0 * ABOVE_CREST_M;
    return DEPTH_FALLBACK_M;
}

void hs_plausible_limits(hs_quantity q, const hs_pond *p, double *lo, double *hi)
{
    double sensor_m = p != NULL && isfinite(p->pressure_height_m) ? p->pressure_height_m : 0.0;
    switch (q) {
    case HS_Q_CONDUCTIVITY: *lo = 0.0; *hi = 300.0; return;     /* mS/cm */
    case HS_Q_TEMPERATURE: *lo = -10.0; *hi = 70.0; return;     /* degC */
    case HS_Q_DENSITY: *lo = 990.0; *hi = 1400.0; return;       /* kg/m3 */
    case HS_Q_LEVEL_PRESSURE:
    case HS_Q_PRESSURE_UPPER:
        /* p = rho g h [Pa]: h from below the floor to above the crest,
         * measured from the sensor's own height */
        *lo = -(BELOW_FLOOR_M + sensor_m) * RHO_HEAVY * STANDARD_GRAVITY;
        *hi = fmax(deepest_m(p) - sensor_m, 0.0) * RHO_HEAVY * STANDARD_GRAVITY;
        if (*lo > -BELOW_FLOOR_M * RHO_LIGHT * STANDARD_GRAVITY)
            *lo = -BELOW_FLOOR_M * RHO_LIGHT * STANDARD_GRAVITY;
        return;
    case HS_Q_LEVEL_DISTANCE:                                   /* m, looking down */
        *lo = 0.0;
        *hi = (p != NULL && isfinite(p->distance_height_m) ? p->distance_height_m : 30.0) +
              BELOW_FLOOR_M;
        return;
    case HS_Q_RAIN: *lo = 0.0; *hi = 100.0; return;             /* m, accumulated */
    case HS_Q_PUMP_RUN:
    case HS_Q_PUMP_MANUAL: *lo = 0.0; *hi = 1.0; return;        /* state */
    default: *lo = -INFINITY; *hi = INFINITY; return;
    }
}

int hs_plausible_narrow(hs_signal *g, const hs_pond *p)
{
    double lo_si, hi_si;
    hs_plausible_limits(g->quantity, p, &lo_si, &hi_si);
    if (!(g->si_factor != 0.0) || !isfinite(g->si_factor))
        return 0; /* the unit is already reported as wrong */
    /* SI = value * si_factor + si_offset, so value = (SI - si_offset) / si_factor */
    double a = (lo_si - g->si_offset) / g->si_factor;
    double b = (hi_si - g->si_offset) / g->si_factor;
    double lo = fmin(a, b), hi = fmax(a, b);
    if (lo > g->point.valid_min)
        g->point.valid_min = lo;
    if (hi < g->point.valid_max)
        g->point.valid_max = hi;
    return g->point.valid_min < g->point.valid_max ? 0 : -1;
}
