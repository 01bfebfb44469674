/* The chain schedule of a site from its store (see hs_chain_plan.h). */
#include "hs_chain_plan.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_balance.h"
#include "hc_ion.h"
#include "hs_alarm_site.h"
#include "hs_conf_alarm.h"
#include "hs_chain_json.h"
#include "hs_hydro.h"
#include "hs_hydro_brine.h"
#include "hs_hydro_store.h"
#include "hs_store_latest.h"

#define HISTORY_DAYS 60

void hs_chain_options_default(struct hs_chain_options *o, double t_ref_c)
{
    memset(o, 0, sizeof *o);
    o->days = 7;
    o->evaporation_mm_day = o->penman_mm_day = o->relative_humidity = NAN;
    o->default_flow_m3_h = HS_CHAIN_DEFAULT_FLOW_M3_H;
    o->harvest_depth_m = HS_CHAIN_DEFAULT_HARVEST_M;
    o->sea_fill = 1;
    o->t_ref_c = t_ref_c;
}

/* Fits the stored weather to the achieved rates of every pond. */
static void weather_fit(const struct hs_weather_day *w, int n_days,
                        const struct hs_hydro_history *h, const double *f, size_t n_ponds,
                        struct hs_weather_fit *fit)
{
    struct hs_weather_pond wp[64];
    size_t m = 0;
    for (size_t i = 0; i < n_ponds && m < 64; i++)
        if (h[i].n > 0 && isfinite(f[i]))
            wp[m++] = (struct hs_weather_pond){h[i].day, h[i].rate, h[i].n, f[i]};
    struct hs_hydro_config def;
    hs_hydro_config_default(&def);
    hs_weather_fit(w, n_days, wp, m, def.window_days, fit);
}

/* Level, reference density, fresh-water rate and deposit of every pond. */
static int states(const hs_site *site, hs_store *st, int64_t now, const struct hs_chain_options *o,
                  const hc_path *path, struct hs_chain_plan *p, char *err, size_t errlen)
{
    struct hs_chain_site *cs = &p->cs;
    struct hs_chain_evaporation *ev = &p->evaporation;
    const hc_chain_brine *brine = &p->tables.view;
    double rh = isfinite(o->relative_humidity) ? o->relative_humidity : 0;
    struct hs_hydro_history *hist = calloc(cs->n_ponds ? cs->n_ponds : 1, sizeof *hist);
    double *f = calloc(cs->n_ponds ? cs->n_ponds : 1, sizeof *f);
    struct hs_weather_day *w = calloc(HS_WEATHER_MAX_DAYS, sizeof *w);
    int rc = -1;
    if (hist == NULL || f == NULL || w == NULL) {
        snprintf(err, errlen, "out of memory");
        goto out;
    }
    for (size_t i = 0; i < cs->n_ponds; i++) {
        struct hs_chain_pond_in *pi = &cs->ponds[i];
        struct hs_hydro_history *h = &hist[i];
        if (st == NULL || hs_hydro_history_read(st, pi->name, now, HISTORY_DAYS, h) != 0 ||
            !h->have_state || !isfinite(h->depth_m) || !isfinite(h->density_kg_m3) ||
            !isfinite(h->temperature_c)) {
            snprintf(err, errlen, "pond %s: no state in the store %s (the daemon records one as "
                     "it runs)", pi->name, site->site.database);
            goto out;
        }
        double mol[HC_ION_COUNT], cf, rho_ref;
        unsigned warn = 0;
        if (hs_brine_at_density(path, h->density_kg_m3, h->temperature_c, mol, &cf, &warn) != HC_OK ||
            hs_brine_density_cb(mol, HC_ION_COUNT, o->t_ref_c, NULL, &rho_ref) != HC_OK) {
            snprintf(err, errlen, "pond %s: density %g kg/m3 at %g degC is not on the feed's "
                     "evaporation path", pi->name, h->density_kg_m3, h->temperature_c);
            goto out;
        }
        pi->level_m = h->depth_m;
        pi->density_ref_kg_m3 = rho_ref;
        pi->harvest_depth_m = pi->role == HS_ROLE_CRYSTALLISER ? o->harvest_depth_m : NAN;
        pi->deposit_start_kg = isfinite(h->deposited_salt_t) ? 1000 * h->deposited_salt_t : 0;
        hs_state_row row; /* the stage every other outlet shows now */
        if (hs_store_latest_state(st, pi->name, &row) == 0 && row.state.stage != HC_STAGE_NONE) {
            pi->stage_now_known = 1;
            pi->stage_now = row.state.stage;
        }
        hc_chain_point pt;
        f[i] = NAN;
        if (hc_chain_point_at(brine, cf, &pt) == HC_OK &&
            hc_evaporation_activity_factor(pt.water_activity, rh, &f[i]) == HC_OK && !(f[i] > 0))
            f[i] = NAN;
    }
    /* The stored weather, and how well it explains what the ponds achieved. */
    ev->weather_days = hs_weather_read(st, site, now, HS_WEATHER_MAX_DAYS, w, err, errlen);
    if (ev->weather_days < 0)
        goto out;
    if (ev->weather_days > 0)
        weather_fit(w, ev->weather_days, hist, f, cs->n_ponds, &ev->fit);
    double fresh = NAN;
    if (isfinite(o->evaporation_mm_day)) {
        ev->source = "given";
        fresh = o->evaporation_mm_day;
    } else if (isfinite(o->penman_mm_day)) {
        ev->source = "penman";
        ev->penman_mm_day = fresh = o->penman_mm_day;
    } else if (ev->weather_days > 0) {
        /* The latest complete day's weather, taken to persist. */
        ev->source = "weather";
        ev->penman_mm_day = fresh = w[ev->weather_days - 1].penman_mm_day;
    } else {
        ev->source = "achieved";
    }
    if (isfinite(ev->penman_mm_day) && ev->fit.pairs >= HS_CHAIN_MIN_FIT_PAIRS &&
        ev->fit.factor > 0) {
        fresh *= ev->fit.factor;
        ev->calibrated = 1;
    }
    for (size_t i = 0; i < cs->n_ponds; i++) {
        struct hs_chain_pond_in *pi = &cs->ponds[i];
        const struct hs_hydro_history *h = &hist[i];
        if (isfinite(fresh)) {
            pi->evap_fresh_mm_day = fresh;
            continue;
        }
        double sum = 0;
        for (int k = 0; k < h->n; k++)
            sum += h->rate[k];
        if (h->n == 0 || !isfinite(f[i])) {
            snprintf(err, errlen, "pond %s: no achieved evaporation in the store; give the "
                     "evaporation or the weather", pi->name);
            goto out;
        }
        /* The achieved net rate is the brine's: back to fresh water. */
        pi->evap_fresh_mm_day = sum / h->n / f[i];
    }
    rc = 0;
out:
    free(hist);
    free(f);
    free(w);
    return rc;
}

