/* Topics and JSON payloads of the MQTT messages, and the alarm sink that
 * journals and queues every alarm transition together. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_pond_doc.h"
#include "hs_publish.h"

int hs_topic_level_ok(const char *name)
{
    if (name == NULL || *name == '\0' || strlen(name) >= 64)
        return 0;
    for (const char *c = name; *c; c++)
        if (*c == '/' || *c == '+' || *c == '#' || (unsigned char)*c < 0x20)
            return 0;
    return 1;
}

int hs_topics_init(hs_topics *t, const char *prefix, const char *site)
{
    /* The prefix may have levels of its own ("plant/halostage"), not wildcards. */
    if (prefix == NULL || *prefix == '\0' || strlen(prefix) >= sizeof t->prefix ||
        strpbrk(prefix, "+#") != NULL || prefix[0] == '/' || prefix[strlen(prefix) - 1] == '/' ||
        !hs_topic_level_ok(site))
        return -1;
    snprintf(t->prefix, sizeof t->prefix, "%s", prefix);
    snprintf(t->site, sizeof t->site, "%s", site);
    return 0;
}

int hs_topic(char *buf, size_t len, const hs_topics *t, const char *what, const char *a,
             const char *b)
{
    if ((a && !hs_topic_level_ok(a)) || (b && !hs_topic_level_ok(b)))
        return -1;
    int n = snprintf(buf, len, "%s/%s/%s%s%s%s%s", t->prefix, t->site, what, a ? "/" : "",
                     a ? a : "", b ? "/" : "", b ? b : "");
    return n < 0 || (size_t)n >= len ? -1 : 0;
}

int hs_topic_commands(char *buf, size_t len, const hs_topics *t)
{
    int n = snprintf(buf, len, "%s/%s/command/#", t->prefix, t->site);
    return n < 0 || (size_t)n >= len ? -1 : 0;
}

void hs_iso8601_ms(char *buf, size_t len, int64_t t_ms)
{
    time_t secs = (time_t)(t_ms >= 0 ? t_ms / 1000 : (t_ms - 999) / 1000);
    int ms = (int)(t_ms - (int64_t)secs * 1000);
    struct tm tm;
    gmtime_r(&secs, &tm);
    char day[24];
    strftime(day, sizeof day, "%Y-%m-%dT%H:%M:%S", &tm);
    snprintf(buf, len, "%s.%03dZ", day, ms);
}

/* A number, or JSON null when it is not known. */
static json_t *num(double v) { return isfinite(v) ? json_real(v) : json_null(); }

json_t *hs_alarm_payload(const hs_alarm_event *ev)
{
    char when[40], until[40];
    hs_iso8601_ms(when, sizeof when, ev->t_ms);
    json_t *o = json_object();
    if (o == NULL)
        return NULL;
    json_object_set_new(o, "event_id", json_integer((json_int_t)ev->event_id));
    json_object_set_new(o, "episode_id", ev->episode_id ? json_integer((json_int_t)ev->episode_id)
                                                        : json_null());
    json_object_set_new(o, "time", json_string(when));
    json_object_set_new(o, "pond", json_string(ev->pond));
    json_object_set_new(o, "rule", json_string(ev->rule));
    json_object_set_new(o, "kind", json_string(hs_rule_kind_name(ev->kind)));
    json_object_set_new(o, "from", json_string(hs_alarm_state_name(ev->from)));
    json_object_set_new(o, "state", json_string(hs_alarm_state_name(ev->to)));
    json_object_set_new(o, "active", json_boolean(ev->active));
    json_object_set_new(o, "cause", json_string(ev->cause));
    json_object_set_new(o, "priority", json_string(hs_alarm_priority_name(ev->priority)));
    /* The value's unit is in the quantity's name ("density_kg_m3", ...). */
    const char *q = hs_alarm_quantity_name(ev->quantity);
    json_object_set_new(o, "quantity", q ? json_string(q) : json_null());
    json_object_set_new(o, "value", num(ev->value));
    json_object_set_new(o, "limit", num(ev->limit));
    json_object_set_new(o, "actor", ev->actor ? json_string(ev->actor) : json_null());
    json_object_set_new(o, "note", ev->note ? json_string(ev->note) : json_null());
    if (ev->shelved_until_ms) {
        hs_iso8601_ms(until, sizeof until, ev->shelved_until_ms);
        json_object_set_new(o, "shelved_until", json_string(until));
    }
    return o;
}

char *hs_gateway_payload(const hs_topics *t, int online)
{
    json_t *o = json_object();
    if (o == NULL)
        return NULL;
    json_object_set_new(o, "online", json_boolean(online));
    json_object_set_new(o, "site", json_string(t->site));
    char *text = json_dumps(o, JSON_COMPACT);
    json_decref(o);
    return text;
}

int hs_enqueue_json(hs_store *st, hs_msg_kind kind, const char *topic, json_t *payload,
                    int retained)
{
    char *text = payload ? hs_doc_dumps(payload) : NULL;
    if (text == NULL)
        return -1;
    int rc = hs_store_outbox_put(st, kind, topic, text, strlen(text), 1, retained);
    free(text);
    return rc < 0 ? -1 : 0;
}

void hs_alarm_sink_emit(void *ctx, const hs_alarm_event *ev)
{
    hs_alarm_sink *sink = ctx;
    hs_journal_row row = {
        .event_id = ev->event_id, .t_ms = ev->t_ms, .pond = ev->pond, .rule = ev->rule,
        .from_state = hs_alarm_state_name(ev->from), .to_state = hs_alarm_state_name(ev->to),
        .cause = ev->cause, .value = ev->value, .limit = ev->limit, .priority = ev->priority,
        .actor = ev->actor, .note = ev->note, .episode_id = ev->episode_id,
        .shelved_until_ms = ev->shelved_until_ms,
    };
    char topic[HS_TOPIC_MAX];
    if (hs_store_add_journal(sink->store, &row) != 0) {
        sink->errors++;
        return;
    }
    if (sink->journal_only)
        return;
    if (hs_topic(topic, sizeof topic, sink->topics, "alarm", ev->pond, ev->rule) != 0) {
        sink->errors++;
        return;
    }
    json_t *o = hs_alarm_payload(ev);
    if (hs_enqueue_json(sink->store, HS_MSG_ALARM, topic, o, 0) != 0)
        sink->errors++;
    json_decref(o);
}
