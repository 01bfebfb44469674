/* MQTT link on paho-mqtt-c async (see hp_mqtt.h). Ownership: hp_mqtt owns
 * the MQTTAsync handle, copies of every option string, and the event queue;
 * each publish allocates a small context that its callback frees.
 *
 * One paho handle serves one connection. paho keeps a publish that it
 * accepted but had not yet written when the connection dropped in its
 * command queue, and writes it at the head of the next connection, ahead of
 * whatever the owner sends again from its own queue: a subscriber then sees
 * a later message before an earlier one. So after a connection ends, the
 * handle is destroyed (paho fails what it still held, each publish
 * reported FAILED with its old session) and a new one makes the next
 * attempt. */
#include <errno.h>
#include <pthread.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <MQTTAsync.h>

#include "hp_mqtt.h"

#define QUEUE_MAX 65536 /* events waiting for poll; inbound beyond it dropped */

struct event_node {
    struct event_node *next;
    hp_mqtt_event ev;
    int64_t handle_no;    /* the paho handle it came from */
    char *topic;
    void *payload;
    char *reason;
};

/* The context of one paho handle's callbacks: which handle spoke. */
struct link_handle {
    struct hp_mqtt *m;
    int64_t no;
};

struct hp_mqtt {
    MQTTAsync client;
    struct link_handle *handle; /* client's callback context; freed after client */
    int64_t handle_no;    /* number of the current handle (under lock) */
    char paho_uri[512];   /* the uri in paho's spelling (tcp://, ssl://) */
    int client_used;      /* client has been connected: replace it before the next attempt */
    int64_t session;      /* connections handed to the owner so far (owner's thread) */
    int owner_connected;  /* the owner was handed CONNECTED and no DISCONNECTED since */
    hp_mqtt_options opt;  /* strings point into the copies below */
    char *copies[12];
    void *will_copy;      /* will_len bytes */
    int tls;
    pthread_mutex_t lock;
    pthread_cond_t ready;
    struct event_node *head, *tail;
    size_t queued;
    uint64_t dropped;
    int connected;        /* under lock */
    /* Reconnecting is ours, on the owner's thread (paho's own retries are
     * checked about once a second and say nothing of each attempt): after a
     * loss or a failed attempt the next one is due at next_attempt_ms
     * (monotonic; 0: none due), the wait doubling from min_retry_s up to
     * max_retry_s. */
    int started;
    int64_t next_attempt_ms;
    int64_t retry_ms;
    char err[256];
};

static int64_t mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

struct pub_ctx {
    hp_mqtt *m;
    int64_t tag;
    int64_t session; /* the connection it was handed to */
};

static char *keep(hp_mqtt *m, int slot, const char *s)
{
    if (s == NULL)
        return NULL;
    m->copies[slot] = strdup(s);
    return m->copies[slot];
}

/* Appends an event (called from paho's threads and the owner's); handle_no:
 * the handle it concerns, -1 for the current one. */
static void push_session(hp_mqtt *m, int64_t handle_no, hp_mqtt_event_type type, int64_t tag,
                         int64_t session, int reason_code, const char *topic,
                         const void *payload, size_t len, int oversize, int retained,
                         const char *reason)
{
    struct event_node *n = calloc(1, sizeof *n);
    if (n == NULL)
        return;
    n->ev.reason_code = reason_code;
    n->ev.retained = retained;
    n->ev.type = type;
    n->ev.tag = tag;
    n->ev.session = session;
    n->ev.payload_len = len;
    n->ev.oversize = oversize;
    if (topic)
        n->topic = strdup(topic);
    if (payload && len) {
        n->payload = malloc(len);
        if (n->payload)
            memcpy(n->payload, payload, len);
    } else if (payload) {
        n->payload = malloc(1);
    }
    if (reason)
        n->reason = strdup(reason);
    pthread_mutex_lock(&m->lock);
    n->handle_no = handle_no < 0 ? m->handle_no : handle_no;
    if (n->handle_no != m->handle_no)
        ; /* a replaced handle says nothing about the link */
    else if (type == HP_MQTT_CONNECTED)
        m->connected = 1;
    else if (type == HP_MQTT_DISCONNECTED)
        m->connected = 0;
    if (type == HP_MQTT_MESSAGE && m->queued >= QUEUE_MAX) {
        m->dropped++;
        pthread_mutex_unlock(&m->lock);
        free(n->topic);
        free(n->payload);
        free(n->reason);
        free(n);
        return;
    }
    if (m->tail)
        m->tail->next = n;
    else
        m->head = n;
    m->tail = n;
    m->queued++;
    pthread_cond_signal(&m->ready);
    pthread_mutex_unlock(&m->lock);
}

