/* The outbox pump (see hs_publish.h). Rows leave the outbox in id order and
 * are deleted only when the broker acknowledged them in the connection they
 * were sent in. After a reconnect or a failed publish, every row still in
 * the outbox is sent again from the oldest: delivery is at least once, and
 * a subscriber sees the first copy of each message in id order (alarms
 * carry event_id to drop repeats).
 *
 * Why first copies stay in order: within one connection the broker takes
 * the rows in the order they were sent; the link never carries a publish
 * from one connection into the next (hp_mqtt.h, sessions); and an answer
 * about a publish of an earlier session (acknowledged or failed) is not
 * taken for one of the current session, where the same row may be in
 * flight again.
 *
 * Disk: an acknowledgement deletes its row inside the store's open batch
 * and does not commit it; the next commit (the runtime's commit_interval,
 * or an urgent row) carries it. A crash before that commit only sends the
 * row again: a duplicate, which at-least-once delivery allows. */
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_log.h"
#include "hs_publish.h"

/* While the broker is away, one line says how the attempts go at most this
 * often (the first failure is told at once). */
#define RETRY_LOG_EVERY_MS 60000

#define WINDOW_MAX 1024

/* A message the broker refuses (an MQTT 5 reason code: not authorized,
 * packet too large, ...) stays in the outbox and is sent again after a wait
 * that doubles from the first to the last of these, instead of at once in
 * a loop that would take the broker's refusal hundreds of times a second. */
#define REFUSED_WAIT_FIRST_MS 1000
#define REFUSED_WAIT_LAST_MS 60000
struct hs_publisher {
    hs_store *st;
    hp_mqtt *link;
    hs_topics topics;
    int window;
    int64_t inflight[WINDOW_MAX]; /* row ids sent and not yet acknowledged */
    int ninflight;
    int64_t last_sent;            /* highest row id sent since the rewind */
    int64_t session;              /* the link's session while connected (hp_mqtt.h) */
    int64_t *done;                /* acknowledged ids waiting for deletion */
    size_t ndone, capdone;
    int connected;
    int rewind;                   /* send again from the oldest row */
    int64_t rewind_at_ms;         /* monotonic; not before (after a refusal) */
    int64_t refused_wait_ms;      /* the current wait after a refusal; 0: none */
    int64_t refused_id;           /* the row the broker refused last */
    hs_publisher_stats stats;
    hs_inbound_fn inbound;
    void *inbound_ctx;
    int goodbye_acked;            /* the offline status was acknowledged */
    /* the link's story for the log: when the broker went away, how many
     * attempts since, when the next line about them may be written */
    int ever_connected;
    int64_t lost_mono_ms;
    long attempts;
    int64_t next_retry_log_ms;
};

static int64_t mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

/* Broker loss, attempts (rate-limited) and return, at notice level. */
static void log_link(hs_publisher *p, int connected, const char *reason)
{
    int64_t now = mono_ms();
    if (connected) {
        if (p->lost_mono_ms > 0)
            hs_log(HSP_LOG_NOTICE, "MQTT: broker back after %.1f s (%ld failed attempts)",
                   (double)(now - p->lost_mono_ms) / 1000.0, p->attempts);
        else
            hs_log(HSP_LOG_NOTICE, "MQTT: connected to the broker");
        p->lost_mono_ms = 0;
        p->attempts = 0;
        p->ever_connected = 1;
        return;
    }
    if (p->connected || p->lost_mono_ms == 0) { /* the first word of a loss */
        hs_log(HSP_LOG_NOTICE, "MQTT: %s the broker: %s; reconnecting",
               p->connected || p->ever_connected ? "lost" : "cannot reach",
               reason ? reason : "no reason given");
        p->lost_mono_ms = now;
        p->attempts = p->connected ? 0 : 1;
        p->next_retry_log_ms = now + RETRY_LOG_EVERY_MS;
        return;
    }
    p->attempts++;
    if (now >= p->next_retry_log_ms) {
        hs_log(HSP_LOG_NOTICE, "MQTT: still no broker after %.0f s, %ld attempts (last: %s)",
               (double)(now - p->lost_mono_ms) / 1000.0, p->attempts,
               reason ? reason : "no reason given");
        p->next_retry_log_ms = now + RETRY_LOG_EVERY_MS;
    }
}

#define GOODBYE_TAG (-1) /* tag of the offline status; row ids are positive */

hs_publisher *hs_publisher_new(hs_store *st, hp_mqtt *link, const hs_topics *t, int window)
{
    if (st == NULL || link == NULL || t == NULL || window < 0 || window > WINDOW_MAX)
        return NULL;
    hs_publisher *p = calloc(1, sizeof *p);
    if (p == NULL)
        return NULL;
    p->st = st;
    p->link = link;
    p->topics = *t;
    p->window = window ? window : 64;
    return p;
}

void hs_publisher_free(hs_publisher *p)
{
    if (p) {
        free(p->done);
        free(p);
    }
}

void hs_publisher_stats_get(const hs_publisher *p, hs_publisher_stats *out)
{
    *out = p->stats;
    out->connected = p->connected;
    out->in_flight = p->ninflight;
}

static void forget_inflight(hs_publisher *p)
{
    p->ninflight = 0;
    p->last_sent = 0;
}

static int remove_inflight(hs_publisher *p, int64_t id)
{
    for (int i = 0; i < p->ninflight; i++)
        if (p->inflight[i] == id) {
            memmove(&p->inflight[i], &p->inflight[i + 1],
                    (size_t)(p->ninflight - i - 1) * sizeof p->inflight[0]);
            p->ninflight--;
            return 1;
        }
    return 0;
}

