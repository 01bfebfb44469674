/* The Sparkplug B edge node's session thread (see hs_sparkplug.h). */
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hp_mqtt.h"
#include "hp_spb.h"
#include "hs_conf_mqtt.h"
#include "hs_conf_transfer.h"
#include "hs_conf_scada.h"
#include "hs_log.h"
#include "hs_sparkplug.h"
#include "hs_spb_metrics.h"

#define TOPIC_MAX 256
#define RETRY_MIN_MS 1000
#define RETRY_MAX_MS 30000
#define NODE_REBIRTH "Node Control/Rebirth"
#define DEVICE_REBIRTH "Device Control/Rebirth"

struct hs_sparkplug {
    /* configuration (copies) */
    hp_mqtt_options opt;
    char uri[256], client_id[64], username[64], password[256], ca[HS_PATH_MAX],
        cert[HS_PATH_MAX], key[HS_PATH_MAX];
    char group[64], edge[64], host[64];
    size_t n_ponds, n_transfers;
    char (*pond_names)[HS_NAME_MAX];
    hs_spb_transfer_names *tnames;

    /* shared with the runtime's thread, under lock */
    pthread_mutex_t lock;
    pthread_cond_t wake;
    hs_scada_pond *latest;
    hs_scada_transfer *tlatest;
    int stop;

    /* the node's thread only */
    pthread_t thread;
    int started;
    hp_mqtt *link;
    int connected, node_born, want_birth, host_online, drop_link;
    uint64_t host_ts, bd_seq;
    int seq;
    int64_t next_connect_ms, retry_ms;
    hs_scada_pond *cur;         /* the thread's copy of latest for one round */
    hs_scada_transfer *tcur;
    hs_scada_pond *sent;
    int *born;                  /* per pond: DBIRTH published and no DDEATH since */
    int *want_dbirth;
    hs_scada_transfer *tsent;
    char t_ncmd[TOPIC_MAX], t_dcmd[TOPIC_MAX], t_state[TOPIC_MAX];
};

static int64_t mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static uint64_t wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (uint64_t)ts.tv_sec * 1000 + (uint64_t)ts.tv_nsec / 1000000;
}

static int next_seq(hs_sparkplug *n)
{
    n->seq = (n->seq + 1) & 0xFF; /* 0..255, Sparkplug 3.0 §6.4.1 */
    return n->seq;
}

static void topic(char *buf, size_t len, const hs_sparkplug *n, const char *type,
                  const char *device)
{
    snprintf(buf, len, "spBv1.0/%s/%s/%s%s%s", n->group, type, n->edge, device ? "/" : "",
             device ? device : "");
}

/* Encodes and publishes one message; seq -1 for none. 0 / -1. */
static int send_msg(hs_sparkplug *n, const char *type, const char *device, int seq,
                    const hp_spb_metric *m, size_t count, int qos)
{
    char t[TOPIC_MAX];
    topic(t, sizeof t, n, type, device);
    uint8_t *buf;
    size_t len;
    if (hp_spb_encode(wall_ms(), seq, m, count, &buf, &len) != 0)
        return -1;
    int rc = hp_mqtt_publish(n->link, t, buf, len, qos, 0, 0);
    free(buf);
    if (rc != 0)
        n->drop_link = 1; /* the session is broken: births again on a new one */
    return rc;
}

static void dbirth(hs_sparkplug *n, size_t i)
{
    hp_spb_metric m[HS_SPB_POND_METRICS_MAX];
    size_t count = hs_spb_pond_birth(i, &n->cur[i], m);
    if (send_msg(n, "DBIRTH", n->pond_names[i], next_seq(n), m, count, 0) == 0) {
        n->sent[i] = n->cur[i];
        n->born[i] = 1;
    }
}