/* An event of the current handle. */
static void push(hp_mqtt *m, hp_mqtt_event_type type, int64_t tag, const char *topic,
                 const void *payload, size_t len, int oversize, int retained, const char *reason)
{
    push_session(m, -1, type, tag, 0, 0, topic, payload, len, oversize, retained, reason);
}

/* An event from a paho callback of handle h. */
static void push_from(struct link_handle *h, hp_mqtt_event_type type, const char *topic,
                      const void *payload, size_t len, int oversize, int retained,
                      const char *reason)
{
    push_session(h->m, h->no, type, 0, 0, 0, topic, payload, len, oversize, retained, reason);
}

static void on_connection_lost(void *ctx, char *cause)
{
    push_from(ctx, HP_MQTT_DISCONNECTED, NULL, NULL, 0, 0, 0, cause ? cause : "connection lost");
}

/* MQTT 5: the broker said goodbye (a DISCONNECT packet, e.g. when it shuts
 * down); paho reports that here, not as a lost connection. */
static void on_disconnected(void *ctx, MQTTProperties *props, enum MQTTReasonCodes rc)
{
    (void)props;
    char why[96];
    snprintf(why, sizeof why, "the broker disconnected us (reason %d: %s)", (int)rc,
             MQTTReasonCode_toString(rc));
    push_from(ctx, HP_MQTT_DISCONNECTED, NULL, NULL, 0, 0, 0, why);
}

static int on_message(void *ctx, char *topic, int topic_len, MQTTAsync_message *msg)
{
    struct link_handle *h = ctx;
    hp_mqtt *m = h->m;
    char name[512];
    size_t tl = topic_len > 0 ? (size_t)topic_len : strlen(topic);
    if (tl >= sizeof name)
        tl = sizeof name - 1; /* longer than any topic we subscribe to */
    memcpy(name, topic, tl);
    name[tl] = '\0';
    size_t len = msg->payloadlen > 0 ? (size_t)msg->payloadlen : 0;
    int oversize = len > m->opt.max_inbound;
    int retained = msg->retained != 0;
    push_from(h, HP_MQTT_MESSAGE, name, oversize ? NULL : (msg->payload ? msg->payload : ""), len,
              oversize, retained, NULL);
    MQTTAsync_freeMessage(&msg);
    MQTTAsync_free(topic);
    return 1;
}

static void on_connected(void *ctx, char *cause)
{
    (void)cause;
    push_from(ctx, HP_MQTT_CONNECTED, NULL, NULL, 0, 0, 0, NULL);
}

static void on_connect_failure(void *ctx, MQTTAsync_failureData5 *resp)
{
    char why[200];
    snprintf(why, sizeof why, "connect failed (code %d, reason %d)%s%s", resp ? resp->code : 0,
             resp ? (int)resp->reasonCode : 0, resp && resp->message ? ": " : "",
             resp && resp->message ? resp->message : "");
    push_from(ctx, HP_MQTT_DISCONNECTED, NULL, NULL, 0, 0, 0, why);
}

static void on_publish_ok(void *ctx, MQTTAsync_successData5 *resp)
{
    struct pub_ctx *p = ctx;
    (void)resp;
    push_session(p->m, -1, HP_MQTT_DELIVERED, p->tag, p->session, 0, NULL, NULL, 0, 0, 0, NULL);
    free(p);
}

static void on_publish_fail(void *ctx, MQTTAsync_failureData5 *resp)
{
    struct pub_ctx *p = ctx;
    char why[128];
    int code = resp ? (int)resp->reasonCode : 0;
    if (code >= 0x80) {
        const char *text = MQTTReasonCode_toString((enum MQTTReasonCodes)code);
        snprintf(why, sizeof why, "reason %d: %s", code, text ? text : "unknown");
    } else
        snprintf(why, sizeof why, "publish failed (code %d)", resp ? resp->code : 0);
    push_session(p->m, -1, HP_MQTT_FAILED, p->tag, p->session, code >= 0x80 ? code : 0, NULL,
                 NULL, 0, 0, 0, why);
    free(p);
}

