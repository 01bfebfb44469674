/* The operator's writes: acknowledge and shelve alarms, record hydrometer
 * readings. Acknowledgements and shelves are queued in the store's command
 * queue as `halostage ack` queues them; the daemon applies them with the
 * same checks and journal, and the connection waits (suspended, never
 * blocking the server) for its reply. Readings go into the store as
 * `halostage calibrate` writes them. None of these can reach a pump or a
 * register. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_web_private.h"

#define NOTE_MAX 200
#define SHELVE_MAX_S (7 * 86400)

/* Optional "note": a string of at most NOTE_MAX bytes. */
static int note_of(struct hs_web_call *c, json_t *body, const char **note, enum MHD_Result *res)
{
    json_t *n = json_object_get(body, "note");
    *note = NULL;
    if (n == NULL || json_is_null(n))
        return 0;
    if (!json_is_string(n) || json_string_length(n) > NOTE_MAX) {
        *res = hs_web_error(c, 400, "note", "note: text of at most %d bytes", NOTE_MAX);
        return -1;
    }
    *note = json_string_value(n);
    return 0;
}

/* Keys outside allowed are refused, naming the first. */
static int only_keys(struct hs_web_call *c, json_t *body, const char *const *allowed,
                     enum MHD_Result *res)
{
    const char *key;
    json_t *v;
    json_object_foreach(body, key, v) {
        int ok = 0;
        for (size_t i = 0; allowed[i]; i++)
            ok |= strcmp(allowed[i], key) == 0;
        if (!ok) {
            *res = hs_web_error(c, 400, key, "%s: not a field of this request", key);
            return -1;
        }
    }
    return 0;
}

static enum MHD_Result queue_command(struct hs_web_call *c, json_t *cmd)
{
    struct hs_web *w = c->web;
    json_object_set_new(cmd, "operator", json_string(c->session->user));
    char *text = json_dumps(cmd, JSON_COMPACT);
    json_decref(cmd);
    if (text == NULL)
        return hs_web_error(c, 500, NULL, "out of memory");
    int64_t id;
    int rc = hs_store_command_put(w->store, text, hs_web_wall_ms(), &id);
    free(text);
    if (rc != 0)
        return hs_web_error(c, 503, NULL, "cannot queue the command: %s",
                            hs_store_error(w->store));
    atomic_store(&w->command_hint, 1);
    c->req->command_id = id;
    c->req->command_deadline_ms = hs_web_mono_ms() + HS_WEB_COMMAND_WAIT_MS;
    if (hs_web_wait(c) != 0)
        return hs_web_command_resume(c);
    return MHD_YES;
}

enum MHD_Result hs_web_command_resume(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    char *reply = NULL;
    int got = hs_store_command_reply(w->store, c->req->command_id, &reply);
    if (got < 0)
        return hs_web_error(c, 503, NULL, "command %lld: %s", (long long)c->req->command_id,
                            hs_store_error(w->store));
    if (got == 0) {
        if (hs_web_mono_ms() < c->req->command_deadline_ms && hs_web_wait(c) == 0)
            return MHD_YES;
        json_t *o = json_pack("{s:b, s:I, s:s}", "ok", 0, "command_id",
                              (json_int_t)c->req->command_id, "error",
                              "queued, but the daemon has not answered yet; it applies the "
                              "command when it reads its queue");
        return hs_web_json(c, 202, o);
    }
    json_t *r = json_loads(reply, 0, NULL);
    free(reply);
    if (r == NULL)
        return hs_web_error(c, 500, NULL, "the daemon's reply is not JSON");
    int ok = json_is_true(json_object_get(r, "ok"));
    json_object_set_new(r, "command_id", json_integer(c->req->command_id));
    return hs_web_json(c, ok ? 200 : 409, r);
}

enum MHD_Result hs_web_api_ack(struct hs_web_call *c, const char *event_text)
{
    static const char *const keys[] = {"note", NULL};
    enum MHD_Result res;
    char *end;
    unsigned long long id = strtoull(event_text, &end, 10);
    if (event_text[0] < '0' || event_text[0] > '9' || *end != '\0' || id == 0 ||
        id > (1ULL << 53))
        return hs_web_error(c, 400, "event_id", "event_id: '%s' is not a positive integer",
                            event_text);
    json_t *body = c->req->body_len ? hs_web_body_json(c, &res) : json_object();
    if (body == NULL)
        return res;
    const char *note;
    if (only_keys(c, body, keys, &res) != 0 || note_of(c, body, &note, &res) != 0) {
        json_decref(body);
        return res;
    }
    json_t *cmd = json_pack("{s:s, s:I}", "command", "ack", "event_id", (json_int_t)id);
    if (note)
        json_object_set_new(cmd, "note", json_string(note));
    json_decref(body);
    return queue_command(c, cmd);
}

