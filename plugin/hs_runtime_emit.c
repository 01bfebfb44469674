/* What the runtime tells the world: tagged values to the host (plugin ABI
 * emit), and, when MQTT is on, the retained pond state (the latest of each,
 * held by the publisher) and the transfer advice and alarm transitions
 * through the store's outbox. Journal rows are
 * written whether MQTT is on or not. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_log.h"
#include "hs_pond_doc.h"
#include "hs_runtime_private.h"

static hsp_quality host_quality(hs_quality q)
{
    switch (q) {
    case HS_QUALITY_GOOD: return HSP_QUALITY_GOOD;
    case HS_QUALITY_UNCERTAIN: return HSP_QUALITY_UNCERTAIN;
    default: return HSP_QUALITY_BAD;
    }
}

static void emit_value(hs_runtime *rt, const char *tag, hsp_value_type type, double number,
                       const char *text, const char *unit, hsp_quality q, int64_t t_ms)
{
    if (rt->sink.emit == NULL)
        return;
    struct hsp_value v = {
        .struct_size = sizeof v, .type = type, .tag = tag, .unit = unit ? unit : "",
        .number = number, .text = text, .quality = q, .time_unix_ms = t_ms,
    };
    rt->sink.emit(rt->sink.data, &v);
}

/* The pond-state document of a pond as the runtime knows it now. The
 * strings are borrowed from rt. */
void hs_rt_pond_doc(const hs_runtime *rt, size_t pond, struct hs_pond_doc *d)
{
    const struct hs_rt_pond *p = &rt->ponds[pond];
    hs_pond_doc_init(d);
    d->pond = rt->site.ponds[pond].name;
    d->role = hs_role_name(rt->site.ponds[pond].role);
    d->t_ms = p->view.t_ms;
    d->now_ms = hs_rt_wall_ms();
    d->stale_after_ms = rt->site.site.stale_after_ms;
    d->quality = p->view.quality;
    d->level_quality = (int)p->view.depth_quality;
    d->state = p->view.state;
    d->hydro = p->report;
    d->hydro.depth_m = p->view.depth_m; /* the reading, even when the balance is off */
    d->hydro_known = p->hydro_ok;
    d->note = !p->view.have_state && p->view.note[0] ? p->view.note : NULL;
    d->uncertain_alarms = p->uncertain;
}

static json_t *state_object(hs_runtime *rt, size_t pond)
{
    struct hs_pond_doc d;
    hs_rt_pond_doc(rt, pond, &d);
    return hs_pond_doc_json(&d);
}

int hs_rt_enqueue_state(hs_runtime *rt, size_t pond, int64_t now_ms)
{
    (void)now_ms;
    if (rt->publisher == NULL)
        return 0;
    char topic[HS_TOPIC_MAX];
    if (hs_topic(topic, sizeof topic, &rt->topics, "pond", rt->site.ponds[pond].name,
                 "state") != 0)
        return -1;
    json_t *o = state_object(rt, pond);
    if (o == NULL)
        return -1;
    /* Not through the outbox: a newer state supersedes it, so only the
     * latest matters, and it is kept in memory (hs_publisher_latest) at no
     * cost to the disk. */
    char *text = hs_doc_dumps(o);
    json_decref(o);
    int rc = text != NULL ? hs_publisher_latest(rt->publisher, topic, text) : -1;
    free(text);
    return rc;
}

void hs_rt_emit_pond(hs_runtime *rt, size_t pond, int64_t now_ms)
{
    const struct hs_rt_pond *p = &rt->ponds[pond];
    const char *name = rt->site.ponds[pond].name;
    const hc_brine_state *s = &p->view.state;
    hsp_quality q = host_quality(p->view.quality);
    int64_t t = p->view.t_ms ? p->view.t_ms : now_ms;
    char tag[160];
#define NUM(field, value, unit)                                              \
    do {                                                                     \
        snprintf(tag, sizeof tag, "pond/%s/%s", name, field);                \
        emit_value(rt, tag, HSP_VALUE_NUMBER, value, NULL, unit, q, t);      \
    } while (0)
    NUM("density_kg_m3", s->density_kg_m3, "kg/m3");
    NUM("density_ref_kg_m3", s->density_ref_kg_m3, "kg/m3");
    NUM("density_uncertainty_kg_m3", s->density_uncertainty_kg_m3, "kg/m3");
    NUM("baume", s->baume, "degBe");
    NUM("specific_gravity", s->specific_gravity, "");
    NUM("temperature_c", s->temperature_c, "degC");
    NUM("concentration_factor", s->concentration_factor, "");
    q = host_quality(p->view.depth_quality);
    NUM("depth_m", p->view.depth_m, "m");
    NUM("volume_m3", p->report.volume_m3, "m3");
    NUM("days_to_target_low", p->report.days_to_target_low, "d");
    NUM("days_to_target_high", p->report.days_to_target_high, "d");
#undef NUM
    q = host_quality(p->view.quality);
    snprintf(tag, sizeof tag, "pond/%s/stage", name);
    emit_value(rt, tag, HSP_VALUE_TEXT, NAN, hc_stage_name(s->stage), "", q, t);
    json_t *o = state_object(rt, pond);
    hs_rt_scada_pond(rt, pond, o);
    char *text = o != NULL ? hs_doc_dumps(o) : NULL;
    if (text != NULL) {
        snprintf(tag, sizeof tag, "pond/%s/state", name);
        emit_value(rt, tag, HSP_VALUE_JSON, NAN, text, "", q, t);
    }
    free(text);
    json_decref(o);
}