int hs_chain_plan_make(const hs_site *site, const hs_brine_models *models, hs_store *st,
                       int64_t now_ms, const struct hs_chain_options *o,
                       struct hs_chain_plan *p, char *err, size_t errlen)
{
    memset(p, 0, sizeof *p);
    p->evaporation.source = "";
    p->evaporation.penman_mm_day = NAN;
    p->evaporation.fit.factor = p->evaporation.fit.rms_mm_day = p->evaporation.fit.r2 = NAN;
    if (o->days < 1 || o->days > HS_CHAIN_MAX_DAYS) {
        snprintf(err, errlen, "days must be 1..%d", HS_CHAIN_MAX_DAYS);
        return -1;
    }
    if (models == NULL) {
        if (hs_brine_models_build(site, &p->own_models) != 0) {
            snprintf(err, errlen, "the brine models of the site's feeds failed");
            return -1;
        }
        models = p->own_models;
    }
    int feed = site->site.feed_index;
    const hc_path *path = hs_brine_models_path(models, feed);
    if (path == NULL) {
        snprintf(err, errlen, "the site feed's evaporation path failed");
        hs_chain_plan_free(p);
        return -1;
    }
    if (hs_chain_tables_from_path(path, o->t_ref_c, &p->tables, err, errlen) != 0 ||
        hs_chain_site_build(site, o->default_flow_m3_h, &p->cs, err, errlen) != 0 ||
        states(site, st, now_ms, o, path, p, err, errlen) != 0) {
        hs_chain_plan_free(p);
        return -1;
    }
    for (int d = 0; d < o->days; d++)
        p->rain[d] = o->rain_mm != NULL ? o->rain_mm[d] : 0;
    double modulus = isfinite(site->site.baume_modulus) ? site->site.baume_modulus : 145.0;
    /* The daemon's rules: configured ones first, so they win over built-ins. */
    p->alarms = hs_alarm_new(1);
    if (p->alarms == NULL) {
        snprintf(err, errlen, "out of memory");
        hs_chain_plan_free(p);
        return -1;
    }
    hs_conf_alarms_apply(site, p->alarms);
    hs_alarm_site_rules(site, p->alarms);
    p->in = (struct hs_chain_input){&p->tables.view, p->cs.n_ponds, p->cs.ponds, p->cs.n_links,
                                    p->cs.links, o->days, p->rain, o->relative_humidity,
                                    o->sea_fill, o->t_ref_c, modulus, HS_CHAIN_HALITE_DENSITY,
                                    p->alarms, models, feed};
    if (hs_chain_run(&p->in, &p->result, err, errlen) != 0) {
        hs_chain_plan_free(p);
        return -1;
    }
    return 0;
}

void hs_chain_plan_free(struct hs_chain_plan *p)
{
    hs_chain_result_free(&p->result);
    hs_alarm_free(p->alarms);
    p->alarms = NULL;
    hs_chain_site_free(&p->cs);
    hs_chain_tables_free(&p->tables);
    hs_brine_models_free(p->own_models);
    p->own_models = NULL;
}

json_t *hs_chain_plan_json(const struct hs_chain_plan *p, const char *site_name, int64_t now_ms)
{
    const struct hs_chain_evaporation *ev = &p->evaporation;
    json_t *o = hs_chain_to_json(&p->in, &p->result);
    if (o == NULL)
        return NULL;
    int rc = json_object_set_new(o, "site", json_string(site_name));
    rc |= json_object_set_new(o, "time_ms", json_integer(now_ms));
    rc |= json_object_set_new(o, "evaporation_source", json_string(ev->source));
    rc |= json_object_set_new(o, "penman_mm_day", isfinite(ev->penman_mm_day)
                                                      ? json_real(ev->penman_mm_day)
                                                      : json_null());
    rc |= json_object_set_new(o, "weather_days", json_integer(ev->weather_days));
    json_t *fit = json_null();
    if (ev->fit.pairs > 0)
        fit = json_pack("{s:f, s:f, s:o, s:i, s:b}", "factor", ev->fit.factor, "rms_mm_day",
                        ev->fit.rms_mm_day, "r2",
                        isfinite(ev->fit.r2) ? json_real(ev->fit.r2) : json_null(), "pairs",
                        ev->fit.pairs, "applied", ev->calibrated);
    rc |= json_object_set_new(o, "evaporation_fit", fit);
    if (rc != 0) {
        json_decref(o);
        return NULL;
    }
    return o;
}