static int fail(char *err, size_t errlen, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
static int fail(char *err, size_t errlen, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    if (err && errlen)
        vsnprintf(err, errlen, fmt, ap);
    va_end(ap);
    return -1;
}

/* A fresh paho handle for m (m->client), with our callbacks. */
static int create_client(hp_mqtt *m, char *err, size_t errlen)
{
    struct link_handle *h = malloc(sizeof *h);
    if (h == NULL)
        return fail(err, errlen, "mqtt: out of memory");
    pthread_mutex_lock(&m->lock);
    h->m = m;
    h->no = ++m->handle_no;
    pthread_mutex_unlock(&m->lock);
    MQTTAsync_createOptions co = MQTTAsync_createOptions_initializer5;
    co.sendWhileDisconnected = 0; /* our outbox holds messages, not paho */
    co.maxBufferedMessages = m->opt.max_inflight + 16;
    int rc = MQTTAsync_createWithOptions(&m->client, m->paho_uri, m->opt.client_id,
                                         MQTTCLIENT_PERSISTENCE_NONE, NULL, &co);
    if (rc != MQTTASYNC_SUCCESS) {
        m->client = NULL;
        free(h);
        return fail(err, errlen, "mqtt: cannot create a client for %s (code %d)", m->opt.uri,
                    rc);
    }
    m->handle = h;
    m->client_used = 0;
    MQTTAsync_setCallbacks(m->client, h, on_connection_lost, on_message, NULL);
    MQTTAsync_setConnected(m->client, h, on_connected);
    MQTTAsync_setDisconnected(m->client, h, on_disconnected);
    return 0;
}

/* After a connection ended: a new handle, so that nothing the old one still
 * held is written into the next connection (see the top of this file).
 * Destroying it fails every publish it held (FAILED events, old session). */
static int replace_client(hp_mqtt *m, char *err, size_t errlen)
{
    if (m->client != NULL)
        MQTTAsync_destroy(&m->client); /* no callback of it runs after this */
    m->client = NULL;
    free(m->handle);
    m->handle = NULL;
    pthread_mutex_lock(&m->lock);
    m->connected = 0;
    pthread_mutex_unlock(&m->lock);
    return create_client(m, err, errlen);
}

hp_mqtt *hp_mqtt_new(const hp_mqtt_options *o, char *err, size_t errlen)
{
    if (o == NULL || o->uri == NULL || o->client_id == NULL || *o->client_id == '\0') {
        fail(err, errlen, "mqtt: uri and client id are required");
        return NULL;
    }
    int tls = strncmp(o->uri, "mqtts://", 8) == 0 || strncmp(o->uri, "ssl://", 6) == 0;
    if (!tls && strncmp(o->uri, "mqtt://", 7) != 0 && strncmp(o->uri, "tcp://", 6) != 0) {
        fail(err, errlen, "mqtt: uri '%s' must start with mqtt:// or mqtts://", o->uri);
        return NULL;
    }
    if (tls && (o->ca_file == NULL || *o->ca_file == '\0')) {
        fail(err, errlen, "mqtt: %s needs a CA file to verify the broker", o->uri);
        return NULL;
    }
    if ((o->cert_file == NULL) != (o->key_file == NULL)) {
        fail(err, errlen, "mqtt: a client certificate needs its key, and the other way round");
        return NULL;
    }
    hp_mqtt *m = calloc(1, sizeof *m);
    if (m == NULL) {
        fail(err, errlen, "mqtt: out of memory");
        return NULL;
    }
    pthread_mutex_init(&m->lock, NULL);
    pthread_cond_init(&m->ready, NULL);
    m->tls = tls;
    m->opt = *o;
    m->opt.uri = keep(m, 0, o->uri);
    m->opt.client_id = keep(m, 1, o->client_id);
    m->opt.username = keep(m, 2, o->username);
    m->opt.password = keep(m, 3, o->password);
    m->opt.ca_file = keep(m, 4, o->ca_file);
    m->opt.cert_file = keep(m, 5, o->cert_file);
    m->opt.key_file = keep(m, 6, o->key_file);
    m->opt.will_topic = keep(m, 7, o->will_topic);
    int binary_will = o->will_payload != NULL && o->will_len > 0;
    m->opt.will_payload = keep(m, 8, binary_will ? NULL : o->will_payload);
    m->opt.subscribe = keep(m, 9, o->subscribe);
    m->opt.subscribe_extra[0] = keep(m, 10, o->subscribe_extra[0]);
    m->opt.subscribe_extra[1] = keep(m, 11, o->subscribe_extra[1]);
    const char *given[12] = {o->uri, o->client_id, o->username, o->password, o->ca_file,
                             o->cert_file, o->key_file, o->will_topic,
                             binary_will ? NULL : o->will_payload, o->subscribe,
                             o->subscribe_extra[0], o->subscribe_extra[1]};
    if (binary_will) {
        /* a binary will (a Sparkplug NDEATH) may hold NUL bytes: copied by length */
        m->will_copy = malloc(o->will_len);
        if (m->will_copy == NULL) {
            fail(err, errlen, "mqtt: out of memory");
            hp_mqtt_free(m, 0);
            return NULL;
        }
        memcpy(m->will_copy, o->will_payload, o->will_len);
        m->opt.will_payload = m->will_copy;
    }
    for (int i = 0; i < 12; i++)
        if (given[i] != NULL && m->copies[i] == NULL) {
            fail(err, errlen, "mqtt: out of memory");
            hp_mqtt_free(m, 0);
            return NULL;
        }
    if (m->opt.keepalive_s <= 0)
        m->opt.keepalive_s = 30;
    if (m->opt.max_inflight <= 0)
        m->opt.max_inflight = 64;
    if (m->opt.min_retry_s <= 0)
        m->opt.min_retry_s = 1;
    if (m->opt.max_retry_s < m->opt.min_retry_s)
        m->opt.max_retry_s = m->opt.min_retry_s > 60 ? m->opt.min_retry_s : 60;
    if (m->opt.max_inbound == 0)
        m->opt.max_inbound = 4096;
    /* paho wants tcp:// and ssl:// spellings. */
    snprintf(m->paho_uri, sizeof m->paho_uri, "%s://%s", tls ? "ssl" : "tcp",
             strstr(o->uri, "://") + 3);
    if (create_client(m, err, errlen) != 0) {
        hp_mqtt_free(m, 0);
        return NULL;
    }
    return m;
}

static int64_t retry_min_ms(const hp_mqtt *m)
{
    return m->opt.min_retry_ms > 0 ? m->opt.min_retry_ms : (int64_t)m->opt.min_retry_s * 1000;
}

static int64_t retry_max_ms(const hp_mqtt *m)
{
    int64_t max = m->opt.max_retry_ms > 0 ? m->opt.max_retry_ms
                                          : (int64_t)m->opt.max_retry_s * 1000;
    return max < retry_min_ms(m) ? retry_min_ms(m) : max;
}

/* One connect attempt; its outcome comes back as an event. */
static int connect_once(hp_mqtt *m, char *err, size_t errlen)
{
    MQTTAsync_connectOptions co = MQTTAsync_connectOptions_initializer5;
    MQTTAsync_willOptions will = MQTTAsync_willOptions_initializer;
    MQTTAsync_SSLOptions ssl = MQTTAsync_SSLOptions_initializer;
    /* MQTT 5: the broker is told the largest packet we take, so a huge
     * publish is dropped at the broker instead of being read into memory
     * here (paho reads a whole packet before it looks at it). */
    MQTTProperties props = MQTTProperties_initializer;
    MQTTProperty limit = {.identifier = MQTTPROPERTY_CODE_MAXIMUM_PACKET_SIZE};
    limit.value.integer4 = (unsigned)hp_mqtt_packet_limit(&m->opt);
    if (MQTTProperties_add(&props, &limit) != 0)
        return fail(err, errlen, "mqtt: out of memory");
    co.connectProperties = &props;
    co.keepAliveInterval = m->opt.keepalive_s;
    co.cleanstart = 1;
    co.MQTTVersion = MQTTVERSION_5;
    co.maxInflight = m->opt.max_inflight;
    co.automaticReconnect = 0; /* see next_attempt_ms */
    co.connectTimeout = 10;
    co.username = m->opt.username;
    co.password = m->opt.password;
    co.onFailure5 = on_connect_failure;
    co.context = m->handle;
    if (m->opt.will_topic) {
        will.topicName = m->opt.will_topic;
        will.message = m->opt.will_payload ? m->opt.will_payload : "";
        if (m->will_copy != NULL) {
            will.message = NULL; /* paho sends payload.data when message is NULL */
            will.payload.data = m->will_copy;
            will.payload.len = (int)m->opt.will_len;
        }
        will.retained = m->opt.will_retained;
        will.qos = 1;
        co.will = &will;
    }
    if (m->tls) {
        ssl.trustStore = m->opt.ca_file;
        ssl.keyStore = m->opt.cert_file;
        ssl.privateKey = m->opt.key_file;
        ssl.enableServerCertAuth = 1;
        ssl.verify = 1; /* check the host name too; the initializer leaves it off */
        co.ssl = &ssl;
    }
    int rc = MQTTAsync_connect(m->client, &co);
    MQTTProperties_free(&props); /* paho copies what it keeps */
    if (rc != MQTTASYNC_SUCCESS)
        return fail(err, errlen, "mqtt: cannot start connecting to %s (code %d)", m->opt.uri,
                    rc);
    return 0;
}

int hp_mqtt_start(hp_mqtt *m, char *err, size_t errlen)
{
    m->started = 1;
    m->retry_ms = retry_min_ms(m);
    m->next_attempt_ms = 0;
    return connect_once(m, err, errlen);
}

/* After the events of a poll: the next attempt when one is due. */
static void reconnect_if_due(hp_mqtt *m)
{
    if (!m->started || m->opt.no_reconnect || m->next_attempt_ms == 0 ||
        mono_ms() < m->next_attempt_ms)
        return;
    m->next_attempt_ms = 0;
    char why[160];
    if ((m->client_used || m->client == NULL) && replace_client(m, why, sizeof why) != 0) {
        m->next_attempt_ms = mono_ms() + m->retry_ms;
        push(m, HP_MQTT_DISCONNECTED, 0, NULL, NULL, 0, 0, 0, why);
        return;
    }
    if (connect_once(m, why, sizeof why) != 0) { /* refused at once: try again later */
        m->next_attempt_ms = mono_ms() + m->retry_ms;
        push(m, HP_MQTT_DISCONNECTED, 0, NULL, NULL, 0, 0, 0, why);
    }
}

/* Bookkeeping of the link's own events, on the owner's thread. */
static void track(hp_mqtt *m, const hp_mqtt_event *ev)
{
    if (ev->type == HP_MQTT_CONNECTED) {
        m->retry_ms = retry_min_ms(m);
        m->next_attempt_ms = 0;
        m->client_used = 1;
        m->session++;
        m->owner_connected = 1;
    } else if (ev->type == HP_MQTT_DISCONNECTED) {
        m->owner_connected = 0;
    }
    if (ev->type == HP_MQTT_DISCONNECTED && m->started && !m->opt.no_reconnect &&
        m->next_attempt_ms == 0) {
        m->next_attempt_ms = mono_ms() + m->retry_ms;
        int64_t max = retry_max_ms(m);
        m->retry_ms = m->retry_ms * 2 > max ? max : m->retry_ms * 2;
    }
}

size_t hp_mqtt_packet_limit(const hp_mqtt_options *opt)
{
    size_t inbound = opt->max_inbound ? opt->max_inbound : 4096;
    return inbound + HP_MQTT_PACKET_HEADROOM;
}

int hp_mqtt_connected(hp_mqtt *m)
{
    pthread_mutex_lock(&m->lock);
    int c = m->connected;
    pthread_mutex_unlock(&m->lock);
    /* owner_connected: a publish goes out only in a connection the owner
     * has been told about, so its session is the one the owner knows */
    return c && m->owner_connected && m->client != NULL && MQTTAsync_isConnected(m->client);
}

int hp_mqtt_publish(hp_mqtt *m, const char *topic, const void *payload, size_t len, int qos,
                    int retained, int64_t tag)
{
    if (len > (size_t)INT32_MAX || !hp_mqtt_connected(m)) {
        snprintf(m->err, sizeof m->err, "mqtt: not connected");
        return -1;
    }
    struct pub_ctx *p = malloc(sizeof *p);
    if (p == NULL) {
        snprintf(m->err, sizeof m->err, "mqtt: out of memory");
        return -1;
    }
    p->m = m;
    p->tag = tag;
    p->session = m->session;
    MQTTAsync_message msg = MQTTAsync_message_initializer;
    msg.payload = (void *)(uintptr_t)payload; /* paho copies it; its API is not const */
    msg.payloadlen = (int)len;
    msg.qos = qos;
    msg.retained = retained;
    MQTTAsync_responseOptions ro = MQTTAsync_responseOptions_initializer;
    ro.onSuccess5 = on_publish_ok;
    ro.onFailure5 = on_publish_fail;
    ro.context = p;
    int rc = MQTTAsync_sendMessage(m->client, topic, &msg, &ro);
    if (rc != MQTTASYNC_SUCCESS) {
        free(p);
        snprintf(m->err, sizeof m->err, "mqtt: publish to %s refused (code %d)", topic, rc);
        return -1;
    }
    return 0;
}

int hp_mqtt_poll(hp_mqtt *m, int timeout_ms, void (*fn)(void *ctx, const hp_mqtt_event *ev),
                 void *ctx)
{
    if (m->next_attempt_ms > 0) { /* do not sleep past a due attempt */
        int64_t due = m->next_attempt_ms - mono_ms();
        if (due < timeout_ms)
            timeout_ms = due > 0 ? (int)due : 0;
    }
    pthread_mutex_lock(&m->lock);
    if (m->head == NULL && timeout_ms > 0) {
        struct timespec until;
        clock_gettime(CLOCK_REALTIME, &until);
        until.tv_sec += timeout_ms / 1000;
        until.tv_nsec += (long)(timeout_ms % 1000) * 1000000L;
        if (until.tv_nsec >= 1000000000L) {
            until.tv_sec++;
            until.tv_nsec -= 1000000000L;
        }
        while (m->head == NULL)
            if (pthread_cond_timedwait(&m->ready, &m->lock, &until) == ETIMEDOUT)
                break;
    }
    struct event_node *list = m->head;
    m->head = m->tail = NULL;
    m->queued = 0;
    pthread_mutex_unlock(&m->lock);
    int n = 0;
    while (list) {
        struct event_node *next = list->next;
        list->ev.topic = list->topic;
        list->ev.payload = list->payload;
        list->ev.reason = list->reason;
        int link_event =
            list->ev.type == HP_MQTT_CONNECTED || list->ev.type == HP_MQTT_DISCONNECTED;
        if (link_event && list->handle_no != m->handle_no) {
            /* the late word of a replaced handle: its connection is over */
            free(list->reason);
            free(list);
            list = next;
            continue;
        }
        track(m, &list->ev);
        if (link_event)
            list->ev.session = m->session;
        if (list->ev.type == HP_MQTT_CONNECTED && m->opt.subscribe && m->client != NULL) {
            /* Renewed at every connect (clean sessions), from the owner's
             * thread rather than paho's callback. */
            MQTTAsync_responseOptions so = MQTTAsync_responseOptions_initializer;
            /* keep the retain flag as published, so that a command published
             * retained is seen as one even when it arrives live */
            so.subscribeOptions.retainAsPublished = 1;
            MQTTAsync_subscribe(m->client, m->opt.subscribe, 1, &so);
        }
        for (int i = 0; list->ev.type == HP_MQTT_CONNECTED && m->client != NULL && i < 2; i++)
            if (m->opt.subscribe_extra[i])
                MQTTAsync_subscribe(m->client, m->opt.subscribe_extra[i], 1, NULL);
        if (fn)
            fn(ctx, &list->ev);
        free(list->topic);
        free(list->payload);
        free(list->reason);
        free(list);
        list = next;
        n++;
    }
    reconnect_if_due(m);
    return n;
}

uint64_t hp_mqtt_dropped(hp_mqtt *m)
{
    pthread_mutex_lock(&m->lock);
    uint64_t d = m->dropped;
    pthread_mutex_unlock(&m->lock);
    return d;
}

const char *hp_mqtt_error(hp_mqtt *m) { return m->err; }

void hp_mqtt_free(hp_mqtt *m, int timeout_ms)
{
    if (m == NULL)
        return;
    m->started = 0; /* no reconnect from here on */
    if (m->client) {
        if (MQTTAsync_isConnected(m->client)) {
            MQTTAsync_disconnectOptions d = MQTTAsync_disconnectOptions_initializer5;
            d.timeout = timeout_ms;
            if (MQTTAsync_disconnect(m->client, &d) == MQTTASYNC_SUCCESS) {
                /* Wait for the disconnect to finish before destroying. */
                for (int i = 0; i < timeout_ms / 10 && MQTTAsync_isConnected(m->client); i++) {
                    struct timespec ts = {0, 10000000L};
                    nanosleep(&ts, NULL);
                }
            }
        }
        MQTTAsync_destroy(&m->client);
    }
    free(m->handle);
    hp_mqtt_poll(m, 0, NULL, NULL); /* frees what the callbacks queued */
    if (m->copies[3]) /* the password */
        explicit_bzero(m->copies[3], strlen(m->copies[3]));
    for (size_t i = 0; i < sizeof m->copies / sizeof m->copies[0]; i++)
        free(m->copies[i]);
    free(m->will_copy);
    pthread_mutex_destroy(&m->lock);
    pthread_cond_destroy(&m->ready);
    free(m);
}
