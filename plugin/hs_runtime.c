/* The running job (hs_runtime.h): open, the tick that drives the pipeline,
 * reload with validation first, status line, and the clean close. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "hc_level.h"
#include "hs_alarm_site.h"
#include "hs_conf_alarm.h"
#include "hs_conf_mqtt.h"
#include "hs_conf_web.h"
#include "hs_config.h"
#include "hs_log.h"
#include "hs_runtime_private.h"

#define EVAL_EVERY_MS 1000     /* transfers and time-driven alarm checks */
#define COMMANDS_EVERY_MS 1000 /* operator commands queued by the CLI */
#define FLUSH_WAIT_MS 5000     /* at close: how long to wait for the broker */

/* Rollups are written, folded and thinned together, every commit_interval
 * but at most every HS_RT_MAINTAIN_MS: each pass touches every series' last
 * page once, so the pass rate sets most of what the history writes. */
static int64_t maintain_every(const hs_runtime *rt)
{
    int64_t every = rt->site.site.commit_interval_ms;
    return every > HS_RT_MAINTAIN_MS ? every : HS_RT_MAINTAIN_MS;
}

static void add_rule(hs_runtime *rt, const char *pond, hs_rule_kind kind, const char *name,
                     double low, double high)
{
    hs_alarm_site_add_rule(rt->alarms, pond, kind, name, low, high);
}

/* Each actuated transfer's output alarms; the alarm's "pond" is the
 * transfer's name (names of ponds and transfers never collide). */
static void add_transfer_alarm_rules(hs_runtime *rt)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        const hs_transfer_conf *t = &rt->site.transfers[i];
        if (!t->actuate)
            continue;
        add_rule(rt, t->name, HS_RULE_OUTPUT_UNCONFIRMED, "output-unconfirmed", NAN, NAN);
        if (t->feedback_index >= 0 && t->lockout_after > 0)
            add_rule(rt, t->name, HS_RULE_FEEDBACK_LOCKOUT, "feedback-lockout", NAN, NAN);
        if (t->manual_index >= 0)
            add_rule(rt, t->name, HS_RULE_MANUAL_UNKNOWN, "manual-unknown", NAN, NAN);
    }
}

static void restore_alarm(void *ctx, const hs_journal_row *row)
{
    hs_runtime *rt = ctx;
    int state = hs_alarm_state_from_name(row->to_state);
    if (state >= 0)
        hs_alarm_restore(rt->alarms, row->pond, row->rule, (hs_alarm_state)state, row->event_id,
                         row->episode_id, row->shelved_until_ms);
}

static void alarm_emit(void *ctx, const hs_alarm_event *ev)
{
    hs_rt_emit_alarm(ctx, ev);
}

static int alarms_open(hs_runtime *rt)
{
    uint64_t last = 0;
    if (hs_store_last_event_id(rt->store, &last) != 0)
        return -1;
    rt->alarms = hs_alarm_new(last + 1);
    if (rt->alarms == NULL)
        return -1;
    hs_conf_alarms_apply(&rt->site, rt->alarms); /* first: a configured rule wins */
    hs_alarm_site_rules(&rt->site, rt->alarms);
    add_transfer_alarm_rules(rt);
    hs_store_journal_latest(rt->store, restore_alarm, rt);
    return 0;
}

/* ---- the pieces that depend on one loaded site ---- */

static void site_parts_free(hs_runtime *rt)
{
    hs_rt_buses_stop(rt);
    hs_rt_hydro_free(rt);
    hs_brine_models_free(rt->models);
    rt->models = NULL;
    if (rt->keep != NULL)
        hs_rt_keep_flush(rt); /* the open minutes of the series going away */
    free(rt->keep);
    rt->keep = NULL;
    free(rt->keep_state);
    rt->keep_state = NULL;
    free(rt->readings);
    free(rt->ponds);
    free(rt->transfers);
    rt->readings = NULL;
    rt->ponds = NULL;
    rt->transfers = NULL;
}

