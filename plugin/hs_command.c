/* Operator commands (see hs_command.h). */
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_command.h"

#define NAME_MAX_LEN 63
#define NOTE_MAX_LEN 255
#define REQUEST_ID_MAX_LEN 64

enum { K_EVENT_ID, K_POND, K_RULE, K_DURATION, K_OPERATOR, K_NOTE, K_REQUEST_ID, K_TIME,
       K_COUNT };
static const char *const key_names[K_COUNT] = {
    "event_id", "pond", "rule", "duration_s", "operator", "note", "request_id", "time",
};

/* Which keys each verb takes (1 allowed, 2 required). */
static const struct {
    const char *verb;
    unsigned char keys[K_COUNT];
} verbs[] = {
    {"ack", {1, 1, 1, 0, 2, 1, 1, 1}},
    {"shelve", {0, 2, 2, 2, 2, 1, 1, 1}},
    {"unshelve", {0, 2, 2, 0, 2, 1, 1, 1}},
};

static int64_t system_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

struct collected {
    hs_alarm_sink *sink;
    json_t *ids;
};

/* Forwards each transition to the sink and notes its event id for the reply. */
static void collect(void *ctx, const hs_alarm_event *ev)
{
    struct collected *c = ctx;
    hs_alarm_sink_emit(c->sink, ev);
    json_array_append_new(c->ids, json_integer((json_int_t)ev->event_id));
}

static json_t *refuse(json_t *reply, int *ok, const char *fmt, const char *arg)
{
    char msg[256];
    snprintf(msg, sizeof msg, fmt, arg ? arg : "");
    json_object_set_new(reply, "ok", json_false());
    json_t *text = json_string(msg);
    /* Never a refusal without a reason, even if msg is not valid UTF-8. */
    json_object_set_new(reply, "error", text ? text : json_string("command refused"));
    *ok = 0;
    return reply;
}

/* A string value within max bytes, or NULL (and *why) when not. */
static const char *text_of(json_t *v, size_t max, const char **why)
{
    if (!json_is_string(v)) {
        *why = "must be a string";
        return NULL;
    }
    const char *s = json_string_value(v);
    if (*s == '\0' || strlen(s) > max) {
        *why = "must be 1 to the allowed number of characters";
        return NULL;
    }
    return s;
}

/* Why a shelve was refused, naming the limit (the engine only says no). */
static void shelve_refusal(const hs_alarm_engine *eng, const char *pond, const char *rule,
                           long long duration_s, char *msg, size_t len)
{
    hs_alarm_info info;
    for (size_t i = 0; hs_alarm_get(eng, i, &info) == 0; i++) {
        if (strcmp(info.pond, pond) != 0 || strcmp(info.rule, rule) != 0)
            continue;
        if (duration_s * 1000 > info.max_shelve_ms) {
            snprintf(msg, len, "shelving %s/%s for %llds is longer than its max_shelve of %llds "
                     "(%.4g h); ask for at most that, or raise max_shelve of the rule's [alarm] section",
                     pond, rule, duration_s, (long long)(info.max_shelve_ms / 1000),
                     (double)info.max_shelve_ms / 3.6e6);
            return;
        }
        snprintf(msg, len, "%s/%s is %s: it cannot be shelved in that state", pond, rule,
                 hs_alarm_state_name(info.state));
        return;
    }
    snprintf(msg, len, "%s", hs_alarm_result_text(HS_ALARM_REFUSED));
}


