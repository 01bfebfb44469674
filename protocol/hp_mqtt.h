/* MQTT link on paho-mqtt-c's async API (MQTT 5): connects and reconnects
 * (exponential backoff between min_retry_s and max_retry_s, each attempt
 * made from hp_mqtt_poll on the owner's thread and each failure reported
 * as an event), a last will,
 * TLS with server verification, and a username/password. It knows nothing
 * of ponds or of the outbox: it publishes what it is given and reports,
 * through hp_mqtt_poll() on the owner's thread, what happened.
 *
 * Threads: paho runs its callbacks on its own threads; they only copy what
 * they learn into a bounded, mutex-protected queue. Everything else
 * (publish, poll, free) belongs to one owner thread. Library persistence and
 * offline buffering are off: durability is the caller's outbox.
 *
 * Error convention (protocol layer, MQTT): functions return 0 on success and
 * -1 on failure with a reason in the caller's err buffer or hp_mqtt_error(). */
#ifndef HP_MQTT_H
#define HP_MQTT_H

#include <stddef.h>
#include <stdint.h>

typedef struct hp_mqtt hp_mqtt;

typedef struct {
    const char *uri;        /* mqtt://HOST:PORT or mqtts://HOST:PORT */
    const char *client_id;
    const char *username;   /* NULL: anonymous */
    const char *password;   /* NULL: none (read from the password file by the caller) */
    const char *ca_file;    /* mqtts: CA to verify the broker with (verify=1) */
    const char *cert_file;  /* optional client certificate (PEM) */
    const char *key_file;   /* its key (PEM) */
    const char *will_topic; /* NULL: no last will */
    const char *will_payload;
    size_t will_len;        /* bytes of will_payload; 0: strlen (text) */
    int will_retained;
    int keepalive_s;        /* default 30 */
    int max_inflight;       /* QoS 1 messages in flight; default 64 */
    int min_retry_s;        /* reconnect backoff; default 1 */
    int max_retry_s;        /* default 60 */
    int min_retry_ms;       /* when > 0, these replace min_retry_s and max_retry_s */
    int max_retry_ms;
    const char *subscribe;  /* topic filter subscribed at every connect; NULL: none */
    const char *subscribe_extra[2]; /* more filters, the same way; NULL: none */
    int no_reconnect;       /* 1: a lost connection stays lost (the owner makes a new
                               client, e.g. to change the will); 0: paho reconnects */
    size_t max_inbound;     /* larger inbound payloads are reported, not copied; default 4096 */
} hp_mqtt_options;

/* Inbound payloads up to max_inbound + this are still read (and reported
 * oversize, so that the sender gets an answer); the broker drops larger
 * packets unread: the Maximum Packet Size of our CONNECT. */
#define HP_MQTT_PACKET_HEADROOM 65536
/* The Maximum Packet Size sent in CONNECT [bytes]. */
size_t hp_mqtt_packet_limit(const hp_mqtt_options *opt);

/* Sessions: every connection handed to the owner (CONNECTED) gets the next
 * session number, and each publish is counted in the session in which it
 * was made. A connection's paho handle is replaced before the next attempt,
 * so nothing accepted in one connection is written into the next: a publish
 * either completes in its own connection or comes back FAILED. */
typedef enum {
    HP_MQTT_CONNECTED,      /* (re)connected; subscriptions are renewed */
    HP_MQTT_DISCONNECTED,   /* lost or failed to connect; reason says why */
    HP_MQTT_DELIVERED,      /* the publish with tag was acknowledged (PUBACK for QoS 1) */
    HP_MQTT_FAILED,         /* the publish with tag failed; send it again later */
    HP_MQTT_MESSAGE         /* an inbound message on the subscription */
} hp_mqtt_event_type;

typedef struct {
    hp_mqtt_event_type type;
    int64_t tag;            /* DELIVERED / FAILED: the caller's tag */
    int64_t session;        /* DELIVERED / FAILED: the session the publish was made in;
                               CONNECTED: the new session; DISCONNECTED: the current one */
    const char *topic;      /* MESSAGE */
    const void *payload;    /* MESSAGE; NULL when oversize */
    size_t payload_len;     /* MESSAGE: the real length, even when oversize */
    int oversize;           /* MESSAGE: longer than max_inbound, payload dropped */
    int retained;           /* MESSAGE: it carried the retain flag (a stored message) */
    const char *reason;     /* DISCONNECTED / FAILED: text; may be NULL */
    int reason_code;        /* FAILED: the broker's MQTT 5 reason code (0x80 and up) when
                               the broker refused the publish; 0 when it did not answer */
} hp_mqtt_event;

/* Creates the client; nothing connects until hp_mqtt_start(). Returns NULL
 * with a reason in err on a bad option (e.g. mqtts without ca_file). */
hp_mqtt *hp_mqtt_new(const hp_mqtt_options *opt, char *err, size_t errlen);
/* Starts connecting. The library keeps retrying in the background when the
 * broker is not there, so a failure to reach it is an event, not an error. */
int hp_mqtt_start(hp_mqtt *m, char *err, size_t errlen);
/* Disconnects (waiting up to timeout_ms for a clean disconnect, so that no
 * last will fires) and frees. NULL is allowed. Never from a callback. */
void hp_mqtt_free(hp_mqtt *m, int timeout_ms);

/* 1 when connected and the owner has been handed the CONNECTED event (so a
 * publish now belongs to the session the owner knows). */
int hp_mqtt_connected(hp_mqtt *m);
/* Starts one publish. tag comes back in DELIVERED/FAILED. Returns -1 when
 * not connected or the library refuses (the message was not taken). */
int hp_mqtt_publish(hp_mqtt *m, const char *topic, const void *payload, size_t len, int qos,
                    int retained, int64_t tag);
/* Waits up to timeout_ms for an event to be queued (0: do not wait), then
 * hands every queued event to fn in order. Strings live until fn returns.
 * Returns the number of events handed over. */
int hp_mqtt_poll(hp_mqtt *m, int timeout_ms, void (*fn)(void *ctx, const hp_mqtt_event *ev),
                 void *ctx);
/* Inbound messages dropped because the event queue was full. */
uint64_t hp_mqtt_dropped(hp_mqtt *m);
const char *hp_mqtt_error(hp_mqtt *m);

#endif