static int site_parts_open(hs_runtime *rt, hs_brine_models *models)
{
    const hs_site *site = &rt->site;
    rt->models = models;
    rt->next_calib_ms = 0;
    if (hc_gravity(site->site.latitude_deg, site->site.elevation_m, &rt->gravity_m_s2) != HC_OK)
        rt->gravity_m_s2 = HC_STANDARD_GRAVITY;
    rt->readings = calloc(site->n_signals ? site->n_signals : 1, sizeof *rt->readings);
    rt->keep = calloc(site->n_signals ? site->n_signals : 1, sizeof *rt->keep);
    rt->keep_state = calloc(site->n_ponds ? site->n_ponds : 1, sizeof *rt->keep_state);
    if (rt->keep == NULL || rt->keep_state == NULL)
        return -1;
    if (rt->store != NULL)
        hs_store_set_full_rate_window(rt->store, site->site.full_rate_window_ms);
    rt->ponds = calloc(site->n_ponds ? site->n_ponds : 1, sizeof *rt->ponds);
    rt->transfers = calloc(site->n_transfers ? site->n_transfers : 1, sizeof *rt->transfers);
    if (!rt->readings || !rt->ponds || !rt->transfers)
        return -1;
    for (size_t i = 0; i < site->n_signals; i++)
        rt->readings[i] = (hs_reading){.value = NAN, .quality = HS_QUALITY_BAD};
    for (size_t i = 0; i < site->n_ponds; i++) {
        hs_pond_aids_clear(&rt->ponds[i].aids);
        hc_state_clear(&rt->ponds[i].view.state);
        rt->ponds[i].last_state_quality = -1;
        rt->ponds[i].dirty = 1; /* the first cycle publishes what is known, even nothing */
        rt->ponds[i].view.depth_m = NAN;
        rt->ponds[i].view.quality = HS_QUALITY_BAD;
    }
    if (hs_rt_hydro_init(rt) != 0 || hs_rt_transfers_init(rt) != 0)
        return -1;
    return hs_rt_buses_start(rt);
}