static void mark_done(hs_publisher *p, int64_t id)
{
    if (p->ndone == p->capdone) {
        size_t cap = p->capdone ? p->capdone * 2 : 256;
        int64_t *more = realloc(p->done, cap * sizeof *more);
        if (more == NULL) {
            p->rewind = 1; /* it will be sent again and acknowledged again */
            return;
        }
        p->done = more;
        p->capdone = cap;
    }
    p->done[p->ndone++] = id;
}

static int publish_gateway(hs_publisher *p, int online, int64_t tag)
{
    char topic[HS_TOPIC_MAX];
    int rc = -1;
    char *text = hs_gateway_payload(&p->topics, online);
    if (text && hs_topic(topic, sizeof topic, &p->topics, "gateway", NULL, NULL) == 0)
        rc = hp_mqtt_publish(p->link, topic, text, strlen(text), 1, 1, tag);
    free(text);
    return rc;
}

static void on_event(void *ctx, const hp_mqtt_event *ev)
{
    hs_publisher *p = ctx;
    switch (ev->type) {
    case HP_MQTT_CONNECTED:
        log_link(p, 1, NULL);
        p->connected = 1;
        p->session = ev->session;
        p->stats.connects++;
        forget_inflight(p);
        publish_gateway(p, 1, 0); /* tag 0: not an outbox row */
        break;
    case HP_MQTT_DISCONNECTED:
        log_link(p, 0, ev->reason);
        p->connected = 0;
        forget_inflight(p);
        break;
    case HP_MQTT_DELIVERED:
        if (ev->session != p->session) {
            /* of a connection that is over: the row is sent again (or was
             * already) in this one and answered there */
            if (ev->tag > 0)
                p->stats.stale++;
            break;
        }
        if (ev->tag == GOODBYE_TAG)
            p->goodbye_acked = 1;
        if (ev->tag > 0) {
            remove_inflight(p, ev->tag);
            mark_done(p, ev->tag);
            p->stats.delivered++;
            if (ev->tag == p->refused_id)
                p->refused_wait_ms = 0; /* taken at last */
        }
        break;
    case HP_MQTT_FAILED:
        if (ev->tag <= 0)
            break;
        if (ev->session != p->session) {
            p->stats.stale++; /* the reconnect already sends it again */
            break;
        }
        p->stats.failed++;
        if (ev->reason_code >= 0x80) {
            p->stats.refused++;
            p->refused_id = ev->tag;
        }
        if (ev->reason_code >= 0x80 && mono_ms() >= p->rewind_at_ms) {
            /* the first refusal of a round (those of the same window wait
             * together): a longer wait, one line */
            p->refused_wait_ms = p->refused_wait_ms == 0 ? REFUSED_WAIT_FIRST_MS
                                 : p->refused_wait_ms * 2 > REFUSED_WAIT_LAST_MS
                                     ? REFUSED_WAIT_LAST_MS
                                     : p->refused_wait_ms * 2;
            p->rewind_at_ms = mono_ms() + p->refused_wait_ms;
            hs_log(HSP_LOG_WARNING,
                   "MQTT: the broker refused outbox message %lld (%s); it stays queued and "
                   "is sent again in %.0f s",
                   (long long)ev->tag, ev->reason ? ev->reason : "no reason given",
                   (double)p->refused_wait_ms / 1000.0);
        }
        if (remove_inflight(p, ev->tag))
            p->rewind = 1;
        break;
    case HP_MQTT_MESSAGE:
        if (p->inbound)
            p->inbound(p->inbound_ctx, ev->topic, ev->payload, ev->payload_len, ev->oversize,
                       ev->retained);
        break;
    }
}

static int send_row(void *ctx, const hs_outbox_msg *m)
{
    hs_publisher *p = ctx;
    if (hp_mqtt_publish(p->link, m->topic, m->payload, m->payload_len, m->qos, m->retained,
                        m->id) != 0)
        return 1; /* not connected any more: stop; the rest waits */
    p->inflight[p->ninflight++] = m->id;
    p->last_sent = m->id;
    p->stats.sent++;
    return p->ninflight >= p->window;
}

int hs_publisher_pump(hs_publisher *p, int wait_ms, hs_inbound_fn fn, void *ctx)
{
    p->inbound = fn;
    p->inbound_ctx = ctx;
    hp_mqtt_poll(p->link, wait_ms, on_event, p);
    if (p->ndone > 0) {
        if (hs_store_outbox_done(p->st, p->done, p->ndone) != 0)
            return -1;
        p->ndone = 0;
    }
    if (p->rewind) {
        /* Wait for what is in flight to settle, then start from the oldest. */
        if (p->ninflight > 0 || mono_ms() < p->rewind_at_ms)
            return 0;
        p->rewind = 0;
        p->last_sent = 0;
    }
    if (!p->connected || !hp_mqtt_connected(p->link))
        return 0;
    int room = p->window - p->ninflight;
    if (room <= 0)
        return 0;
    return hs_store_outbox_peek(p->st, p->last_sent, room, send_row, p) < 0 ? -1 : 0;
}

int hs_publisher_goodbye(hs_publisher *p, int timeout_ms)
{
    p->inbound = NULL; /* commands that arrive now are left unanswered */
    p->goodbye_acked = 0;
    if (!p->connected || publish_gateway(p, 0, GOODBYE_TAG) != 0)
        return -1;
    for (int waited = 0; !p->goodbye_acked && p->connected && waited < timeout_ms; waited += 20)
        hp_mqtt_poll(p->link, 20, on_event, p);
    if (p->ndone > 0 && hs_store_outbox_done(p->st, p->done, p->ndone) == 0)
        p->ndone = 0;
    return p->goodbye_acked ? 0 : -1;
}
