/* The operators' hydrometer readings in the runtime: per pond, the site
 * calibration fitted from the readings that carry the inline conductivity
 * and temperature of their time (hc_calibration: monotone fit), and the
 * latest reading itself, which stands in where conductivity says little
 * (hs_brine_eval.h). Readings are re-read from the store at start, after a
 * reload and every CALIB_EVERY_MS: `halostage calibrate` writes them from
 * another process, and a few hundred rows cost well under a millisecond.
 * Error convention: void; problems are logged. */
#include <math.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hs_log.h"
#include "hs_runtime_private.h"

/* The newest readings of one pond, in the order the store returns them
 * (oldest first); the ring keeps the last HC_CALIBRATION_MAX. */
struct collect {
    const hs_site *site;
    const hc_path *path;
    hc_calibration_point pts[HC_CALIBRATION_MAX];
    size_t n, head, total, skipped;
    double latest_sg, latest_t_ref_c;
    int64_t latest_t_ms;
};

/* SG at t_from/t_from of the path brine -> SG at t_to/t_to. rho(t) = SG
 * rho_w(t) (heavy-liquid SG; rho_w Laliberte & Cooper 2004 eq. 8, as
 * hc_path uses). Returns NaN when the path cannot place the brine. */
static double sg_at(const hc_path *path, double sg, double t_from_c, double t_to_c,
                    double modulus)
{
    if (fabs(t_from_c - t_to_c) < 1e-9)
        return sg;
    double cf;
    unsigned warn = 0;
    hc_brine_state s;
    if (path == NULL ||
        hc_path_cf_at_density(path, sg * hc_water_density_lc(t_from_c), t_from_c, &cf,
                              &warn) != HC_OK ||
        hc_path_state_from_cf(path, cf, t_to_c, t_to_c, modulus, &s) != HC_OK)
        return NAN;
    return s.specific_gravity;
}

static void collect_row(void *ctx, const hs_calibration_row *r)
{
    struct collect *c = ctx;
    if (!isfinite(r->specific_gravity) || !isfinite(r->reference_temperature_c))
        return;
    if (r->t_ms >= c->latest_t_ms) {
        c->latest_t_ms = r->t_ms;
        c->latest_sg = r->specific_gravity;
        c->latest_t_ref_c = r->reference_temperature_c;
    }
    if (!isfinite(r->conductivity_ms_cm) || !isfinite(r->temperature_c))
        return; /* a manual reading only: nothing to fit */
    double t_ref = c->site->site.reference_temperature_c;
    double sg = sg_at(c->path, r->specific_gravity, r->reference_temperature_c, t_ref,
                      c->site->site.baume_modulus);
    if (!isfinite(sg)) {
        c->skipped++;
        return;
    }
    c->pts[c->head] = (hc_calibration_point){r->conductivity_ms_cm, r->temperature_c, sg};
    c->head = (c->head + 1) % HC_CALIBRATION_MAX;
    if (c->n < HC_CALIBRATION_MAX)
        c->n++;
    c->total++;
}

static void refresh_pond(hs_runtime *rt, size_t i)
{
    const hs_pond *pd = &rt->site.ponds[i];
    struct hs_rt_pond *p = &rt->ponds[i];
    struct collect c;
    memset(&c, 0, sizeof c);
    c.site = &rt->site;
    c.path = hs_brine_models_path(rt->models, pd->feed_index);
    c.latest_sg = NAN;
    c.latest_t_ref_c = NAN;
    c.latest_t_ms = INT64_MIN;
    if (hs_store_calibrations(rt->store, pd->name, collect_row, &c) != 0) {
        hs_log(HSP_LOG_WARNING, "pond %s: hydrometer readings: %s", pd->name,
               hs_store_error(rt->store));
        return; /* keep what we had */
    }
    if (c.latest_t_ms != p->aids.manual_t_ms)
        p->dirty = 1; /* a new manual reading is a new input */
    p->aids.manual_sg = c.latest_sg;
    p->aids.manual_t_ref_c = c.latest_t_ref_c;
    p->aids.manual_t_ms = c.latest_t_ms;
    p->aids.manual_max_age_ms = pd->manual_reading_max_age_ms;
    if (c.total == p->calib_rows && c.skipped == p->calib_skipped)
        return; /* nothing new: keep the fit */
    p->calib_rows = c.total;
    p->calib_skipped = c.skipped;
    p->dirty = 1; /* a new fit changes the state: evaluate and publish it */
    if (c.skipped > 0)
        hs_log(HSP_LOG_WARNING, "pond %s: %zu hydrometer readings could not be referred to "
               "%g degC and are left out of the calibration", pd->name, c.skipped,
               rt->site.site.reference_temperature_c);
    hc_calibration fit;
    hc_status st = c.n >= 2 ? hc_calibration_fit(c.pts, c.n, rt->site.site.reference_temperature_c,
                                                 &fit)
                            : HC_ERR_ARGUMENT;
    if (st != HC_OK) {
        if (p->calib_ok || c.n > 0)
            hs_log(HSP_LOG_NOTICE, "pond %s: no site calibration (%zu readings with "
                   "conductivity: %s)", pd->name, c.n,
                   c.n < 2 ? "two or more are needed" : hc_status_text(st));
        p->calib_ok = 0;
        return;
    }
    p->calibration = fit;
    p->calib_ok = 1;
    hs_log(HSP_LOG_NOTICE, "pond %s: site calibration from %zu hydrometer readings, %zu knots, "
           "%.4g to %.4g mS/cm at 25 degC, rms residual %.4f SG", pd->name, c.n, fit.knots,
           fit.cond25[0], fit.cond25[fit.knots - 1], fit.rms_residual);
}

void hs_rt_calib_refresh(hs_runtime *rt, int64_t mono_ms)
{
    if (rt->store == NULL || mono_ms < rt->next_calib_ms)
        return;
    for (size_t i = 0; i < rt->site.n_ponds; i++)
        refresh_pond(rt, i);
    rt->next_calib_ms = mono_ms + HS_RT_CALIB_EVERY_MS;
}