/* NBIRTH, then a DBIRTH per living pond. n->cur is this round's copy. */
static void births(hs_sparkplug *n)
{
    size_t cap = 2 + HS_SPB_TRANSFER_METRICS * n->n_transfers;
    hp_spb_metric *m = calloc(cap, sizeof *m);
    if (m == NULL)
        return;
    size_t count = hs_spb_node_birth(n->bd_seq, m);
    for (size_t j = 0; j < n->n_transfers; j++) {
        count += hs_spb_transfer_birth(j, &n->tnames[j], &n->tcur[j], m + count);
        n->tsent[j] = n->tcur[j];
    }
    n->seq = 0;
    int rc = send_msg(n, "NBIRTH", NULL, 0, m, count, 0);
    free(m);
    if (rc != 0)
        return;
    n->node_born = 1;
    n->want_birth = 0;
    for (size_t i = 0; i < n->n_ponds; i++) {
        n->born[i] = 0;
        n->want_dbirth[i] = 0;
        if (!hs_spb_pond_dead(&n->cur[i]))
            dbirth(n, i);
    }
    hs_log(HSP_LOG_INFO, "Sparkplug: births published (bdSeq %llu)",
           (unsigned long long)n->bd_seq);
}

static void exceptions(hs_sparkplug *n)
{
    hp_spb_metric m[HS_SPB_POND_METRICS_MAX];
    for (size_t i = 0; i < n->n_ponds && !n->drop_link; i++) {
        int dead = hs_spb_pond_dead(&n->cur[i]);
        if (n->born[i] && dead) {
            if (send_msg(n, "DDEATH", n->pond_names[i], next_seq(n), NULL, 0, 0) == 0)
                n->born[i] = 0;
        } else if (!dead && (!n->born[i] || n->want_dbirth[i])) {
            n->want_dbirth[i] = 0;
            dbirth(n, i);
        } else if (n->born[i]) {
            size_t count = hs_spb_pond_changes(i, &n->sent[i], &n->cur[i], m);
            if (count > 0)
                send_msg(n, "DDATA", n->pond_names[i], next_seq(n), m, count, 0);
        }
    }
    hp_spb_metric t[HS_SPB_TRANSFER_METRICS * 8];
    size_t count = 0;
    for (size_t j = 0; j < n->n_transfers && !n->drop_link; j++) {
        count += hs_spb_transfer_changes(j, &n->tsent[j], &n->tcur[j], t + count);
        if (count > HS_SPB_TRANSFER_METRICS * 7 || (j + 1 == n->n_transfers && count)) {
            send_msg(n, "NDATA", NULL, next_seq(n), t, count, 0);
            count = 0;
        }
    }
}

static void on_message(hs_sparkplug *n, const hp_mqtt_event *ev)
{
    char why[160] = "";
    if (ev->payload == NULL) {
        hs_log(HSP_LOG_WARNING, "Sparkplug: %zu-byte message on %s dropped (too large)",
               ev->payload_len, ev->topic);
        return;
    }
    if (n->host[0] && strcmp(ev->topic, n->t_state) == 0) {
        int online;
        uint64_t ts;
        if (hp_spb_state_parse(ev->payload, ev->payload_len, &online, &ts) != 0) {
            hs_log(HSP_LOG_WARNING, "Sparkplug: %s: not a STATE document; ignored", ev->topic);
            return;
        }
        if (ts < n->host_ts)
            return; /* an older STATE than the one we act on */
        n->host_ts = ts;
        if (online && !n->host_online) {
            n->want_birth = 1;
            hs_log(HSP_LOG_NOTICE, "Sparkplug: primary host %s online", n->host);
        } else if (!online && n->host_online && n->node_born) {
            hp_spb_metric m[1];
            hs_spb_node_death(n->bd_seq, m);
            send_msg(n, "NDEATH", NULL, -1, m, 1, 1);
            n->drop_link = 1; /* a new session waits for the host to come back */
            hs_log(HSP_LOG_NOTICE, "Sparkplug: primary host %s offline: node death", n->host);
        }
        n->host_online = online;
        return;
    }
    if (strcmp(ev->topic, n->t_ncmd) == 0) {
        int r = hp_spb_command_is(ev->payload, ev->payload_len, NODE_REBIRTH, why, sizeof why);
        if (r == 1)
            n->want_birth = 1;
        else
            hs_log(HSP_LOG_WARNING, "Sparkplug: NCMD refused: %s", why);
        return;
    }
    size_t dl = strlen(n->t_dcmd) - 1; /* ".../DCMD/EDGE/#" without '#' */
    if (strncmp(ev->topic, n->t_dcmd, dl) == 0) {
        const char *device = ev->topic + dl;
        size_t i = 0;
        while (i < n->n_ponds && strcmp(n->pond_names[i], device) != 0)
            i++;
        int r = hp_spb_command_is(ev->payload, ev->payload_len, DEVICE_REBIRTH, why, sizeof why);
        if (i < n->n_ponds && r == 1)
            n->want_dbirth[i] = 1;
        else
            hs_log(HSP_LOG_WARNING, "Sparkplug: DCMD for %.60s refused: %s", device,
                   i < n->n_ponds ? why : "no such device");
    }
}

