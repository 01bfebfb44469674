/* [mqtt]: the broker link (plugin/hs_conf_mqtt.c reads it). Without this
 * section the daemon keeps everything in the store and publishes nothing.
 * Durations are milliseconds. The password itself is never kept here: the
 * runtime reads password_file when it connects (hs_secret.h). */
#ifndef HS_CONF_MQTT_H
#define HS_CONF_MQTT_H

#include <stdint.h>

#include "hp_mqtt.h"
#include "hs_site.h"

typedef struct hs_mqtt_conf {
    int line;
    char uri[256];                 /* mqtt://HOST:PORT or mqtts://HOST:PORT */
    char topic_prefix[64];
    char client_id[64];            /* "" = halostage-<site name> */
    char username[64];
    char password_file[HS_PATH_MAX];
    char ca_file[HS_PATH_MAX];
    char cert_file[HS_PATH_MAX];
    char key_file[HS_PATH_MAX];
    int64_t keepalive_ms;
    int64_t reconnect_min_ms;
    int64_t reconnect_max_ms;
    unsigned max_inflight;         /* outbox rows in flight */
    unsigned outbox_max;           /* rows the outbox holds before states give way */
} hs_mqtt_conf;

/* Link options for c (strings point into c and password). password is the
 * secret read from c->password_file, or NULL. will_payload is the caller's. */
void hs_conf_mqtt_options(const hs_site *site, const hs_mqtt_conf *c, const char *password,
                          const char *will_topic, const char *will_payload,
                          const char *subscribe, char *client_id, size_t client_id_len,
                          hp_mqtt_options *out);

#endif