static int load_site(const char *path, hs_site *site, hs_brine_models **models)
{
    hs_diag diag;
    if (hs_site_load(path, site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            hs_log(HSP_LOG_ERR, "%s", diag.msg[i]);
        if (diag.dropped)
            hs_log(HSP_LOG_ERR, "%s: %u more errors not shown", path, diag.dropped);
        return HSP_ERR_CONFIG;
    }
    if (hs_brine_models_build(site, models) != 0) {
        hs_site_free(site);
        return HSP_ERR_CONFIG;
    }
    return HSP_OK;
}

int hs_runtime_open(const char *config_path, const struct hs_emit_sink *sink, hs_runtime **out)
{
    hs_runtime *rt = calloc(1, sizeof *rt);
    if (rt == NULL)
        return HSP_ERR_RUNTIME;
    if (sink != NULL)
        rt->sink = *sink;
    rt->spb_bd_seq_kept = -1;
    snprintf(rt->config_path, sizeof rt->config_path, "%s", config_path);
    hs_brine_models *models = NULL;
    int rc = load_site(config_path, &rt->site, &models);
    if (rc != HSP_OK) {
        free(rt);
        return rc;
    }
    char err[512] = "";
    if (hs_lock_take(rt->site.site.database, &rt->lock, err, sizeof err) != 0) {
        hs_log(HSP_LOG_ERR, "%s", err);
        hs_brine_models_free(models);
        hs_site_free(&rt->site);
        free(rt);
        return HSP_ERR_RUNTIME;
    }
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.raw_retention_ms = rt->site.site.raw_retention_ms;
    opt.minute_retention_ms = rt->site.site.minute_retention_ms;
    opt.hour_retention_ms = rt->site.site.hour_retention_ms;
    opt.retention_every_ms = HS_RT_RETENTION_EVERY_MS;
    opt.hour_fold_every_ms = HS_RT_HOUR_FOLD_EVERY_MS;
    rt->store = hs_store_open(rt->site.site.database, HS_STORE_WRITE, &opt, err, sizeof err);
    if (rt->store == NULL) {
        hs_log(HSP_LOG_ERR, "%s", err);
        hs_lock_release(rt->lock);
        hs_brine_models_free(models);
        hs_site_free(&rt->site);
        free(rt);
        return HSP_ERR_RUNTIME;
    }
    rt->started_ms = hs_rt_wall_ms();
    rt->queue = hp_queue_new(HS_RT_QUEUE_CAPACITY);
    if (rt->queue == NULL || alarms_open(rt) != 0 || hs_rt_mqtt_open(rt) != 0 ||
        site_parts_open(rt, models) != 0 || hs_rt_scada_open(rt) != 0) {
        hs_log(HSP_LOG_ERR, "cannot start the pipeline of %s", config_path);
        if (rt->models == NULL)
            hs_brine_models_free(models);
        hs_runtime_close(rt);
        return HSP_ERR_RUNTIME;
    }
    rt->started_ms = hs_rt_wall_ms();
    /* who holds the site and since when, for `status` once we are gone */
    if (hs_store_meta_set(rt->store, "daemon_pid", (int64_t)getpid()) != 0 ||
        hs_store_meta_set(rt->store, "daemon_started_ms", rt->started_ms) != 0 ||
        hs_store_meta_set(rt->store, "daemon_seen_ms", rt->started_ms) != 0 ||
        hs_store_meta_set(rt->store, "daemon_stopped_ms", 0) != 0)
        hs_log(HSP_LOG_WARNING, "store: %s", hs_store_error(rt->store));
    int64_t mono = hs_rt_mono_ms();
    rt->next_eval_ms = mono;
    rt->next_maintain_ms = mono + maintain_every(rt);
    rt->next_command_ms = mono;
    rt->next_commit_ms = mono + rt->site.site.commit_interval_ms;
    rt->next_schedule_ms = mono;
    rt->schedule_day = -1;
    /* the page is an outlet: without it the ponds are still watched */
    if (rt->site.web != NULL && hs_web_start(config_path, &rt->web) != 0)
        hs_log(HSP_LOG_ERR, "%s:%d: [web] could not start; running without the page (fix it, "
               "then reload)", config_path, rt->site.web->line);
    hs_rt_emit_gateway(rt, 1, rt->started_ms);
    hs_log(HSP_LOG_NOTICE, "site %s: %zu ponds, %zu signals on %zu buses, %zu transfers; "
           "history in %s; MQTT %s", rt->site.site.name, rt->site.n_ponds, rt->site.n_signals,
           rt->site.n_buses, rt->site.n_transfers, rt->site.site.database,
           rt->link != NULL ? "on" : "off");
    *out = rt;
    return HSP_OK;
}

/* ---- the cycle ---- */

/* Whether the comma-separated list has the rule. */
static int list_has(const char *list, const char *rule, size_t len)
{
    for (const char *r = list; *r;) {
        const char *end = strchr(r, ',');
        size_t n = end ? (size_t)(end - r) : strlen(r);
        if (n == len && strncmp(r, rule, len) == 0)
            return 1;
        r += n + (end != NULL);
    }
    return 0;
}

/* Appends the rules of add missing from list (bounded by size). */
static void list_union(char *list, size_t size, const char *add)
{
    for (const char *r = add; *r;) {
        const char *end = strchr(r, ',');
        size_t n = end ? (size_t)(end - r) : strlen(r), used = strlen(list);
        if (!list_has(list, r, n) && used + n + 2 <= size)
            snprintf(list + used, size - used, "%s%.*s", used ? "," : "", (int)n, r);
        r += n + (end != NULL);
    }
}

#define UNCERTAIN_TELL_MS (15 * 60 * 1000) /* a noisy source flickers: tell this seldom */

/* Alarm rules of pond i whose limit the state crosses only within k u go
 * into the pond state at once (uncertain_alarms) and into the log as
 * `uncertain-source`: when a rule is held back that was not told in the
 * last 15 minutes, else at most every 15 minutes while the set changes, so
 * an operator sees why a rule that looks crossed has not raised without a
 * line for each flicker of a noisy source. */
static void note_uncertain_alarms(hs_runtime *rt, size_t i, int64_t mono_ms)
{
    char now[sizeof rt->ponds[i].uncertain] = "";
    size_t used = 0;
    hs_alarm_info info;
    for (size_t k = 0; hs_alarm_get(rt->alarms, k, &info) == 0; k++) {
        if (!info.uncertain || strcmp(info.pond, rt->site.ponds[i].name) != 0)
            continue;
        int n = snprintf(now + used, sizeof now - used, "%s%s", used ? "," : "", info.rule);
        if (n < 0 || (size_t)n >= sizeof now - used)
            break;
        used += (size_t)n;
    }
    struct hs_rt_pond *p = &rt->ponds[i];
    snprintf(p->uncertain, sizeof p->uncertain, "%s", now);
    int news = 0;
    for (const char *r = now; *r;) {
        const char *end = strchr(r, ',');
        size_t n = end ? (size_t)(end - r) : strlen(r);
        news |= !list_has(p->uncertain_told, r, n);
        r += n + (end != NULL);
    }
    int quiet = p->uncertain_told_ms == 0 || mono_ms - p->uncertain_told_ms >= UNCERTAIN_TELL_MS;
    if (!news && !(quiet && strcmp(now, p->uncertain_told) != 0))
        return;
    if (now[0])
        hs_log(HSP_LOG_NOTICE, "pond %s: uncertain-source: %s past a limit by less than its "
               "margin (%.0f standard uncertainties of the state, +-%.1f kg/m3; for density-fall "
               "ten standard deviations of its median); not raised",
               rt->site.ponds[i].name, now, HS_DECISION_K,
               HS_DECISION_K * p->view.state.density_uncertainty_kg_m3);
    else
        hs_log(HSP_LOG_INFO, "pond %s: no alarm held back by uncertainty any more",
               rt->site.ponds[i].name);
    if (quiet)
        snprintf(p->uncertain_told, sizeof p->uncertain_told, "%s", now);
    else
        list_union(p->uncertain_told, sizeof p->uncertain_told, now);
    p->uncertain_told_ms = mono_ms;
}

/* A pond is evaluated every cycle (its alarms watch the age of its
 * inputs), but its state is fed to the hydrology, counted in the rollups
 * and published only when a new input arrived or an input's quality
 * changed (stored as a row by exception: hs_runtime_keep.c); an unchanged
 * retained state goes out again every state_heartbeat_ms. */
static void evaluate_pond(hs_runtime *rt, size_t i, int64_t now_ms, int64_t mono_ms)
{
    struct hs_rt_pond *p = &rt->ponds[i];
    int fresh = p->dirty;
    p->aids.calibration = p->calib_ok ? &p->calibration : NULL; /* rt->ponds may have moved */
    hs_pond_evaluate(&rt->site, i, rt->readings, rt->models, &p->aids, rt->gravity_m_s2, now_ms,
                     &p->view);
    if (fresh)
        hs_rt_hydro_update(rt, i, now_ms);
    if (fresh && p->view.have_state &&
        (p->view.t_ms != p->last_state_ms || (int)p->view.quality != p->last_state_quality)) {
        hs_pond_extra extra;
        hs_pond_extra_clear(&extra);
        extra.depth_m = p->view.depth_m;
        extra.volume_m3 = p->report.volume_m3;
        extra.dissolved_salt_t = p->report.dissolved_salt_t;
        extra.deposited_salt_t = p->report.deposited_salt_t;
        extra.net_evaporation_mm_day = p->report.net_evaporation_mm_day;
        extra.days_to_target_low = p->report.days_to_target_low;
        extra.days_to_target_high = p->report.days_to_target_high;
        extra.days_to_next_stage = p->report.days_to_next_stage_low;
        hs_rt_keep_state(rt, i, p->view.t_ms, &p->view.state, &extra, p->view.quality);
        p->last_state_ms = p->view.t_ms;
        p->last_state_quality = (int)p->view.quality;
    }
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = p->view.have_state ? &p->view.state : NULL;
    in.state_t_ms = p->view.t_ms;
    in.depth_m = p->view.depth_m;
    in.sample_age_s = p->view.oldest_input_age_s;
    in.bus_down = 0;
    in.sensors_stuck = 0.0;
    for (size_t s = 0; s < rt->site.n_signals; s++) {
        const hs_signal *g = &rt->site.signals[s];
        if (g->pond_index != (int)i)
            continue;
        if (g->bus_index >= 0 && (rt->bus_down[g->bus_index] || hs_rt_device_down(rt, g)))
            in.bus_down = 1;
        if (rt->readings[s].flat.stuck)
            in.sensors_stuck += 1.0;
    }
    hs_alarm_update(rt->alarms, rt->site.ponds[i].name, &in, now_ms, alarm_emit, rt);
    note_uncertain_alarms(rt, i, mono_ms);
    int changed = p->pub_mono_ms == 0 || p->view.t_ms != p->pub_t_ms ||
                  (int)p->view.quality != p->pub_quality ||
                  (int)p->view.depth_quality != p->pub_depth_quality ||
                  p->view.have_state != p->pub_have;
    int heartbeat = rt->state_heartbeat_ms > 0 && mono_ms - p->pub_mono_ms >= rt->state_heartbeat_ms;
    if ((fresh && changed) || heartbeat) {
        hs_rt_enqueue_state(rt, i, now_ms);
        hs_rt_emit_pond(rt, i, now_ms);
        p->pub_t_ms = p->view.t_ms;
        p->pub_quality = (int)p->view.quality;
        p->pub_depth_quality = (int)p->view.depth_quality;
        p->pub_have = p->view.have_state;
        p->pub_mono_ms = mono_ms;
        rt->states_published++;
    }
    p->dirty = 0;
}

static char *command_from_queue(void *ctx, int64_t id, const char *json)
{
    hs_runtime *rt = ctx;
    return hs_command_from_queue(&rt->commands, id, json);
}

int hs_runtime_tick(hs_runtime *rt, uint32_t *next_ms)
{
    int64_t mono = hs_rt_mono_ms();
    int64_t now = hs_rt_wall_ms();
    hs_rt_drain(rt, now);
    hs_rt_age_readings(rt, now);
    hs_rt_calib_refresh(rt, mono);
    int periodic = mono >= rt->next_eval_ms;
    int fresh_input = 0; /* a pond of a transfer has new samples: decide now, not later */
    for (size_t i = 0; i < rt->site.n_ponds; i++)
        if (rt->ponds[i].dirty || periodic) {
            for (size_t k = 0; k < rt->site.n_transfers && rt->ponds[i].dirty; k++)
                fresh_input |= rt->site.transfers[k].source_index == (int)i ||
                               rt->site.transfers[k].dest_index == (int)i;
            evaluate_pond(rt, i, now, mono);
        }
    /* no transfer decides on a site that has not been read yet */
    if (rt->warm && (periodic || fresh_input))
        hs_rt_transfers_run(rt, mono, now);
    hs_rt_outputs_tick(rt, hs_rt_mono_ms());
    if (periodic) {
        hs_alarm_tick(rt->alarms, now, alarm_emit, rt);
        rt->next_eval_ms = mono + EVAL_EVERY_MS;
        rt->cycles++;
        hs_rt_scada_beat(rt, now);
    }
    if (hs_web_take_command_hint(rt->web))
        rt->next_command_ms = mono; /* the page waits for its answer */
    if (mono >= rt->next_command_ms) {
        hs_store_command_take(rt->store, command_from_queue, rt);
        rt->next_command_ms = mono + COMMANDS_EVERY_MS;
    }
    /* Samples and states reach the disk every commit_interval (flash wear),
     * a first one or a change of quality or stage at once; alarms,
     * decisions, messages and replies at once. */
    int due = mono >= rt->next_commit_ms;
    int now_too = rt->held_now; /* a first row, a quality or stage change */
    if (due || now_too)
        hs_rt_keep_commit(rt); /* the rows kept since the last commit, in one go */
    int committed = hs_store_commit_due(rt->store, due || now_too);
    if (committed < 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
    if (due)
        rt->next_commit_ms = mono + rt->site.site.commit_interval_ms;
    if (committed > 0)
        hs_web_notify(rt->web); /* after the commit: the page reads committed rows */
    hs_rt_schedule_tick(rt, mono, now);
    hs_rt_mqtt_pump(rt, 0);
    if (mono >= rt->next_maintain_ms) {
        hs_rt_keep_write(rt, now); /* the minutes closed by now join the fold */
        if (hs_store_maintain(rt->store, now) != 0)
            hs_log(HSP_LOG_WARNING, "store maintenance: %s", hs_store_error(rt->store));
        if (hs_store_meta_set(rt->store, "daemon_seen_ms", now) != 0)
            hs_log(HSP_LOG_WARNING, "store: %s", hs_store_error(rt->store));
        rt->next_maintain_ms = mono + maintain_every(rt);
    }
    *next_ms = HS_RT_TICK_MS;
    return HSP_OK;
}

/* ---- reload ---- */

int hs_runtime_reload(hs_runtime *rt, const char *config_path)
{
    hs_site fresh;
    hs_brine_models *models = NULL;
    int rc = load_site(config_path, &fresh, &models);
    if (rc != HSP_OK)
        return rc; /* reasons logged; the running site is untouched */
    if (strcmp(fresh.site.database, rt->site.site.database) != 0) {
        hs_log(HSP_LOG_ERR, "%s: [site] database changed (%s -> %s): that needs a restart, "
               "not a reload", config_path, rt->site.site.database, fresh.site.database);
        hs_brine_models_free(models);
        hs_site_free(&fresh);
        return HSP_ERR_CONFIG;
    }
    const hs_mqtt_conf *om = rt->site.mqtt, *nm = fresh.mqtt;
    int old_mqtt_differs = (om == NULL) != (nm == NULL) ||
                           (om != NULL && (strcmp(om->uri, nm->uri) != 0 ||
                                           strcmp(om->topic_prefix, nm->topic_prefix) != 0 ||
                                           strcmp(om->client_id, nm->client_id) != 0 ||
                                           strcmp(om->username, nm->username) != 0 ||
                                           strcmp(om->password_file, nm->password_file) != 0 ||
                                           strcmp(om->ca_file, nm->ca_file) != 0 ||
                                           om->enabled != nm->enabled));
    /* outputs belong to the site, not to a configuration: one the new file
     * no longer drives (another address, removed, actuate = no) is stopped
     * and confirmed before the new file takes over */
    hs_rt_transfers_release(rt, &fresh);
    /* keep each transfer's timing memory across the reload, by name, so a
     * reload never restarts a pump's minimum off time */
    size_t n_old = rt->site.n_transfers;
    struct hs_rt_transfer *old = rt->transfers;
    char (*old_names)[HS_NAME_MAX] = calloc(n_old ? n_old : 1, HS_NAME_MAX);
    for (size_t i = 0; old_names != NULL && i < n_old; i++)
        memcpy(old_names[i], rt->site.transfers[i].name, HS_NAME_MAX);
    rt->transfers = NULL;
    hs_rt_scada_close(rt); /* its map has the old site's shape */
    site_parts_free(rt);
    hs_site old_site = rt->site; /* freed once the outputs are taken over */
    rt->site = fresh;
    hs_store_set_retention(rt->store, rt->site.site.raw_retention_ms,
                           rt->site.site.minute_retention_ms, rt->site.site.hour_retention_ms);
    hs_alarm_free(rt->alarms);
    rt->alarms = NULL;
    snprintf(rt->config_path, sizeof rt->config_path, "%s", config_path);
    if (old_mqtt_differs)
        hs_log(HSP_LOG_WARNING, "%s: [mqtt] changed: that takes a restart; the running link "
               "stays as it was", config_path);
    rt->warm = 0;
    rt->schedule_day = -1; /* a new site: a new schedule */
    int ok = site_parts_open(rt, models) == 0 && alarms_open(rt) == 0 &&
             hs_rt_scada_open(rt) == 0;
    for (size_t i = 0; ok && old_names != NULL && i < rt->site.n_transfers; i++)
        for (size_t j = 0; j < n_old; j++)
            if (strcmp(old_names[j], rt->site.transfers[i].name) == 0) {
                rt->transfers[i].state = old[j].state;
                rt->transfers[i].lockout_checked = old[j].lockout_checked;
            }
    if (ok)
        hs_rt_transfers_adopt(rt, &old_site, old, n_old);
    hs_site_free(&old_site);
    free(old);
    free(old_names);
    rt->commands.engine = rt->alarms;
    /* the page follows the new file: its users, ponds and [web] keys */
    hs_web_stop(rt->web);
    rt->web = NULL;
    if (ok && rt->site.web != NULL && hs_web_start(config_path, &rt->web) != 0)
        hs_log(HSP_LOG_ERR, "reload: [web] could not start; the page is off until the next "
               "reload");
    if (!ok) {
        hs_log(HSP_LOG_ERR, "reload: the new configuration could not be started");
        return HSP_ERR_RUNTIME;
    }
    hs_log(HSP_LOG_NOTICE, "site %s reloaded: %zu ponds, %zu signals, %zu transfers",
           rt->site.site.name, rt->site.n_ponds, rt->site.n_signals, rt->site.n_transfers);
    return HSP_OK;
}

/* ---- status and close ---- */

void hs_runtime_status(hs_runtime *rt, char *buf, size_t len)
{
    size_t with_state = 0, running = 0, blocked = 0, active = 0;
    for (size_t i = 0; i < rt->site.n_ponds; i++)
        with_state += rt->ponds[i].view.have_state;
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        running += rt->transfers[i].last.advice == HS_ADVICE_RUN;
        blocked += rt->transfers[i].last.advice == HS_ADVICE_BLOCKED;
    }
    for (size_t i = 0; i < hs_alarm_count(rt->alarms); i++) {
        hs_alarm_info info;
        if (hs_alarm_get(rt->alarms, i, &info) == 0 && info.active)
            active++;
    }
    int64_t waiting = 0;
    hs_store_outbox_count(rt->store, &waiting);
    snprintf(buf, len, "%zu/%zu ponds with state, %zu alarms active, transfers %zu run %zu "
             "blocked, %llu samples, outbox %lld%s", with_state, rt->site.n_ponds, active,
             running, blocked, (unsigned long long)rt->samples_in, (long long)waiting,
             rt->link == NULL ? " (MQTT off)" : "");
}

void hs_runtime_close(hs_runtime *rt)
{
    if (rt == NULL)
        return;
    hs_web_stop(rt->web); /* no page requests while we shut down */
    rt->web = NULL;
    /* pumps first: nothing may run on after we stop watching */
    if (rt->queue != NULL && rt->store != NULL && rt->readings != NULL && rt->buses != NULL)
        hs_rt_drain(rt, hs_rt_wall_ms());
    if (rt->transfers != NULL && rt->buses != NULL)
        hs_rt_transfers_safe(rt);
    hs_rt_buses_stop(rt); /* the workers carry out queued writes before they end */
    hs_rt_scada_close(rt);
    if (rt->store != NULL)
        hs_store_flush(rt->store);
    hs_rt_emit_gateway(rt, 0, hs_rt_wall_ms());
    hs_rt_mqtt_close(rt, FLUSH_WAIT_MS);
    site_parts_free(rt);
    hs_rt_keep_free(rt);
    hs_alarm_free(rt->alarms);
    if (rt->store != NULL) {
        if (hs_store_meta_set(rt->store, "daemon_stopped_ms", hs_rt_wall_ms()) != 0)
            hs_log(HSP_LOG_WARNING, "store: %s", hs_store_error(rt->store));
        hs_store_checkpoint(rt->store, 1);
        hs_store_close(rt->store);
    }
    hp_queue_free(rt->queue);
    hs_site_free(&rt->site);
    hs_lock_release(rt->lock); /* last: the outputs and the history are let go */
    free(rt);
}