json_t *hs_command_apply(hs_commands *c, const char *verb, const void *payload, size_t len,
                         int oversize, int *ok)
{
    json_t *reply = json_object();
    if (reply == NULL)
        return NULL;
    *ok = 1;
    int v = -1;
    for (size_t i = 0; verb && i < sizeof verbs / sizeof verbs[0]; i++)
        if (strcmp(verb, verbs[i].verb) == 0)
            v = (int)i;
    json_object_set_new(reply, "command", verb ? json_string(verb) : json_null());
    if (json_object_get(reply, "command") == NULL)
        json_object_set_new(reply, "command", json_null()); /* not valid UTF-8 */
    if (v < 0)
        return refuse(reply, ok, "unknown command; use ack, shelve or unshelve%s", NULL);
    if (oversize || len > HS_COMMAND_MAX_BYTES)
        return refuse(reply, ok, "payload larger than 4096 bytes%s", NULL);
    json_error_t jerr;
    json_t *in = json_loadb(payload ? payload : "", len, JSON_REJECT_DUPLICATES, &jerr);
    if (in == NULL) {
        char where[200];
        snprintf(where, sizeof where, "not JSON (column %d): %s", jerr.column, jerr.text);
        return refuse(reply, ok, "%s", where);
    }
    if (!json_is_object(in)) {
        json_decref(in);
        return refuse(reply, ok, "the payload must be a JSON object%s", NULL);
    }
    json_t *val[K_COUNT] = {0};
    const char *key;
    json_t *value;
    json_object_foreach(in, key, value) {
        int k = -1;
        for (int i = 0; i < K_COUNT; i++)
            if (strcmp(key, key_names[i]) == 0)
                k = i;
        if (k < 0 || verbs[v].keys[k] == 0) {
            /* At most 60 bytes of the key, cut between UTF-8 characters so
             * that the reply stays valid JSON text. */
            char what[96];
            size_t cut = strlen(key);
            if (cut > 60) {
                cut = 60;
                while (cut > 0 && ((unsigned char)key[cut] & 0xc0) == 0x80)
                    cut--;
            }
            snprintf(what, sizeof what, "%.*s", (int)cut, key);
            json_decref(in);
            return refuse(reply, ok, "key '%s' is not part of this command", what);
        }
        val[k] = value;
    }
    /* request_id first, so that even a refusal can be matched. */
    const char *why = NULL, *request_id = NULL;
    if (val[K_REQUEST_ID]) {
        request_id = text_of(val[K_REQUEST_ID], REQUEST_ID_MAX_LEN, &why);
        if (request_id == NULL) {
            json_decref(in);
            return refuse(reply, ok, "request_id %s", why);
        }
        json_object_set_new(reply, "request_id", json_string(request_id));
    }
    for (int k = 0; k < K_COUNT; k++)
        if (verbs[v].keys[k] == 2 && val[k] == NULL) {
            json_decref(in);
            return refuse(reply, ok, "missing key '%s'", key_names[k]);
        }
    const char *pond = NULL, *rule = NULL, *oper = NULL, *note = NULL;
    const char *bad = NULL;
    if (val[K_POND] && (pond = text_of(val[K_POND], NAME_MAX_LEN, &why)) == NULL)
        bad = "pond";
    if (!bad && val[K_RULE] && (rule = text_of(val[K_RULE], NAME_MAX_LEN, &why)) == NULL)
        bad = "rule";
    if (!bad && (oper = text_of(val[K_OPERATOR], NAME_MAX_LEN, &why)) == NULL)
        bad = "operator";
    if (!bad && val[K_NOTE] && (note = text_of(val[K_NOTE], NOTE_MAX_LEN, &why)) == NULL)
        bad = "note";
    json_int_t event_id = 0, duration_s = 0;
    if (!bad && val[K_EVENT_ID]) {
        if (!json_is_integer(val[K_EVENT_ID]) || (event_id = json_integer_value(val[K_EVENT_ID])) < 1) {
            why = "must be a positive integer";
            bad = "event_id";
        }
    }
    if (!bad && val[K_TIME]) {
        int64_t t;
        if (!json_is_string(val[K_TIME]) ||
            hs_command_parse_time(json_string_value(val[K_TIME]), &t) != 0) {
            why = "must be UTC ISO 8601 text such as 2026-03-01T06:00:00Z";
            bad = "time";
        }
    }
    if (!bad && val[K_DURATION]) {
        if (!json_is_integer(val[K_DURATION]) ||
            (duration_s = json_integer_value(val[K_DURATION])) < 1 ||
            duration_s > 366 * 86400) {
            why = "must be a whole number of seconds, 1 to a year";
            bad = "duration_s";
        }
    }
    if (bad) {
        char msg[160];
        snprintf(msg, sizeof msg, "%s %s", bad, why);
        json_decref(in);
        return refuse(reply, ok, "%s", msg);
    }
    if (v == 0 && (event_id != 0) == (pond != NULL)) {
        json_decref(in);
        return refuse(reply, ok, "ack takes either event_id or pond%s", NULL);
    }
    if (v == 0 && rule != NULL && pond == NULL) {
        json_decref(in);
        return refuse(reply, ok, "rule needs pond%s", NULL);
    }
    if (c->dry_run) { /* validated; the caller decides whether to apply */
        json_decref(in);
        json_object_set_new(reply, "ok", json_true());
        return reply;
    }
    /* Validated: apply it. The strings live in `in` until the end. */
    int64_t now = c->clock_ms ? c->clock_ms() : system_ms();
    struct collected col = {c->sink, json_array()};
    hs_alarm_result r;
    const char *done_word = "done", *already_word = "no-change";
    if (v == 0 && event_id != 0) {
        r = hs_alarm_ack_event(c->engine, (uint64_t)event_id, oper, note, now, collect, &col);
        done_word = "acknowledged";
        already_word = "already-acknowledged";
    } else if (v == 0) {
        r = hs_alarm_ack(c->engine, pond, rule, oper, note, now, collect, &col);
        done_word = "acknowledged";
        already_word = "already-acknowledged";
    } else if (v == 1) {
        r = hs_alarm_shelve(c->engine, pond, rule, (int64_t)duration_s * 1000, oper, note, now,
                            collect, &col);
        done_word = "shelved";
    } else {
        r = hs_alarm_unshelve(c->engine, pond, rule, oper, note, now, collect, &col);
        done_word = "unshelved";
        already_word = "not-shelved";
    }
    json_object_set_new(reply, "event_ids", col.ids);
    if (r == HS_ALARM_DONE || r == HS_ALARM_ALREADY) {
        json_object_set_new(reply, "ok", json_true());
        json_object_set_new(reply, "result",
                            json_string(r == HS_ALARM_DONE ? done_word : already_word));
        if (r == HS_ALARM_ALREADY)
            json_object_set_new(reply, "message", json_string(hs_alarm_result_text(r)));
    } else {
        char msg[256];
        if (r == HS_ALARM_UNKNOWN_POND)
            snprintf(msg, sizeof msg, "unknown pond '%s'", pond ? pond : "");
        else if (r == HS_ALARM_UNKNOWN_RULE)
            snprintf(msg, sizeof msg, "pond '%s' has no alarm rule '%s'", pond ? pond : "",
                     rule ? rule : "");
        else if (r == HS_ALARM_UNKNOWN_EVENT)
            snprintf(msg, sizeof msg, "unknown event_id %lld", (long long)event_id);
        else if (r == HS_ALARM_REFUSED && v == 1)
            shelve_refusal(c->engine, pond, rule, duration_s, msg, sizeof msg);
        else
            snprintf(msg, sizeof msg, "%s", hs_alarm_result_text(r));
        json_decref(in);
        return refuse(reply, ok, "%s", msg);
    }
    json_decref(in);
    return reply;
}

