/* From a pond's latest signals to its brine state and depth, with the best
 * density source the pond has (plugin/README.md "Where a pond's density
 * comes from"):
 *   1. a density signal: inline densitometer, or the hydrostatic pair
 *      rho = dP / (g dz);
 *   2. conductivity and temperature: PSS-78 inside its range, beyond it the
 *      site calibration fitted from operators' hydrometer readings, else the
 *      evaporation path's brine conductivity model (flagged);
 *   3. where conductivity is weak (near and past halite saturation) or gives
 *      nothing, and no density signal exists: a recent manual hydrometer
 *      reading (method manual).
 * The evaporation path of the pond's feed then gives the stage, the next
 * stage, saturation indices and water activity. Depth comes from the
 * level-pressure sensor through the pond's own brine density, or from a
 * level-distance sensor.
 *
 * Memory: hs_brine_models owns the paths and curves it builds; a site's
 * models live as long as the runtime keeps that site.
 * Error convention: 0 on success, -1 after logging the reason. */
#ifndef HS_BRINE_EVAL_H
#define HS_BRINE_EVAL_H

#include <stdint.h>

#include "hc_brine_curve.h"
#include "hc_calibration.h"
#include "hc_onset_table.h"
#include "hc_path.h"
#include "hc_state.h"
#include "hs_flatline.h"
#include "hs_site.h"
#include "hs_store.h"

/* The latest value of one signal, in SI units. */
typedef struct {
    double value;
    int64_t t_ms;       /* wall clock of the sample [ms since the epoch] */
    hs_quality quality; /* as delivered, made STALE by age */
    int have;           /* at least one sample has arrived */
    hs_flatline flat;   /* stuck-sensor watch (hs_flatline.h); flat.stuck: the
                         * value repeats itself and quality is BAD */
} hs_reading;

typedef struct hs_brine_models hs_brine_models;

/* Builds one evaporation path (fractional, 25 degC) per feed the ponds use,
 * for the brine's composition, density and CF, and the stage onsets of the
 * same feed's paths every 5 degC from 0 to 45 degC (hc_onset_table.h), so
 * that stages follow each pond's temperature. About 11 path builds per
 * feed: 0.15 to 0.35 s per feed at start (13 to 31 ms a path, make bench). */
int hs_brine_models_build(const hs_site *site, hs_brine_models **out);
void hs_brine_models_free(hs_brine_models *models);
/* The path and hydrology curve of feed_index (-1: built-in seawater). */
const hc_path *hs_brine_models_path(const hs_brine_models *models, int feed_index);
const hc_brine_curve *hs_brine_models_curve(const hs_brine_models *models, int feed_index);
/* The stage onsets over temperature of feed_index; NULL when they could not
 * be built (then stages come from the 25 degC path). */
const hc_onset_table *hs_brine_models_onsets(const hs_brine_models *models, int feed_index);

typedef struct {
    hc_brine_state state;
    int have_state;
    hs_quality quality;     /* worst input behind the state; BAD without one */
    double depth_m;         /* NaN when unknown */
    hs_quality depth_quality;
    int64_t t_ms;           /* newest input behind the state */
    double oldest_input_age_s; /* age of the oldest input the state needs */
    char note[128];         /* why there is no state, for the log and status */
} hs_pond_view;

/* What the operators add to a pond's signals: the site calibration fitted
 * from their hydrometer readings and their latest reading. The caller owns
 * both; hs_pond_evaluate only reads them. */
typedef struct {
    const hc_calibration *calibration; /* NULL: none fitted */
    double manual_sg;            /* latest hydrometer SG [1]; NaN: none */
    double manual_t_ref_c;       /* its reference temperature [degC] */
    int64_t manual_t_ms;         /* when it was taken [ms since the epoch] */
    int64_t manual_max_age_ms;   /* older readings are not used; 0: never used */
} hs_pond_aids;

void hs_pond_aids_clear(hs_pond_aids *aids);

/* The stage of the pond's feed brine whose density at t_ref_c is
 * rho_ref_kg_m3, judged by density against the onset brines at t_ref_c
 * (hc_onset_table_stage_ref; the 25 degC path when no onset table was
 * built); HC_STAGE_NONE when not known. What the stage trigger compares. */
hc_stage hs_stage_at_density_ref(const hs_brine_models *models, int feed_index,
                                 double rho_ref_kg_m3, double t_ref_c);

/* One pond's view. readings are indexed like site->signals. models may be
 * NULL: then only the seawater range (EOS-80, PSS-78) is known. aids may be
 * NULL (no calibration, no manual reading). now_ms is the wall clock;
 * g_m_s2 the local gravity. */
void hs_pond_evaluate(const hs_site *site, size_t pond, const hs_reading *readings,
                      const hs_brine_models *models, const hs_pond_aids *aids, double g_m_s2,
                      int64_t now_ms, hs_pond_view *out);

#endif
