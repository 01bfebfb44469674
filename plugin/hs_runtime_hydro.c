/* Hydrology in the running daemon: each pond's geometry (area and dike
 * slope, or its stage-storage table), a tracker fed with every new state
 * (hs_hydro.h), and the report the status, MQTT state and transfers use:
 * volume, salt inventories, net evaporation, days to target and to the
 * next stage. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_log.h"
#include "hs_runtime_private.h"
#include "hc_balance.h"
#include "hs_conf_transfer.h"
#include "hs_hydro_store.h"
#include "hs_pond_shape.h"
#include "hs_stage_table.h"

static int shape_of(const hs_pond *p, struct hs_rt_pond *rp, hc_pond_shape *shape)
{
    char err[600];
    int rc = hs_pond_shape_of(p, &rp->table, &rp->table_loaded, shape, err, sizeof err);
    if (rc < 0)
        hs_log(HSP_LOG_ERR, "[pond %s]: %s", p->name, err);
    return rc == 0 ? 0 : -1;
}

int hs_rt_hydro_init(hs_runtime *rt)
{
    for (size_t i = 0; i < rt->site.n_ponds; i++) {
        const hs_pond *p = &rt->site.ponds[i];
        struct hs_rt_pond *rp = &rt->ponds[i];
        struct hs_hydro_config cfg;
        hs_hydro_config_default(&cfg);
        cfg.crystalliser = p->role == HS_ROLE_CRYSTALLISER;
        memset(&rp->report, 0, sizeof rp->report);
        rp->report.depth_m = rp->report.volume_m3 = NAN;
        rp->report.days_to_target_low = rp->report.days_to_target_high = NAN;
        rp->report.days_to_next_stage_low = rp->report.days_to_next_stage_high = NAN;
        rp->report.dissolved_salt_t = rp->report.deposited_salt_t = NAN;
        rp->report.net_evaporation_mm_day = NAN;
        /* the rest of the report's numbers are unknown too, not zero */
        rp->report.area_m2 = rp->report.expected_evaporation_mm_day = NAN;
        rp->report.net_evaporation_low_mm_day = rp->report.net_evaporation_high_mm_day = NAN;
        rp->report.days_to_target_expected = rp->report.days_to_next_stage_expected = NAN;
        rp->report.balance_density_kg_m3 = NAN;
        rp->rain_last_m = NAN;
        if (shape_of(p, rp, &cfg.shape) != 0)
            continue;
        rp->hydro_ok = hs_hydro_init(&rp->hydro, &cfg) == 0;
        if (!rp->hydro_ok)
            hs_log(HSP_LOG_WARNING, "[pond %s]: hydrology off (geometry refused)", p->name);
        /* After a restart, carry on from the recorded daily rates and the
         * salt deposited so far rather than from nothing. */
        struct hs_hydro_history h;
        if (rp->hydro_ok && rt->store != NULL &&
            hs_hydro_history_read(rt->store, p->name, hs_rt_wall_ms(), cfg.window_days, &h) == 0 &&
            (h.n > 0 || isfinite(h.deposited_salt_t)))
            hs_hydro_seed(&rp->hydro, h.rate, h.n,
                          isfinite(h.deposited_salt_t) ? 1000 * h.deposited_salt_t : 0);
    }
    return 0;
}

void hs_rt_hydro_free(hs_runtime *rt)
{
    for (size_t i = 0; rt->ponds != NULL && i < rt->site.n_ponds; i++)
        if (rt->ponds[i].table_loaded) {
            hs_stage_table_free(&rt->ponds[i].table);
            rt->ponds[i].table_loaded = 0;
        }
}

const hc_pond_shape *hs_rt_pond_shape(const hs_runtime *rt, size_t pond)
{
    return rt->ponds[pond].hydro_ok ? &rt->ponds[pond].hydro.cfg.shape : NULL;
}

/* Days until 1/CF reaches 1/cf_goal at the recent trend. Under steady net
 * evaporation over a steady area the water mass falls linearly in time, so
 * 1/CF = W/W0 is linear in time (CF by its definition: initial over remaining water mass);
 * the slope comes from a least-squares line through the recent points, and
 * low/high from the slope -/+ one standard error. */