/* Queues the reply on .../reply (accepted) or .../error (refused). */
static void send_reply(hs_commands *c, json_t *reply, int ok)
{
    char topic[HS_TOPIC_MAX];
    if (!c->sink->journal_only &&
        hs_topic(topic, sizeof topic, c->topics, ok ? "reply" : "error", NULL, NULL) == 0 &&
        hs_enqueue_json(c->sink->store, HS_MSG_REPLY, topic, reply, 0) != 0)
        c->sink->errors++;
    if (ok)
        c->accepted++;
    else
        c->refused++;
}

int hs_command_parse_time(const char *text, int64_t *t_ms)
{
    struct tm tm;
    memset(&tm, 0, sizeof tm);
    const char *rest = text ? strptime(text, "%Y-%m-%dT%H:%M:%S", &tm) : NULL;
    if (rest == NULL)
        return -1;
    int ms = 0;
    if (*rest == '.') {
        int digits = 0;
        for (rest++; *rest >= '0' && *rest <= '9'; rest++, digits++)
            if (digits < 3)
                ms = ms * 10 + (*rest - '0');
        if (digits == 0)
            return -1;
        for (; digits < 3; digits++)
            ms *= 10;
    }
    if (strcmp(rest, "Z") != 0)
        return -1;
    time_t secs = timegm(&tm);
    if (secs == (time_t)-1)
        return -1;
    *t_ms = (int64_t)secs * 1000 + ms;
    return 0;
}