enum MHD_Result hs_web_api_shelve(struct hs_web_call *c, const char *pond, const char *rule,
                                  int unshelve)
{
    static const char *const keys[] = {"note", "duration_s", NULL};
    struct hs_web *w = c->web;
    enum MHD_Result res;
    if (hs_site_pond(&w->site, pond) < 0)
        return hs_web_error(c, 404, "pond", "pond: no pond '%s' at this site", pond);
    if (strlen(rule) == 0 || strlen(rule) >= 64)
        return hs_web_error(c, 400, "rule", "rule: 1 to 63 characters");
    json_t *body = c->req->body_len ? hs_web_body_json(c, &res) : json_object();
    if (body == NULL)
        return res;
    const char *note;
    if (only_keys(c, body, keys, &res) != 0 || note_of(c, body, &note, &res) != 0) {
        json_decref(body);
        return res;
    }
    json_t *d = json_object_get(body, "duration_s");
    json_int_t secs = json_is_integer(d) ? json_integer_value(d) : -1;
    if (!unshelve && (secs < 60 || secs > SHELVE_MAX_S)) {
        json_decref(body);
        return hs_web_error(c, 400, "duration_s", "duration_s: whole seconds from 60 to %d",
                            SHELVE_MAX_S);
    }
    if (unshelve && d != NULL) {
        json_decref(body);
        return hs_web_error(c, 400, "duration_s", "duration_s: not taken by unshelve");
    }
    json_t *cmd = json_pack("{s:s, s:s, s:s}", "command", unshelve ? "unshelve" : "shelve",
                            "pond", pond, "rule", rule);
    if (!unshelve)
        json_object_set_new(cmd, "duration_s", json_integer(secs));
    if (note)
        json_object_set_new(cmd, "note", json_string(note));
    json_decref(body);
    return queue_command(c, cmd);
}

enum MHD_Result hs_web_api_hydrometer(struct hs_web_call *c)
{
    static const char *const keys[] = {"pond", "specific_gravity", "reference_temperature_c",
                                       "note", NULL};
    struct hs_web *w = c->web;
    enum MHD_Result res;
    json_t *body = hs_web_body_json(c, &res);
    if (body == NULL)
        return res;
    const char *note;
    if (only_keys(c, body, keys, &res) != 0 || note_of(c, body, &note, &res) != 0) {
        json_decref(body);
        return res;
    }
    const char *pond = json_string_value(json_object_get(body, "pond"));
    json_t *sg = json_object_get(body, "specific_gravity");
    json_t *tref = json_object_get(body, "reference_temperature_c");
    hs_calibration_row row = {
        .t_ms = hs_web_wall_ms(),
        .pond = pond,
        .specific_gravity = json_is_number(sg) ? json_number_value(sg) : NAN,
        .hydrometer_temperature_c = NAN,
        .reference_temperature_c = w->site.site.reference_temperature_c,
        .conductivity_ms_cm = NAN,
        .temperature_c = NAN,
        .operator_name = c->session->user,
        .note = note,
    };
    if (pond == NULL || hs_site_pond(&w->site, pond) < 0)
        res = hs_web_error(c, 400, "pond", "pond: name a pond of this site");
    /* SG 0.99 to 1.40: water to past bischofite, as `halostage calibrate`
     * takes it (common practice, no source) */
    else if (!(row.specific_gravity >= 0.99 && row.specific_gravity <= 1.40))
        res = hs_web_error(c, 400, "specific_gravity",
                           "specific_gravity: a number from 0.99 to 1.40");
    else if (tref != NULL && !(json_is_number(tref) && json_number_value(tref) >= 0 &&
                               json_number_value(tref) <= 40))
        res = hs_web_error(c, 400, "reference_temperature_c",
                           "reference_temperature_c: a number from 0 to 40 degC");
    else {
        if (tref != NULL)
            row.reference_temperature_c = json_number_value(tref);
        if (hs_store_add_calibration(w->store, &row) != 0 || hs_store_flush(w->store) != 0)
            res = hs_web_error(c, 503, NULL, "cannot record the reading: %s",
                               hs_store_error(w->store));
        else
            res = hs_web_json(c, 201, json_pack("{s:b, s:s, s:f, s:f, s:I, s:s}", "ok", 1,
                                                "pond", pond, "specific_gravity",
                                                row.specific_gravity,
                                                "reference_temperature_c",
                                                row.reference_temperature_c, "time_ms",
                                                (json_int_t)row.t_ms, "operator",
                                                c->session->user));
    }
    json_decref(body);
    return res;
}
