/* Operator commands: acknowledge, shelve and unshelve alarms, from the MQTT
 * command topic or queued by `halostage ack` in the store. Validated
 * strictly: a size limit, a JSON object with only the known keys and the
 * right types, known pond/rule/event. Every command gets a reply; a refused
 * one goes to the error topic, an accepted one to the reply topic.
 *
 * Payloads (all keys are listed; "operator" is required for accountability):
 *   command/ack      {"event_id": N} or {"pond": P[, "rule": R]},
 *                    "operator": NAME[, "note": TEXT][, "request_id": ID]
 *   command/shelve   {"pond": P, "rule": R, "duration_s": N, "operator": NAME,
 *                    "note": TEXT, "request_id": ID}   (note optional)
 *   command/unshelve {"pond": P, "rule": R, "operator": NAME[, ...]}
 * Queued commands carry the verb in "command".
 *
 * Over MQTT every command also carries "request_id" and "time" (UTC ISO
 * 8601). One that arrives retained is never applied (answered once on the
 * error topic); one older than max_age_ms (or as far ahead) is refused as
 * stale; a request_id seen before gets its first answer again with
 * "repeat": true and is not applied again (ids are kept 30 days).
 *
 * Ownership: hs_commands borrows everything it points to. One thread. */
#ifndef HS_COMMAND_H
#define HS_COMMAND_H

#include <stddef.h>
#include <stdint.h>

#include <jansson.h>

#include "hs_alarm.h"
#include "hs_publish.h"
#include "hs_store.h"

#define HS_COMMAND_MAX_BYTES 4096 /* larger payloads are refused unread */
#define HS_COMMAND_MAX_AGE_MS (5 * 60 * 1000) /* default of max_age_ms */

typedef struct {
    hs_alarm_engine *engine;
    hs_alarm_sink *sink;      /* where transitions go (journal + outbox) */
    const hs_topics *topics;
    int64_t (*clock_ms)(void); /* wall clock, ms since the epoch; NULL: the system's */
    int64_t max_age_ms;       /* MQTT commands older than this are stale; 0: the default */
    int dry_run;              /* internal: validate without applying */
    int64_t accepted, refused;
} hs_commands;

/* Applies one command; verb is "ack", "shelve" or "unshelve". Returns the
 * reply object (new reference, never NULL unless out of memory) with "ok"
 * true or false; *ok mirrors it. */
json_t *hs_command_apply(hs_commands *c, const char *verb, const void *payload, size_t len,
                         int oversize, int *ok);

/* hs_inbound_fn for the publisher: topic "<prefix>/<site>/command/<verb>";
 * the reply is queued in the outbox (QoS 1) on .../reply or .../error. */
void hs_command_on_message(void *ctx, const char *topic, const void *payload, size_t len,
                           int oversize, int retained);

/* "2026-03-01T06:00:00Z" or with milliseconds ("...:00.250Z") -> ms since
 * the epoch. 0 / -1. */
int hs_command_parse_time(const char *text, int64_t *t_ms);

/* hs_command_fn for hs_store_command_take: the JSON holds "command": VERB.
 * Returns the reply text (malloc'ed); the reply is also published. */
char *hs_command_from_queue(void *ctx, int64_t id, const char *json);

#endif