static void trend_days(const struct hs_rt_pond *rp, double cf_now, double cf_goal, double *lo,
                       double *hi)
{
    *lo = *hi = NAN;
    unsigned n = rp->trend_n;
    if (n < 6 || !isfinite(cf_goal) || !(cf_goal > cf_now))
        return;
    double st = 0, sy = 0;
    for (unsigned i = 0; i < n; i++) {
        st += rp->trend_t[i];
        sy += rp->trend_inv_cf[i];
    }
    double mt = st / n, my = sy / n, sxx = 0, sxy = 0;
    for (unsigned i = 0; i < n; i++) {
        sxx += (rp->trend_t[i] - mt) * (rp->trend_t[i] - mt);
        sxy += (rp->trend_t[i] - mt) * (rp->trend_inv_cf[i] - my);
    }
    if (!(sxx > 0))
        return;
    double slope = sxy / sxx, sse = 0;
    for (unsigned i = 0; i < n; i++) {
        double r = rp->trend_inv_cf[i] - (my + slope * (rp->trend_t[i] - mt));
        sse += r * r;
    }
    double se = sqrt(sse / (n - 2) / sxx);
    double gap = 1.0 / cf_now - 1.0 / cf_goal; /* > 0 */
    if (!(slope < 0))
        return; /* not concentrating now: no finite time */
    double fast = -(slope - se), slow = -(slope + se);
    *lo = gap / fast / 86400.0;
    *hi = slow > 0 ? gap / slow / 86400.0 : NAN;
}

static void trend_add(struct hs_rt_pond *rp, double t_s, double cf)
{
    if (!(cf > 0))
        return;
    unsigned last = (rp->trend_head + HS_RT_TREND_SLOTS - 1) % HS_RT_TREND_SLOTS;
    if (rp->trend_n > 0 && t_s - rp->trend_t[last] < HS_RT_TREND_EVERY_S)
        return;
    rp->trend_t[rp->trend_head] = t_s;
    rp->trend_inv_cf[rp->trend_head] = 1.0 / cf;
    rp->trend_head = (rp->trend_head + 1) % HS_RT_TREND_SLOTS;
    if (rp->trend_n < HS_RT_TREND_SLOTS)
        rp->trend_n++;
}

/* A reading that is good now, or NULL. */
static const hs_reading *good_reading(const hs_runtime *rt, int signal)
{
    if (signal < 0 || (size_t)signal >= rt->site.n_signals)
        return NULL;
    const hs_reading *r = &rt->readings[signal];
    return r->have && r->quality == HS_QUALITY_GOOD && isfinite(r->value) ? r : NULL;
}

/* Rain on the pond since the last look, from its accumulating gauge, into
 * the day's balance. A falling total is a counter reset: start again. */
static void feed_rain(hs_runtime *rt, size_t pond)
{
    struct hs_rt_pond *rp = &rt->ponds[pond];
    const hs_signal *sg = hs_site_signal(&rt->site, (int)pond, HS_Q_RAIN);
    const hs_reading *r = sg != NULL ? good_reading(rt, (int)(sg - rt->site.signals)) : NULL;
    if (r == NULL)
        return;
    double d = r->value - rp->rain_last_m; /* [m] */
    if (isfinite(d) && d > 0 && d < 0.5)
        hs_hydro_rain(&rp->hydro, d * 1000.0);
    rp->rain_last_m = r->value;
}

/* Brine pumped out of `pond` since the last look, by each transfer whose
 * source it is: rated flow x the time its pump ran. Running is known from
 * the run-feedback signal, or from the command where the site actuates;
 * an advisory transfer without feedback cannot be counted (the balance
 * then sees pumping as evaporation or rain: give pumps feedback). */
