/* [mqtt]: the broker link (see hs_conf_mqtt.h). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"
#include "hs_conf_mqtt.h"
#include "hs_secret.h"

typedef hs_mqtt_conf M;

static const hs_key mqtt_keys[] = {
    KEY_STR("uri", M, uri, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "broker: mqtt://HOST:PORT, or mqtts://HOST:PORT for TLS (needs ca_file)"),
    KEY_STR("topic_prefix", M, topic_prefix, "halostage", 0,
            "first topic level(s); topics are PREFIX/SITE/..."),
    KEY_STR("client_id", M, client_id, HS_NO_DEFAULT, 0,
            "MQTT client id; default halostage-SITE"),
    KEY_STR("username", M, username, HS_NO_DEFAULT, 0, "user name at the broker"),
    KEY_PATH("password_file", M, password_file, HS_NO_DEFAULT, 0,
             "file whose first line is the password; must not be readable by others"),
    KEY_PATH("ca_file", M, ca_file, HS_NO_DEFAULT, 0,
             "CA certificate (PEM) the broker's certificate and host name are checked against"),
    KEY_PATH("cert_file", M, cert_file, HS_NO_DEFAULT, 0, "client certificate (PEM), optional"),
    KEY_PATH("key_file", M, key_file, HS_NO_DEFAULT, 0, "its private key (PEM)"),
    KEY_DUR("keepalive", M, keepalive_ms, 5 * SEC_MS, 3600 * SEC_MS, "30s", 0,
            "MQTT keep-alive interval"),
    KEY_DUR("reconnect_min", M, reconnect_min_ms, 1 * SEC_MS, 600 * SEC_MS, "1s", 0,
            "first wait before reconnecting; doubles up to reconnect_max"),
    KEY_DUR("reconnect_max", M, reconnect_max_ms, 1 * SEC_MS, 3600 * SEC_MS, "60s", 0,
            "longest wait between reconnect attempts"),
    KEY_UINT("max_inflight", M, max_inflight, 1, 1024, "32", 0,
             "QoS 1 messages sent and not yet acknowledged"),
    KEY_UINT("outbox_max", M, outbox_max, 100, 10000000, "100000", 0,
             "messages kept while the broker is away; when full the oldest pond states give "
             "way, alarms never"),
    {NULL},
};

const hs_section_type hs_section_mqtt;

static int mqtt_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    if (site->mqtt == NULL && (site->mqtt = calloc(1, sizeof *site->mqtt)) == NULL) {
        hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
        return -1;
    }
    site->mqtt->line = hs_cfg_line(cfg);
    return 0;
}

static void *mqtt_at(hs_site *site, size_t index)
{
    (void)index;
    return site->mqtt;
}

static int where(hs_cfg *cfg, const char *key)
{
    return hs_cfg_where(cfg, &hs_section_mqtt, 0, key);
}

static void mqtt_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    const M *m = site->mqtt;
    (void)index;
    if (m == NULL)
        return;
    int tls = strncmp(m->uri, "mqtts://", 8) == 0;
    const char *host = strstr(m->uri, "://");
    if (!tls && strncmp(m->uri, "mqtt://", 7) != 0)
        hs_cfg_error(cfg, where(cfg, "uri"), "uri: '%s' must start with mqtt:// or mqtts://",
                     m->uri);
    else if (host == NULL || host[3] == '\0' || host[3] == ':' || strchr(host + 3, '/'))
        hs_cfg_error(cfg, where(cfg, "uri"), "uri: '%s' needs a host (and :PORT), no path",
                     m->uri);
    if (tls && m->ca_file[0] == '\0')
        hs_cfg_error(cfg, where(cfg, "uri"),
                     "uri: mqtts needs ca_file to verify the broker's certificate");
    if (!tls && (m->ca_file[0] || m->cert_file[0]))
        hs_cfg_error(cfg, where(cfg, m->ca_file[0] ? "ca_file" : "cert_file"),
                     "%s: TLS files need an mqtts:// uri",
                     m->ca_file[0] ? "ca_file" : "cert_file");
    if ((m->cert_file[0] == '\0') != (m->key_file[0] == '\0'))
        hs_cfg_error(cfg, where(cfg, m->cert_file[0] ? "cert_file" : "key_file"),
                     "cert_file and key_file go together");
    if (m->password_file[0] && m->username[0] == '\0')
        hs_cfg_error(cfg, where(cfg, "password_file"), "password_file: needs username");
    if (m->reconnect_max_ms < m->reconnect_min_ms)
        hs_cfg_error(cfg, where(cfg, "reconnect_max"),
                     "reconnect_max: must not be shorter than reconnect_min");
    const char *p = m->topic_prefix;
    if (p[0] == '\0' || p[0] == '/' || p[strlen(p) - 1] == '/' || strpbrk(p, "+# ") != NULL)
        hs_cfg_error(cfg, where(cfg, "topic_prefix"),
                     "topic_prefix: '%s' may not be empty, hold '+', '#' or blanks, or start "
                     "or end with '/'", p);
    if (m->password_file[0]) {
        /* Checked now so that --check reports it; read again at connect. */
        char secret[256], err[HS_PATH_MAX + 100];
        if (hs_read_secret(m->password_file, secret, sizeof secret, err, sizeof err) != 0)
            hs_cfg_error(cfg, where(cfg, "password_file"), "password_file: %s", err);
        explicit_bzero(secret, sizeof secret);
    }
}

static void mqtt_release(hs_site *site)
{
    free(site->mqtt);
    site->mqtt = NULL;
}

void hs_conf_mqtt_options(const hs_site *site, const hs_mqtt_conf *c, const char *password,
                          const char *will_topic, const char *will_payload,
                          const char *subscribe, char *client_id, size_t client_id_len,
                          hp_mqtt_options *o)
{
    memset(o, 0, sizeof *o);
    if (c->client_id[0])
        snprintf(client_id, client_id_len, "%s", c->client_id);
    else
        snprintf(client_id, client_id_len, "halostage-%s", site->site.name);
    o->uri = c->uri;
    o->client_id = client_id;
    o->username = c->username[0] ? c->username : NULL;
    o->password = password;
    o->ca_file = c->ca_file[0] ? c->ca_file : NULL;
    o->cert_file = c->cert_file[0] ? c->cert_file : NULL;
    o->key_file = c->key_file[0] ? c->key_file : NULL;
    o->will_topic = will_topic;
    o->will_payload = will_payload;
    o->will_retained = 1;
    o->keepalive_s = (int)(c->keepalive_ms / 1000);
    o->max_inflight = (int)c->max_inflight;
    o->min_retry_s = (int)(c->reconnect_min_ms / 1000);
    o->max_retry_s = (int)(c->reconnect_max_ms / 1000);
    o->subscribe = subscribe;
}

const hs_section_type hs_section_mqtt = {
    .kind = "mqtt", .named = false, .required = false, .keys = mqtt_keys,
    .add = mqtt_add, .at = mqtt_at, .finish = mqtt_finish, .release = mqtt_release,
};
