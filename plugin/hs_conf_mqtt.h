/* [mqtt]: where the gateway publishes (the topic tree in halostage.conf(5)). The
 * section is optional: without it publishing is off and everything else
 * runs. plugin/hs_conf_mqtt.c reads it into site->mqtt (NULL when absent). */
#ifndef HS_CONF_MQTT_H
#define HS_CONF_MQTT_H

#include <stdbool.h>

#include "hs_site.h"

typedef struct hs_mqtt_conf {
    int line;
    char uri[256];             /* mqtt://HOST:PORT or mqtts://HOST:PORT */
    char topic_prefix[64];     /* first topic level; default "halostage" */
    char client_id[64];        /* default "halostaged-<site>" */
    char username[64];         /* "" = anonymous */
    char password_file[HS_PATH_MAX]; /* secret: first line; mode must deny others */
    char ca_file[HS_PATH_MAX];   /* mqtts: the CA the broker's certificate must chain to */
    char cert_file[HS_PATH_MAX]; /* optional client certificate (PEM) */
    char key_file[HS_PATH_MAX];  /* and its key */
    unsigned keepalive_s;
    unsigned window;           /* QoS 1 messages in flight */
    unsigned outbox_max;       /* rows kept while the broker is away; then states give way */
    int64_t state_heartbeat_ms; /* an unchanged retained pond state goes out again this often */
    int64_t reconnect_min_ms;  /* reconnect back-off: first wait ... */
    int64_t reconnect_max_ms;  /* ... doubling up to this */
    unsigned max_inbound;      /* largest inbound command payload [bytes] */
    int64_t command_max_age_ms; /* older commands are refused as stale */
    bool enabled;
} hs_mqtt_conf;

#endif
