/* The read side of /api/v1: ponds (the chain in flow order, cached until
 * the daemon reports new states), a pond's history from the rollups, its
 * point on the feed's evaporation path, alarms (active and journal),
 * transfers with their advice, hydrometer readings. Every number comes from
 * the store or from calc here; the page only draws them. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_baume.h"
#include "hc_path.h"
#include "hp_state_json.h"
#include "hs_alarm.h"
#include "hs_conf_transfer.h"
#include "hs_config.h"
#include "hs_pond_doc.h"
#include "hs_store_latest.h"
#include "hs_web_private.h"

#define PONDS_MAX_AGE_MS 1000   /* the cached document is rebuilt at least this often */
#define HISTORY_POINTS_MAX 3000 /* since / step */
#define JOURNAL_ROWS_MAX 500
#define PATH_POINTS 160         /* evaporation path points sent to the page */

static json_t *num(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

/* ---- the chain ---- */

/* Ponds in flow order: a pond comes after every pond whose `next` it is;
 * among those ready, file order decides (so parallel crystallisers stay
 * together before the bittern pond they both drain to). A loop in the
 * config (which --check reports) leaves its ponds in file order at the end. */
static size_t flow_order(const hs_site *site, size_t *order)
{
    size_t n = 0, np = site->n_ponds;
    char *placed = calloc(np ? np : 1, 1);
    if (placed == NULL) {
        for (size_t i = 0; i < np; i++)
            order[i] = i;
        return np;
    }
    while (n < np) {
        size_t pick = np;
        for (size_t i = 0; i < np && pick == np; i++) {
            if (placed[i])
                continue;
            int ready = 1;
            for (size_t j = 0; j < np; j++)
                if (!placed[j] && j != i && site->ponds[j].next_index == (int)i)
                    ready = 0;
            if (ready)
                pick = i;
        }
        if (pick == np)
            break;
        placed[pick] = 1;
        order[n++] = pick;
    }
    for (size_t i = 0; i < np; i++)
        if (!placed[i])
            order[n++] = i;
    free(placed);
    return n;
}

static json_t *journal_json(const hs_journal_row *r)
{
    return json_pack("{s:I, s:I, s:s, s:s, s:s, s:s, s:s, s:o, s:o, s:i, s:o, s:o, s:I}",
                     "event_id", (json_int_t)r->event_id, "time_ms", (json_int_t)r->t_ms, "pond",
                     r->pond, "rule", r->rule, "from", r->from_state, "state", r->to_state,
                     "cause", r->cause ? r->cause : "", "value", num(r->value), "limit",
                     num(r->limit), "priority", r->priority, "actor",
                     r->actor ? json_string(r->actor) : json_null(), "note",
                     r->note ? json_string(r->note) : json_null(), "shelved_until_ms",
                     (json_int_t)r->shelved_until_ms);
}

static void collect_active(void *ctx, const hs_journal_row *row)
{
    if (strcmp(row->to_state, "normal") != 0)
        json_array_append_new(ctx, journal_json(row));
}

static json_t *band_json(const hs_site *site, double rho_kg_m3)
{
    double sg = NAN, be = NAN;
    if (isfinite(rho_kg_m3) &&
        hc_baume_sg(rho_kg_m3, site->site.reference_temperature_c, &sg) == HC_OK)
        hc_baume_from_sg(sg, site->site.baume_modulus, &be);
    return json_pack("{s:o, s:o, s:o}", "density_kg_m3", num(rho_kg_m3), "specific_gravity",
                     num(sg), "baume", num(be));
}

/* The pond-state document (hs_pond_doc.h), the same one MQTT and `status
 * --json` print, plus what the page needs around it: its age, the next
 * pond, its band and level limits, and its alarms not back to normal. */
static json_t *pond_json(struct hs_web *w, const hs_pond *p, json_t *active, int64_t now)
{
    hs_state_row row;
    struct hs_pond_doc d;
    int have = hs_store_latest_state(w->store, p->name, &row) == 0;
    if (have) {
        hs_pond_doc_from_row(&d, &row, p->name, hs_role_name(p->role));
    } else {
        hs_pond_doc_init(&d);
        d.pond = p->name;
        d.role = hs_role_name(p->role);
        d.note = "no stored state";
    }
    json_t *o = hs_pond_doc_json(&d);
    if (o == NULL)
        return NULL;
    json_object_set_new(o, "time_ms", have ? json_integer(row.t_ms) : json_null());
    json_object_set_new(o, "age_s", have ? json_real((double)(now - row.t_ms) / 1000.0)
                                         : json_null());
    json_object_set_new(o, "next", p->next[0] ? json_string(p->next) : json_null());
    json_object_set_new(o, "band", json_pack("{s:o, s:o}", "in", band_json(&w->site,
                                             p->density_in_kg_m3), "out",
                                             band_json(&w->site, p->density_out_kg_m3)));
    json_object_set_new(o, "level_limits_m",
                        json_pack("{s:o, s:o, s:o}", "min", num(p->level_min_m), "max",
                                  num(p->level_max_m), "freeboard", num(p->freeboard_m)));
    json_t *mine = json_array(), *a;
    size_t i;
    json_array_foreach(active, i, a) {
        if (strcmp(json_string_value(json_object_get(a, "pond")), p->name) == 0)
            json_array_append(mine, a);
    }
    json_object_set_new(o, "alarms", mine);
    return o;
}

static json_t *transfers_json(struct hs_web *w)
{
    json_t *arr = json_array();
    for (size_t i = 0; i < w->site.n_transfers; i++) {
        const hs_transfer_conf *t = &w->site.transfers[i];
        hs_transfer_row tr;
        json_t *o = json_pack("{s:s, s:s, s:s, s:b}", "transfer", t->name, "source", t->source,
                              "destination", t->destination, "actuated", t->actuate);
        if (hs_store_latest_transfer(w->store, t->name, &tr) == 0) {
            json_t *reasons = json_loads(tr.reasons, 0, NULL);
            json_object_set_new(o, "advice", json_string(tr.advice));
            json_object_set_new(o, "reasons", reasons ? reasons : json_array());
            json_object_set_new(o, "time_ms", json_integer(tr.t_ms));
        } else {
            json_object_set_new(o, "advice", json_null());
            json_object_set_new(o, "reasons", json_array());
        }
        json_array_append_new(arr, o);
    }
    return arr;
}

static json_t *ponds_document(struct hs_web *w)
{
    int64_t now = hs_web_wall_ms();
    json_t *active = json_array();
    if (hs_store_journal_latest(w->store, collect_active, active) != 0) {
        json_decref(active);
        return NULL;
    }
    size_t *order = calloc(w->site.n_ponds ? w->site.n_ponds : 1, sizeof *order);
    if (order == NULL) {
        json_decref(active);
        return NULL;
    }
    size_t n = flow_order(&w->site, order);
    json_t *ponds = json_array();
    for (size_t i = 0; i < n; i++)
        json_array_append_new(ponds, pond_json(w, &w->site.ponds[order[i]], active, now));
    free(order);
    json_decref(active);
    return json_pack("{s:s, s:I, s:f, s:f, s:o, s:o}", "site", w->site.site.name, "time_ms",
                     (json_int_t)now, "reference_temperature_c",
                     w->site.site.reference_temperature_c, "baume_modulus",
                     w->site.site.baume_modulus, "ponds", ponds, "transfers", transfers_json(w));
}

enum MHD_Result hs_web_api_ponds(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    uint64_t seq = atomic_load(&w->seq);
    int64_t now = hs_web_mono_ms();
    if (w->ponds_text == NULL || w->ponds_seq != seq || now - w->ponds_ms > PONDS_MAX_AGE_MS) {
        json_t *doc = ponds_document(w);
        char *text = doc ? hs_doc_dumps(doc) : NULL;
        json_decref(doc);
        if (text == NULL)
            return hs_web_error(c, 503, NULL, "the store cannot be read now: %s",
                                hs_store_error(w->store));
        free(w->ponds_text);
        w->ponds_text = text;
        w->ponds_len = strlen(text);
        w->ponds_seq = seq;
        w->ponds_ms = now;
    }
    return hs_web_send(c, 200, "application/json", w->ponds_text, w->ponds_len, 1);
}

enum MHD_Result hs_web_api_transfers(struct hs_web_call *c)
{
    return hs_web_json(c, 200, json_pack("{s:o}", "transfers", transfers_json(c->web)));
}

/* ---- history ---- */

static const char *arg(struct hs_web_call *c, const char *name)
{
    return MHD_lookup_connection_value(c->conn, MHD_GET_ARGUMENT_KIND, name);
}

/* A duration argument ("7d", "1h") into *ms within [lo, hi]; else sends 400
 * naming the argument and returns -1. */
static int duration_arg(struct hs_web_call *c, const char *name, const char *def, int64_t lo,
                        int64_t hi, int64_t *ms, enum MHD_Result *res)
{
    const char *text = arg(c, name);
    char msg[160];
    if (text == NULL)
        text = def;
    if (hs_parse_duration_ms(text, ms, msg, sizeof msg) != 0) {
        *res = hs_web_error(c, 400, name, "%s: %s", name, msg);
        return -1;
    }
    if (*ms < lo || *ms > hi) {
        *res = hs_web_error(c, 400, name, "%s: %s is outside %llds to %llds", name, text,
                            (long long)(lo / 1000), (long long)(hi / 1000));
        return -1;
    }
    return 0;
}

static void add_point(void *ctx, const hs_point *p)
{
    json_array_append_new(ctx, json_pack("[I, o, o, o]", (json_int_t)p->t_ms, num(p->min),
                                         num(p->mean), num(p->max)));
}

static const char *const history_fields[] = {"specific_gravity", "baume", "density_kg_m3",
                                              "temperature_c", "depth_m", NULL};

enum MHD_Result hs_web_api_history(struct hs_web_call *c, const char *pond)
{
    struct hs_web *w = c->web;
    enum MHD_Result res;
    int pi = hs_site_pond(&w->site, pond);
    if (pi < 0)
        return hs_web_error(c, 404, "pond", "pond: no pond '%s' at this site", pond);
    int64_t since, step;
    if (duration_arg(c, "since", "7d", 60000, 400LL * 86400000, &since, &res) != 0 ||
        duration_arg(c, "step", "1h", 60000, 30LL * 86400000, &step, &res) != 0)
        return res;
    if (step % 60000 != 0)
        return hs_web_error(c, 400, "step", "step: whole minutes (1min, 5min, 1h)");
    if (since / step > HISTORY_POINTS_MAX)
        return hs_web_error(c, 400, "step", "step: %lld points is more than %d; take a longer "
                            "step", (long long)(since / step), HISTORY_POINTS_MAX);
    int64_t until = hs_web_wall_ms();
    json_t *series = json_object();
    for (size_t i = 0; history_fields[i]; i++) {
        char name[2 * HS_NAME_MAX + 32];
        snprintf(name, sizeof name, "%s:%s", pond, history_fields[i]);
        json_t *pts = json_array();
        if (hs_store_history(w->store, name, until - since, until, step, add_point, pts) < 0) {
            json_decref(pts);
            json_decref(series);
            return hs_web_error(c, 503, NULL, "history: %s", hs_store_error(w->store));
        }
        json_object_set_new(series, history_fields[i], pts);
    }
    const hs_pond *p = &w->site.ponds[pi];
    return hs_web_json(c, 200, json_pack("{s:s, s:I, s:I, s:I, s:[s,s,s,s], s:o, s:{s:o, s:o}, "
                                         "s:o}",
                                         "pond", pond, "since_ms", (json_int_t)(until - since),
                                         "until_ms", (json_int_t)until, "step_s",
                                         (json_int_t)(step / 1000), "columns", "time_ms", "min",
                                         "mean", "max", "series", series, "band", "in",
                                         band_json(&w->site, p->density_in_kg_m3), "out",
                                         band_json(&w->site, p->density_out_kg_m3),
                                         "level_limits_m",
                                         json_pack("{s:o, s:o, s:o}", "min",
                                                   num(p->level_min_m), "max",
                                                   num(p->level_max_m), "freeboard",
                                                   num(p->freeboard_m))));
}

/* ---- evaporation path ---- */

/* The feed's path at the reference temperature: SG and deg Be (both
 * t_ref/t_ref) against the concentration factor, and the mineral onsets. */
static json_t *path_json(struct hs_web *w, int feed_index)
{
    const hc_path *p = w->models ? hs_brine_models_path(w->models, feed_index) : NULL;
    if (p == NULL)
        return NULL;
    double t_ref = w->site.site.reference_temperature_c, m = w->site.site.baume_modulus;
    size_t n = hc_path_step_count(p);
    json_t *pts = json_array(), *ons = json_array();
    double last_cf = 0;
    for (size_t i = 0; i < n; i++) {
        const hc_path_point *pt = hc_path_step(p, i);
        hc_brine_state s;
        /* thin the steps: at most PATH_POINTS, evenly in log(CF) */
        if (i + 1 < n && last_cf > 0 &&
            log(pt->concentration_factor / last_cf) <
                log(hc_path_step(p, n - 1)->concentration_factor) / PATH_POINTS)
            continue;
        if (hc_path_state_from_cf(p, pt->concentration_factor, t_ref, t_ref, m, &s) != HC_OK)
            continue;
        last_cf = pt->concentration_factor;
        json_array_append_new(pts, json_pack("[f, o, o, o]", pt->concentration_factor,
                                             num(s.specific_gravity), num(s.baume),
                                             num(s.density_kg_m3)));
    }
    hc_path_onset on[HC_MINERAL_COUNT];
    size_t k = hc_path_onsets(p, on, HC_MINERAL_COUNT);
    for (size_t i = 0; i < k; i++) {
        hc_brine_state s;
        if (hc_path_state_from_cf(p, on[i].concentration_factor, t_ref, t_ref, m, &s) != HC_OK)
            continue;
        json_array_append_new(ons, json_pack("{s:s, s:f, s:o, s:o}", "mineral",
                                             hc_mineral_name(on[i].mineral),
                                             "concentration_factor", on[i].concentration_factor,
                                             "specific_gravity", num(s.specific_gravity),
                                             "baume", num(s.baume)));
    }
    return json_pack("{s:s, s:f, s:[s,s,s,s], s:o, s:o}", "feed", hc_path_feed(p)->name,
                     "reference_temperature_c", t_ref, "columns", "concentration_factor",
                     "specific_gravity", "baume", "density_kg_m3", "points", pts, "onsets",
                     ons);
}

enum MHD_Result hs_web_api_path(struct hs_web_call *c, const char *pond)
{
    struct hs_web *w = c->web;
    int pi = hs_site_pond(&w->site, pond);
    if (pi < 0)
        return hs_web_error(c, 404, "pond", "pond: no pond '%s' at this site", pond);
    const hs_pond *p = &w->site.ponds[pi];
    int feed = p->feed_index;
    size_t slot = (size_t)(feed + 1);
    if (slot > w->site.n_feeds)
        slot = 0;
    if (w->path_text[slot] == NULL) {
        json_t *o = path_json(w, feed);
        if (o == NULL)
            return hs_web_error(c, 503, NULL, "no evaporation path for the feed of pond %s",
                                pond);
        w->path_text[slot] = json_dumps(o, JSON_COMPACT | JSON_REAL_PRECISION(6));
        json_decref(o);
        if (w->path_text[slot] == NULL)
            return hs_web_error(c, 500, NULL, "out of memory");
    }
    json_t *o = json_loads(w->path_text[slot], 0, NULL);
    hs_state_row row;
    json_t *here = json_null();
    if (hs_store_latest_state(w->store, pond, &row) == 0)
        here = json_pack("{s:o, s:o, s:o, s:s?, s:I}", "concentration_factor",
                         num(row.state.concentration_factor), "specific_gravity",
                         num(row.state.specific_gravity), "baume", num(row.state.baume), "stage",
                         row.state.stage != HC_STAGE_NONE ? hc_stage_name(row.state.stage)
                                                          : NULL,
                         "time_ms", (json_int_t)row.t_ms);
    json_object_set_new(o, "pond", json_string(pond));
    json_object_set_new(o, "now", here);
    return hs_web_json(c, 200, o);
}

/* ---- alarms and readings ---- */

static void collect_journal(void *ctx, const hs_journal_row *row)
{
    json_array_append_new(ctx, journal_json(row));
}

enum MHD_Result hs_web_api_alarms(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    enum MHD_Result res;
    int64_t since;
    if (duration_arg(c, "since", "7d", 60000, 400LL * 86400000, &since, &res) != 0)
        return res;
    const char *pond = arg(c, "pond");
    if (pond != NULL && hs_site_pond(&w->site, pond) < 0)
        return hs_web_error(c, 400, "pond", "pond: no pond '%s' at this site", pond);
    int64_t now = hs_web_wall_ms();
    json_t *active = json_array(), *journal = json_array();
    if (hs_store_journal_latest(w->store, collect_active, active) != 0 ||
        hs_store_journal_range(w->store, pond, now - since, now + 1, collect_journal,
                               journal) != 0) {
        json_decref(active);
        json_decref(journal);
        return hs_web_error(c, 503, NULL, "alarms: %s", hs_store_error(w->store));
    }
    /* newest first, at most JOURNAL_ROWS_MAX */
    json_t *recent = json_array();
    size_t n = json_array_size(journal);
    for (size_t i = n; i > 0 && json_array_size(recent) < JOURNAL_ROWS_MAX; i--)
        json_array_append(recent, json_array_get(journal, i - 1));
    json_decref(journal);
    return hs_web_json(c, 200, json_pack("{s:o, s:o, s:b}", "active", active, "journal",
                                         recent, "truncated", n > JOURNAL_ROWS_MAX));
}

static void collect_reading(void *ctx, const hs_calibration_row *r)
{
    json_array_append_new(ctx, json_pack("{s:I, s:s, s:o, s:o, s:o, s:o, s:o, s:o}", "time_ms",
                                         (json_int_t)r->t_ms, "pond", r->pond,
                                         "specific_gravity", num(r->specific_gravity),
                                         "reference_temperature_c",
                                         num(r->reference_temperature_c), "conductivity_ms_cm",
                                         num(r->conductivity_ms_cm), "temperature_c",
                                         num(r->temperature_c), "operator",
                                         r->operator_name ? json_string(r->operator_name)
                                                          : json_null(),
                                         "note", r->note ? json_string(r->note) : json_null()));
}

enum MHD_Result hs_web_api_hydrometer_list(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    const char *pond = arg(c, "pond");
    if (pond != NULL && hs_site_pond(&w->site, pond) < 0)
        return hs_web_error(c, 400, "pond", "pond: no pond '%s' at this site", pond);
    json_t *all = json_array();
    if (hs_store_calibrations(w->store, pond, collect_reading, all) != 0) {
        json_decref(all);
        return hs_web_error(c, 503, NULL, "readings: %s", hs_store_error(w->store));
    }
    json_t *recent = json_array();
    size_t n = json_array_size(all);
    for (size_t i = n; i > 0 && json_array_size(recent) < 50; i--)
        json_array_append(recent, json_array_get(all, i - 1));
    json_decref(all);
    return hs_web_json(c, 200, json_pack("{s:o}", "readings", recent));
}

void hs_web_api_free(struct hs_web *w)
{
    free(w->ponds_text);
    w->ponds_text = NULL;
    if (w->path_text != NULL)
        for (size_t i = 0; i <= w->site.n_feeds; i++)
            free(w->path_text[i]);
    free(w->path_text);
    w->path_text = NULL;
}
