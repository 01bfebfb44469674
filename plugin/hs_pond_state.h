/* One pond's brine state and depth from its latest signal values: the
 * mapping from field signals to calc (DESIGN.md "Where the brine state comes
 * from"). Density from a densitometer first, then from the two pressure
 * sensors (rho = dP / (g dz)), else conductivity with temperature. Inside
 * the seawater range (S_P <= 42) EOS-80 / PSS-78; beyond it the pond feed's
 * evaporation path (hc_path: density lookup, or calc's brine conductivity
 * model, flagged as such). Depth from the level pressure with the pond's own
 * brine density, or from the distance sensor.
 * Pure apart from reading the site: no I/O, no allocation. */
#ifndef HS_POND_STATE_H
#define HS_POND_STATE_H

#include <stdbool.h>

#include "hc_path.h"
#include "hc_state.h"
#include "hc_status.h"
#include "hp_point.h"
#include "hs_site.h"

/* The latest value of each quantity of one pond, in SI units
 * (conductivity mS/cm, temperature degC, pressure Pa, lengths m, density
 * kg/m3). A value counts only with quality good. */
typedef struct {
    bool present[HS_QUANTITY_COUNT];     /* the pond has such a signal */
    hp_quality quality[HS_QUANTITY_COUNT];
    double value[HS_QUANTITY_COUNT];
} hs_pond_inputs;

typedef struct {
    hc_brine_state state;
    double depth_m;        /* NaN when unknown */
    const char *problem;   /* NULL, or why the state is incomplete (static text) */
    const char *level_problem; /* NULL, or why the depth is unknown */
} hs_pond_result;

void hs_pond_inputs_clear(hs_pond_inputs *in);
/* Engineering value of signal g -> SI. */
double hs_signal_si(const hs_signal *g, double value);
/* Records one decoded sample of signal g into in. */
void hs_pond_inputs_put(hs_pond_inputs *in, const hs_signal *g, hp_quality quality,
                        double value);
/* Fills out for pond index pond of site. path: the evaporation path of the
 * pond's feed (hs_feed_model.h), or NULL to stay within the seawater range. */
void hs_pond_compute(const hs_site *site, size_t pond, const hs_pond_inputs *in,
                     const hc_path *path, hs_pond_result *out);

#endif