static void on_event(void *ctx, const hp_mqtt_event *ev)
{
    hs_sparkplug *n = ctx;
    switch (ev->type) {
    case HP_MQTT_CONNECTED:
        n->connected = 1;
        n->retry_ms = RETRY_MIN_MS;
        n->want_birth = n->host[0] == '\0';
        hs_log(HSP_LOG_NOTICE, "Sparkplug: connected as %s (bdSeq %llu)%s%s", n->client_id,
               (unsigned long long)n->bd_seq, n->host[0] ? ", waiting for host " : "",
               n->host);
        break;
    case HP_MQTT_DISCONNECTED:
        hs_log(HSP_LOG_WARNING, "Sparkplug: %s", ev->reason ? ev->reason : "disconnected");
        n->drop_link = 1;
        break;
    case HP_MQTT_MESSAGE: on_message(n, ev); break;
    default: break;
    }
}

static void open_link(hs_sparkplug *n)
{
    hp_spb_metric m[1];
    uint8_t *will;
    size_t will_len;
    hs_spb_node_death(n->bd_seq, m);
    if (hp_spb_encode(wall_ms(), -1, m, 1, &will, &will_len) != 0)
        return;
    char will_topic[TOPIC_MAX], err[256];
    topic(will_topic, sizeof will_topic, n, "NDEATH", NULL);
    hp_mqtt_options o = n->opt;
    o.will_topic = will_topic;
    o.will_payload = (const char *)will;
    o.will_len = will_len;
    o.will_retained = 0;
    o.no_reconnect = 1;
    o.subscribe = n->t_ncmd;
    o.subscribe_extra[0] = n->t_dcmd;
    o.subscribe_extra[1] = n->host[0] ? n->t_state : NULL;
    n->link = hp_mqtt_new(&o, err, sizeof err);
    free(will);
    if (n->link != NULL && hp_mqtt_start(n->link, err, sizeof err) != 0) {
        hp_mqtt_free(n->link, 0);
        n->link = NULL;
    }
    if (n->link == NULL) {
        hs_log(HSP_LOG_ERR, "Sparkplug: %s", err);
        n->next_connect_ms = mono_ms() + RETRY_MAX_MS;
    }
}

static void close_link(hs_sparkplug *n)
{
    hp_mqtt_free(n->link, 1000);
    n->link = NULL;
    n->connected = n->node_born = n->host_online = 0;
    n->host_ts = 0;
    n->drop_link = 0;
    pthread_mutex_lock(&n->lock); /* hs_sparkplug_next_bd_seq reads it */
    n->bd_seq = (n->bd_seq + 1) & 0xFF; /* per new connection, Sparkplug 3.0 §6.4.17 */
    pthread_mutex_unlock(&n->lock);
    n->next_connect_ms = mono_ms() + n->retry_ms;
    n->retry_ms = n->retry_ms * 2 > RETRY_MAX_MS ? RETRY_MAX_MS : n->retry_ms * 2;
}

