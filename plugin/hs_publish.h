/* Publishing: what goes into the MQTT outbox (topics and JSON payloads per
 * README.md) and the pump that moves outbox rows to the broker.
 *
 * Topics (prefix "halostage" unless configured):
 *   <prefix>/<site>/gateway              retained {"online": bool, ...}; the will sets false
 *   <prefix>/<site>/pond/<pond>/state    retained pond-state document (hs_pond_doc.h)
 *   <prefix>/<site>/alarm/<pond>/<rule>  QoS 1 alarm transitions with event_id
 *   <prefix>/<site>/transfer/<name>      retained current advice with reasons
 *   <prefix>/<site>/command/<verb>       inbound (see hs_command.h)
 *   <prefix>/<site>/reply                QoS 1 replies to accepted commands
 *   <prefix>/<site>/error                QoS 1 replies to refused commands
 *
 * Ownership: the publisher borrows the store and the link; both must outlive
 * it. Everything runs on the owner's thread.
 * Error convention: 0 on success, -1 on failure (the store's error text
 * says why, see hs_store_error()). */
#ifndef HS_PUBLISH_H
#define HS_PUBLISH_H

#include <stddef.h>
#include <stdint.h>

#include <jansson.h>

#include "hc_state.h"
#include "hp_mqtt.h"
#include "hs_alarm.h"
#include "hs_store.h"

#define HS_TOPIC_MAX 256

/* Where messages go: shared by the builders below. */
typedef struct {
    char prefix[64];
    char site[64];
} hs_topics;

/* Fills t; -1 when a name is empty, too long, or holds '/', '+' or '#'. */
int hs_topics_init(hs_topics *t, const char *prefix, const char *site);
/* 1 when name can be one topic level (no '/', '+', '#', not empty, short). */
int hs_topic_level_ok(const char *name);
/* "<prefix>/<site>/<what>[/<a>[/<b>]]"; -1 when it does not fit or a level
 * is not allowed. */
int hs_topic(char *buf, size_t len, const hs_topics *t, const char *what, const char *a,
             const char *b);

/* The command subscription, "<prefix>/<site>/command/#". 0 / -1. */
int hs_topic_commands(char *buf, size_t len, const hs_topics *t);

/* "2026-01-01T00:00:00.000Z" into buf (at least 32 bytes). */
void hs_iso8601_ms(char *buf, size_t len, int64_t t_ms);

/* JSON of an alarm transition. New reference. */
json_t *hs_alarm_payload(const hs_alarm_event *ev);

/* Serialises payload (hs_doc_dumps) and puts it in the outbox. The pond
 * state payload is the pond-state document (hs_pond_doc.h). */
int hs_enqueue_json(hs_store *st, hs_msg_kind kind, const char *topic, json_t *payload,
                    int retained);

/* An hs_alarm_emit_fn context that journals every transition and queues its
 * MQTT message in the same batch (so both or neither survive a crash). */
typedef struct {
    hs_store *store;
    const hs_topics *topics;
    int journal_only;              /* 1: MQTT off, journal without queueing */
    int errors;                    /* failed journal/queue writes */
} hs_alarm_sink;
void hs_alarm_sink_emit(void *sink, const hs_alarm_event *ev);

/* ---- the pump ---- */

typedef struct hs_publisher hs_publisher;

/* window: outbox rows in flight at once (1..1024; 0 for 64). NULL on bad
 * arguments or no memory. */
hs_publisher *hs_publisher_new(hs_store *st, hp_mqtt *link, const hs_topics *t, int window);
void hs_publisher_free(hs_publisher *p);

/* An inbound message on the command subscription; retained: it carried
 * the retain flag (a stored message, not one just sent). */
typedef void (*hs_inbound_fn)(void *ctx, const char *topic, const void *payload, size_t len,
                              int oversize, int retained);

/* Waits up to wait_ms for link events, deletes acknowledged rows, sends the
 * next rows in order and hands inbound messages to fn. It logs (notice) the
 * broker's loss, the reconnect attempts (at most a line a minute) and its
 * return. On every connect it
 * publishes the retained gateway status (online) directly, and re-sends
 * unacknowledged rows from the oldest. 0 / -1 (store error). */
int hs_publisher_pump(hs_publisher *p, int wait_ms, hs_inbound_fn fn, void *ctx);

/* Before a clean shutdown: publishes the retained gateway status offline
 * (a clean disconnect does not fire the last will) and waits up to
 * timeout_ms for the broker to acknowledge it. Returns 0 when acknowledged,
 * -1 otherwise (not connected or no answer in time). */
int hs_publisher_goodbye(hs_publisher *p, int timeout_ms);

typedef struct {
    int connected;
    int64_t sent, delivered, failed, connects;
    int64_t stale;     /* answers about publishes of an earlier connection, ignored */
    int64_t refused;   /* publishes the broker refused (kept, sent again after a wait) */
    int64_t in_flight;
} hs_publisher_stats;
void hs_publisher_stats_get(const hs_publisher *p, hs_publisher_stats *out);

/* The retained gateway status payload; the will uses online = false. Caller
 * frees the string. */
char *hs_gateway_payload(const hs_topics *t, int online);

#endif