/* FNV-1a over the topic and the payload: the identity of a retained
 * message, so that it is answered once however often it is delivered. */
static uint64_t message_hash(const char *topic, const void *payload, size_t len, int oversize)
{
    uint64_t h = UINT64_C(14695981039346656037);
    for (const char *t = topic ? topic : ""; *t; t++)
        h = (h ^ (unsigned char)*t) * UINT64_C(1099511628211);
    h = (h ^ 0xff) * UINT64_C(1099511628211);
    if (payload != NULL && !oversize)
        for (size_t i = 0; i < len; i++)
            h = (h ^ ((const unsigned char *)payload)[i]) * UINT64_C(1099511628211);
    return h ^ (uint64_t)len;
}

/* A refusal with its reason; recorded under key when key is not NULL. */
static void refuse_message(hs_commands *c, const char *verb, const char *request_id,
                           const char *key, int64_t now, const char *fmt, ...)
    __attribute__((format(printf, 6, 7)));
static void refuse_message(hs_commands *c, const char *verb, const char *request_id,
                           const char *key, int64_t now, const char *fmt, ...)
{
    char msg[320];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    json_t *reply = json_object();
    if (reply == NULL)
        return;
    json_object_set_new(reply, "command", verb ? json_string(verb) : json_null());
    if (request_id)
        json_object_set_new(reply, "request_id", json_string(request_id));
    json_object_set_new(reply, "ok", json_false());
    json_t *text = json_string(msg);
    json_object_set_new(reply, "error", text ? text : json_string("command refused"));
    send_reply(c, reply, 0);
    char *dump = key ? json_dumps(reply, JSON_COMPACT) : NULL;
    if (dump && hs_store_command_seen_add(c->sink->store, key, now, 0, dump) != 0)
        c->sink->errors++;
    free(dump);
    json_decref(reply);
}