static json_t *transfer_object(hs_runtime *rt, size_t i, int64_t now_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    const struct hs_rt_transfer *x = &rt->transfers[i];
    char when[40];
    hs_iso8601_ms(when, sizeof when, now_ms);
    json_t *reasons = json_array();
    for (unsigned b = 0; b < HS_XR_BITS; b++)
        if (x->last.reasons & (1u << b))
            json_array_append_new(reasons,
                                  json_pack("{s:s, s:s, s:b}", "name",
                                            hs_transfer_reason_name(1u << b), "text",
                                            hs_transfer_reason_text(1u << b), "interlock",
                                            (1u << b) & HS_XR_INTERLOCK_MASK ? 1 : 0));
    json_t *o = json_pack("{s:s, s:s, s:s, s:s, s:b, s:b, s:o, s:s}", "transfer", t->name,
                          "source", t->source, "destination", t->destination, "advice",
                          hs_advice_name(x->last.advice), "pump_on", x->last.pump_on, "actuate",
                          t->actuate ? 1 : 0, "reasons", reasons, "time", when);
    if (o != NULL)
        json_object_set_new(o, "destination_density_after_mixing_ref_kg_m3",
                            isfinite(x->predicted_mix_kg_m3) ? json_real(x->predicted_mix_kg_m3)
                                                             : json_null());
    return o;
}

void hs_rt_emit_transfer(hs_runtime *rt, size_t i, int64_t now_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    const struct hs_rt_transfer *x = &rt->transfers[i];
    hs_rt_scada_transfer(rt, i);
    json_t *o = transfer_object(rt, i, now_ms);
    if (o == NULL)
        return;
    char *reasons = json_dumps(json_object_get(o, "reasons"), JSON_COMPACT);
    if (rt->store != NULL && reasons != NULL &&
        hs_store_add_transfer(rt->store, t->name, now_ms, hs_advice_name(x->last.advice), reasons,
                              x->last.write != HS_WRITE_NONE) != 0)
        hs_log(HSP_LOG_ERR, "[transfer %s]: journal: %s", t->name, hs_store_error(rt->store));
    free(reasons);
    char topic[HS_TOPIC_MAX];
    if (rt->publisher != NULL &&
        hs_topic(topic, sizeof topic, &rt->topics, "transfer", t->name, NULL) == 0)
        hs_enqueue_json(rt->store, HS_MSG_TRANSFER, topic, o, 1);
    char tag[120];
    snprintf(tag, sizeof tag, "transfer/%s/advice", t->name);
    emit_value(rt, tag, HSP_VALUE_TEXT, NAN, hs_advice_name(x->last.advice), "",
               HSP_QUALITY_GOOD, now_ms);
    char *text = hs_doc_dumps(o);
    if (text != NULL) {
        snprintf(tag, sizeof tag, "transfer/%s", t->name);
        emit_value(rt, tag, HSP_VALUE_JSON, NAN, text, "", HSP_QUALITY_GOOD, now_ms);
    }
    free(text);
    json_decref(o);
}

void hs_rt_emit_alarm(hs_runtime *rt, const hs_alarm_event *ev)
{
    if (rt->publisher != NULL) {
        hs_alarm_sink_emit(&rt->alarm_sink, ev); /* journal + outbox in one batch */
    } else if (rt->store != NULL) {
        hs_journal_row row = {
            .event_id = ev->event_id, .t_ms = ev->t_ms, .pond = ev->pond, .rule = ev->rule,
            .from_state = hs_alarm_state_name(ev->from), .to_state = hs_alarm_state_name(ev->to),
            .cause = ev->cause, .value = ev->value, .limit = ev->limit,
            .priority = ev->priority, .actor = ev->actor, .note = ev->note,
            .episode_id = ev->episode_id, .shelved_until_ms = ev->shelved_until_ms,
        };
        if (hs_store_add_journal(rt->store, &row) != 0)
            hs_log(HSP_LOG_ERR, "alarm journal: %s", hs_store_error(rt->store));
    }
    hs_log(ev->to == HS_ALARM_UNACKED ? HSP_LOG_WARNING : HSP_LOG_INFO,
           "alarm %s/%s: %s -> %s (%s, value %g)", ev->pond, ev->rule,
           hs_alarm_state_name(ev->from), hs_alarm_state_name(ev->to), ev->cause, ev->value);
    char tag[160];
    snprintf(tag, sizeof tag, "alarm/%s/%s", ev->pond, ev->rule);
    emit_value(rt, tag, HSP_VALUE_TEXT, ev->value, hs_alarm_state_name(ev->to), "",
               HSP_QUALITY_GOOD, ev->t_ms);
}

void hs_rt_emit_gateway(hs_runtime *rt, int online, int64_t now_ms)
{
    emit_value(rt, "gateway/online", HSP_VALUE_BOOL, online ? 1 : 0, NULL, "", HSP_QUALITY_GOOD,
               now_ms);
}