static void *run(void *arg)
{
    hs_sparkplug *n = arg;
    for (;;) {
        pthread_mutex_lock(&n->lock);
        int stop = n->stop;
        pthread_mutex_unlock(&n->lock);
        if (stop)
            break;
        if (n->link == NULL && mono_ms() >= n->next_connect_ms)
            open_link(n);
        if (n->link == NULL) {
            struct timespec ts = {0, 100 * 1000000L};
            nanosleep(&ts, NULL);
            continue;
        }
        hp_mqtt_poll(n->link, 100, on_event, n);
        if (!n->drop_link && n->connected && (!n->host[0] || n->host_online)) {
            pthread_mutex_lock(&n->lock);
            memcpy(n->cur, n->latest, n->n_ponds * sizeof *n->cur);
            memcpy(n->tcur, n->tlatest, n->n_transfers * sizeof *n->tcur);
            pthread_mutex_unlock(&n->lock);
            if (n->want_birth || !n->node_born)
                births(n);
            else
                exceptions(n);
        }
        if (n->drop_link)
            close_link(n);
    }
    if (n->link != NULL && n->connected && n->node_born) {
        hp_spb_metric m[1];
        hs_spb_node_death(n->bd_seq, m);
        send_msg(n, "NDEATH", NULL, -1, m, 1, 1); /* a clean stop says so itself */
    }
    hp_mqtt_free(n->link, 2000);
    n->link = NULL;
    return NULL;
}

