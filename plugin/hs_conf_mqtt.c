/* [mqtt]: the broker link (see hs_conf_mqtt.h). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"
#include "hs_conf_mqtt.h"

typedef hs_mqtt_conf M;

static const hs_key mqtt_keys[] = {
    KEY_STR("uri", M, uri, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "mqtt://HOST:PORT, or mqtts://HOST:PORT for TLS (needs ca_file)"),
    KEY_STR("topic_prefix", M, topic_prefix, "halostage", 0,
            "first level of every topic: PREFIX/SITE/pond/POND/state, ..."),
    KEY_STR("client_id", M, client_id, HS_NO_DEFAULT, 0,
            "MQTT client id; default halostaged-SITE"),
    KEY_STR("username", M, username, HS_NO_DEFAULT, 0, "broker user name; none = anonymous"),
    KEY_PATH("password_file", M, password_file, HS_NO_DEFAULT, 0,
             "file whose first line is the password; must not be readable by others"),
    KEY_PATH("ca_file", M, ca_file, HS_NO_DEFAULT, 0,
             "mqtts: CA certificate (PEM) the broker is verified against, host name included"),
    KEY_PATH("cert_file", M, cert_file, HS_NO_DEFAULT, 0, "client certificate (PEM), optional"),
    KEY_PATH("key_file", M, key_file, HS_NO_DEFAULT, 0, "client key (PEM), with cert_file"),
    KEY_UINT("keepalive", M, keepalive_s, 5, 3600, "30", 0, "MQTT keepalive in seconds"),
    KEY_UINT("window", M, window, 1, 1024, "64", 0, "QoS 1 messages in flight at once"),
    KEY_UINT("outbox_max", M, outbox_max, 100, 10000000, "100000", 0,
             "messages kept while the broker is away; when full the oldest pond states give "
             "way, alarms never"),
    KEY_DUR("state_heartbeat", M, state_heartbeat_ms, 0, 24 * 3600 * SEC_MS, "5min", 0,
            "an unchanged pond state is published again this often (0: only on new input)"),
    KEY_DUR("reconnect_min", M, reconnect_min_ms, 100, 3600 * SEC_MS, "500ms", 0,
            "first wait before reconnecting to a lost broker"),
    KEY_DUR("reconnect_max", M, reconnect_max_ms, 100, 3600 * SEC_MS, "500ms", 0,
            "the wait doubles up to this; 500ms reconnects within about a second of the "
            "broker's return"),
    KEY_UINT("max_inbound", M, max_inbound, 256, 65536, "4096", 0,
             "largest command payload in bytes; the broker is told the packet limit at "
             "connect (MQTT 5), so nothing much larger is ever read"),
    KEY_DUR("command_max_age", M, command_max_age_ms, 5 * SEC_MS, 24 * 3600 * SEC_MS, "5min",
            0, "a command whose time is older than this (or as far ahead) is refused as stale"),
    KEY_BOOL("enabled", M, enabled, "yes", 0, "no: keep the section but publish nothing"),
    {NULL},
};

const hs_section_type hs_section_mqtt;

static int mqtt_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    if (site->mqtt == NULL) {
        site->mqtt = calloc(1, sizeof *site->mqtt);
        if (site->mqtt == NULL) {
            hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
            return -1;
        }
    }
    site->mqtt->line = hs_cfg_line(cfg);
    return 0;
}

static void *mqtt_at(hs_site *site, size_t index)
{
    (void)index;
    return site->mqtt;
}

static void mqtt_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    M *m = site->mqtt;
    int tls = strncmp(m->uri, "mqtts://", 8) == 0;
    if (!tls && strncmp(m->uri, "mqtt://", 7) != 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "uri"),
                     "uri: '%s' must start with mqtt:// or mqtts://", m->uri);
    if (tls && !m->ca_file[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "uri"),
                     "uri: mqtts:// needs ca_file to verify the broker");
    if (!tls && m->ca_file[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "ca_file"),
                     "ca_file: only used with an mqtts:// uri");
    if (!m->cert_file[0] != !m->key_file[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "cert_file"),
                     "cert_file and key_file go together");
    if (m->password_file[0] && !m->username[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "password_file"),
                     "password_file needs username");
    for (const char *p = m->topic_prefix; *p; p++)
        if (*p == '/' || *p == '+' || *p == '#' || *p == ' ') {
            hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "topic_prefix"),
                         "topic_prefix: '%s' must be one topic level (no '/', '+', '#', blanks)",
                         m->topic_prefix);
            break;
        }
    if (m->reconnect_max_ms < m->reconnect_min_ms)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_mqtt, index, "reconnect_max"),
                     "reconnect_max must not be shorter than reconnect_min");
    if (!m->client_id[0])
        snprintf(m->client_id, sizeof m->client_id, "halostaged-%.40s", site->site.name);
}

static void mqtt_release(hs_site *site)
{
    free(site->mqtt);
    site->mqtt = NULL;
}

const hs_section_type hs_section_mqtt = {
    .kind = "mqtt", .named = false, .required = false, .keys = mqtt_keys,
    .add = mqtt_add, .at = mqtt_at, .finish = mqtt_finish, .release = mqtt_release,
};