void hs_command_on_message(void *ctx, const char *topic, const void *payload, size_t len,
                           int oversize, int retained)
{
    hs_commands *c = ctx;
    char base[HS_TOPIC_MAX];
    if (hs_topic(base, sizeof base, c->topics, "command", NULL, NULL) != 0)
        return;
    size_t n = strlen(base);
    const char *verb = NULL;
    if (topic && strncmp(topic, base, n) == 0 && topic[n] == '/')
        verb = topic + n + 1;
    int64_t now = c->clock_ms ? c->clock_ms() : system_ms();
    int64_t max_age = c->max_age_ms > 0 ? c->max_age_ms : HS_COMMAND_MAX_AGE_MS;
    hs_store *st = c->sink->store;
    if (retained) {
        /* A retained command would run again at every reconnect: never run
         * one; say so once (the broker hands it out again and again). */
        char key[48], *seen = NULL;
        int seen_ok;
        snprintf(key, sizeof key, "retained:%016llx",
                 (unsigned long long)message_hash(topic, payload, len, oversize));
        int rc = hs_store_command_seen(st, key, &seen_ok, &seen);
        free(seen);
        if (rc != 0)
            return; /* answered before (or the store cannot tell: stay silent) */
        refuse_message(c, verb, NULL, key, now,
                       "a retained command is never executed: publish commands with the "
                       "retain flag off, and clear this one (an empty retained message on %s)",
                       topic ? topic : "its topic");
        return;
    }
    int ok;
    c->dry_run = 1;
    json_t *reply = hs_command_apply(c, verb, payload, len, oversize, &ok);
    c->dry_run = 0;
    if (reply == NULL)
        return;
    if (!ok) { /* not a valid command: its reason, nothing to remember */
        send_reply(c, reply, 0);
        json_decref(reply);
        return;
    }
    json_decref(reply);
    /* Valid: it must say who sent it when, and be neither old nor a repeat. */
    json_t *in = json_loadb(payload, len, 0, NULL);
    const char *request_id = json_string_value(json_object_get(in, "request_id"));
    const char *when = json_string_value(json_object_get(in, "time"));
    int64_t sent = 0;
    char key[96];
    if (request_id == NULL || when == NULL) {
        refuse_message(c, verb, request_id, NULL, now,
                       "missing key '%s': every command carries a request_id and its UTC "
                       "time", request_id == NULL ? "request_id" : "time");
    } else if (hs_command_parse_time(when, &sent) != 0) {
        refuse_message(c, verb, request_id, NULL, now, "time is not UTC ISO 8601");
    } else if (now - sent > max_age) {
        refuse_message(c, verb, request_id, NULL, now,
                       "stale: sent at %s, %lld s ago; commands older than %lld s are not "
                       "applied (send it again if it still holds)",
                       when, (long long)((now - sent) / 1000), (long long)(max_age / 1000));
    } else if (sent - now > max_age) {
        refuse_message(c, verb, request_id, NULL, now,
                       "time %s is %lld s ahead of the gateway's clock; check the clocks",
                       when, (long long)((sent - now) / 1000));
    } else {
        snprintf(key, sizeof key, "id:%s", request_id);
        char *seen = NULL;
        int seen_ok = 0;
        int rc = hs_store_command_seen(st, key, &seen_ok, &seen);
        json_t *old = rc == 1 ? json_loads(seen, 0, NULL) : NULL;
        free(seen);
        if (old != NULL) { /* a repeat: the first answer again, nothing applied */
            json_object_set_new(old, "repeat", json_true());
            send_reply(c, old, seen_ok);
            json_decref(old);
        } else if (rc >= 0) {
            reply = hs_command_apply(c, verb, payload, len, oversize, &ok);
            char *dump = reply ? json_dumps(reply, JSON_COMPACT) : NULL;
            if (dump && hs_store_command_seen_add(st, key, now, ok, dump) != 0)
                c->sink->errors++;
            free(dump);
            if (reply) {
                send_reply(c, reply, ok);
                json_decref(reply);
            }
        } else {
            refuse_message(c, verb, request_id, NULL, now,
                           "the gateway cannot check for a repeat (store error); not applied");
        }
    }
    json_decref(in);
}

char *hs_command_from_queue(void *ctx, int64_t id, const char *json)
{
    hs_commands *c = ctx;
    (void)id;
    int ok = 0;
    json_t *reply = NULL;
    json_t *in = json_loads(json, JSON_REJECT_DUPLICATES, NULL);
    json_t *verb = json_is_object(in) ? json_object_get(in, "command") : NULL;
    if (json_is_string(verb)) {
        char v[16];
        snprintf(v, sizeof v, "%s", json_string_value(verb));
        json_object_del(in, "command");
        char *rest = json_dumps(in, JSON_COMPACT);
        if (rest)
            reply = hs_command_apply(c, v, rest, strlen(rest), 0, &ok);
        free(rest);
    } else {
        reply = hs_command_apply(c, NULL, json, strlen(json), 0, &ok);
    }
    json_decref(in);
    if (reply == NULL)
        return NULL;
    json_object_set_new(reply, "source", json_string("gateway"));
    send_reply(c, reply, ok);
    char *text = json_dumps(reply, JSON_COMPACT);
    json_decref(reply);
    return text;
}