static void feed_transfers(hs_runtime *rt, size_t pond, int64_t now_ms)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        const hs_transfer_conf *t = &rt->site.transfers[i];
        struct hs_rt_transfer *x = &rt->transfers[i];
        if (t->source_index != (int)pond)
            continue;
        int64_t since = x->flow_ms;
        x->flow_ms = now_ms;
        if (since <= 0 || now_ms <= since || !isfinite(t->rated_flow_m3_h))
            continue;
        int running;
        const hs_reading *fb = good_reading(rt, t->feedback_index);
        if (fb != NULL)
            running = fb->value > 0.5;
        else if (t->actuate)
            running = x->state.running;
        else
            continue;
        if (!running)
            continue;
        double v_m3;
        if (hc_pumped_volume((double)(now_ms - since) / 1000.0, t->rated_flow_m3_h, &v_m3) != HC_OK)
            continue;
        struct hs_rt_pond *src = &rt->ponds[pond];
        const hc_brine_state *s = &src->view.state;
        double rho = src->view.have_state ? s->density_kg_m3 : NAN;
        double sal = src->view.have_state ? s->salinity_g_kg : NAN;
        if (src->hydro_ok)
            hs_hydro_transfer(&src->hydro, 0, v_m3, rho, sal);
        if (t->dest_index >= 0 && rt->ponds[t->dest_index].hydro_ok)
            hs_hydro_transfer(&rt->ponds[t->dest_index].hydro, 1, v_m3, rho, sal);
    }
}

void hs_rt_hydro_update(hs_runtime *rt, size_t pond, int64_t now_ms)
{
    struct hs_rt_pond *rp = &rt->ponds[pond];
    const hs_pond *p = &rt->site.ponds[pond];
    feed_transfers(rt, pond, now_ms);
    if (!rp->hydro_ok)
        return;
    feed_rain(rt, pond);
    const hc_brine_curve *curve = hs_brine_models_curve(rt->models, p->feed_index);
    const hc_brine_state *s = &rp->view.state;
    if (isfinite(rp->view.depth_m)) {
        struct hs_hydro_sample smp = {
            .t_s = (double)now_ms / 1000.0, .level_m = rp->view.depth_m,
            .density_kg_m3 = rp->view.have_state ? s->density_kg_m3 : NAN,
            .salinity_g_kg = rp->view.have_state ? s->salinity_g_kg : NAN,
            .cf = rp->view.have_state ? s->concentration_factor : NAN,
            .water_activity = rp->view.have_state ? s->water_activity : NAN,
        };
        hs_hydro_sample(&rp->hydro, &smp, curve);
    }
    /* the pond's target is its density_out; the next stage from the path */
    double cf_target = NAN, cf_next = NAN;
    /* density_out is stated at the site's reference temperature, so it is
     * read off the path there (the curve's densities are at the path's own
     * temperature) */
    const hc_path *path = hs_brine_models_path(rt->models, p->feed_index);
    double t_ref = rt->site.site.reference_temperature_c;
    unsigned w = 0;
    if (curve != NULL && isfinite(p->density_out_kg_m3)) {
        if (path == NULL || !isfinite(t_ref) ||
            hc_path_cf_at_density(path, p->density_out_kg_m3, t_ref, &cf_target, &w) != HC_OK ||
            (w & (HC_WARN_BELOW_FEED | HC_WARN_BEYOND_PATH)))
            cf_target = NAN;
        if (isnan(cf_target))
            hc_curve_cf_at_density(curve, p->density_out_kg_m3, &cf_target);
    }
    if (rp->view.have_state && s->next_stage != HC_STAGE_NONE) {
        /* the next stage begins where it does at the pond's temperature */
        const hc_onset_table *onsets = hs_brine_models_onsets(rt->models, p->feed_index);
        double at[HC_STAGE_COUNT];
        if (onsets != NULL && isfinite(s->temperature_c)) {
            hc_onset_table_at(onsets, s->temperature_c, at);
            cf_next = at[s->next_stage];
        } else {
            cf_next = hc_path_stage_cf(path, s->next_stage);
        }
    }
    hs_hydro_report(&rp->hydro, curve, cf_target, cf_next, NAN, NAN, &rp->report);
    /* Until the daily balance has a rate, the recent trend answers. */
    if (rp->view.have_state) {
        trend_add(rp, (double)now_ms / 1000.0, s->concentration_factor);
        if (isnan(rp->report.days_to_target_low) && isnan(rp->report.days_to_target_high))
            trend_days(rp, s->concentration_factor, cf_target, &rp->report.days_to_target_low,
                       &rp->report.days_to_target_high);
        if (isnan(rp->report.days_to_next_stage_low) && isnan(rp->report.days_to_next_stage_high))
            trend_days(rp, s->concentration_factor, cf_next, &rp->report.days_to_next_stage_low,
                       &rp->report.days_to_next_stage_high);
    }
}