hs_sparkplug *hs_sparkplug_start(const hs_site *site, const char *password, uint64_t bd_seq,
                                 char *err, size_t errlen)
{
    const hs_sparkplug_conf *c = site->sparkplug;
    const hs_mqtt_conf *m = site->mqtt;
    hs_sparkplug *n = calloc(1, sizeof *n);
    if (n == NULL || c == NULL || m == NULL) {
        snprintf(err, errlen, "Sparkplug: %s", n ? "needs [mqtt]" : "out of memory");
        free(n);
        return NULL;
    }
    pthread_mutex_init(&n->lock, NULL);
    pthread_cond_init(&n->wake, NULL);
    snprintf(n->uri, sizeof n->uri, "%s", m->uri);
    snprintf(n->client_id, sizeof n->client_id, "%s", c->client_id);
    snprintf(n->username, sizeof n->username, "%s", m->username);
    snprintf(n->password, sizeof n->password, "%s", password ? password : "");
    snprintf(n->ca, sizeof n->ca, "%s", m->ca_file);
    snprintf(n->cert, sizeof n->cert, "%s", m->cert_file);
    snprintf(n->key, sizeof n->key, "%s", m->key_file);
    snprintf(n->group, sizeof n->group, "%s", c->group_id);
    snprintf(n->edge, sizeof n->edge, "%s", c->edge_node_id);
    snprintf(n->host, sizeof n->host, "%s", c->primary_host_id);
    n->opt = (hp_mqtt_options){
        .uri = n->uri, .client_id = n->client_id,
        .username = n->username[0] ? n->username : NULL,
        .password = n->password[0] ? n->password : NULL,
        .ca_file = n->ca[0] ? n->ca : NULL, .cert_file = n->cert[0] ? n->cert : NULL,
        .key_file = n->key[0] ? n->key : NULL, .keepalive_s = (int)m->keepalive_s,
        .max_inflight = 64,
    };
    topic(n->t_ncmd, sizeof n->t_ncmd, n, "NCMD", NULL);
    topic(n->t_dcmd, sizeof n->t_dcmd, n, "DCMD", "#");
    snprintf(n->t_state, sizeof n->t_state, "spBv1.0/STATE/%s", n->host);
    n->n_ponds = site->n_ponds;
    n->n_transfers = site->n_transfers;
    size_t np = n->n_ponds ? n->n_ponds : 1, nt = n->n_transfers ? n->n_transfers : 1;
    n->pond_names = calloc(np, sizeof *n->pond_names);
    n->tnames = calloc(nt, sizeof *n->tnames);
    n->latest = calloc(np, sizeof *n->latest);
    n->sent = calloc(np, sizeof *n->sent);
    n->cur = calloc(np, sizeof *n->cur);
    n->tcur = calloc(nt, sizeof *n->tcur);
    n->born = calloc(np, sizeof *n->born);
    n->want_dbirth = calloc(np, sizeof *n->want_dbirth);
    n->tlatest = calloc(nt, sizeof *n->tlatest);
    n->tsent = calloc(nt, sizeof *n->tsent);
    if (!n->pond_names || !n->tnames || !n->latest || !n->sent || !n->born || !n->cur ||
        !n->tcur ||
        !n->want_dbirth || !n->tlatest || !n->tsent) {
        snprintf(err, errlen, "Sparkplug: out of memory");
        hs_sparkplug_stop(n);
        return NULL;
    }
    for (size_t i = 0; i < n->n_ponds; i++) {
        snprintf(n->pond_names[i], HS_NAME_MAX, "%s", site->ponds[i].name);
        hs_scada_pond_clear(&n->latest[i]);
    }
    for (size_t j = 0; j < n->n_transfers; j++) {
        hs_spb_transfer_names_init(&n->tnames[j], site->transfers[j].name);
        n->tlatest[j].advice = 0xFFFF;
    }
    n->retry_ms = RETRY_MIN_MS;
    n->bd_seq = bd_seq & 0xFF;
    if (pthread_create(&n->thread, NULL, run, n) != 0) {
        snprintf(err, errlen, "Sparkplug: cannot start its thread");
        hs_sparkplug_stop(n);
        return NULL;
    }
    n->started = 1;
    return n;
}

void hs_sparkplug_pond(hs_sparkplug *n, size_t pond, const hs_scada_pond *p)
{
    if (n == NULL || pond >= n->n_ponds)
        return;
    pthread_mutex_lock(&n->lock);
    n->latest[pond] = *p;
    pthread_mutex_unlock(&n->lock);
}

void hs_sparkplug_transfer(hs_sparkplug *n, size_t transfer, const hs_scada_transfer *t)
{
    if (n == NULL || transfer >= n->n_transfers)
        return;
    pthread_mutex_lock(&n->lock);
    n->tlatest[transfer] = *t;
    pthread_mutex_unlock(&n->lock);
}

uint64_t hs_sparkplug_next_bd_seq(hs_sparkplug *n)
{
    pthread_mutex_lock(&n->lock);
    uint64_t next = (n->bd_seq + 1) & 0xFF;
    pthread_mutex_unlock(&n->lock);
    return next;
}

uint64_t hs_sparkplug_stop(hs_sparkplug *n)
{
    if (n == NULL)
        return 0;
    if (n->started) {
        pthread_mutex_lock(&n->lock);
        n->stop = 1;
        pthread_mutex_unlock(&n->lock);
        pthread_join(n->thread, NULL);
    }
    explicit_bzero(n->password, sizeof n->password);
    free(n->pond_names);
    free(n->tnames);
    free(n->latest);
    free(n->sent);
    free(n->cur);
    free(n->tcur);
    free(n->born);
    free(n->want_dbirth);
    free(n->tlatest);
    free(n->tsent);
    pthread_mutex_destroy(&n->lock);
    pthread_cond_destroy(&n->wake);
    uint64_t next = (n->bd_seq + 1) & 0xFF;
    free(n);
    return next;
}
