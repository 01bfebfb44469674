/* MQTT for the runtime: the link (hp_mqtt.h), the outbox pump
 * (hs_publish.h), operator commands arriving on the command topic, and the
 * clean goodbye at close: send everything the outbox holds, then the
 * retained gateway-offline status, then disconnect (so the will never
 * fires on a clean stop). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <limits.h>

#include "hs_conf_mqtt.h"
#include "hs_log.h"
#include "hs_runtime_private.h"
#include "hs_mqtt_secret.h"

int hs_rt_mqtt_open(hs_runtime *rt)
{
    const hs_mqtt_conf *m = rt->site.mqtt;
    rt->link = NULL;
    rt->publisher = NULL;
    /* Alarm transitions from operator commands (the CLI's queue) are
     * journalled even with publishing off; nothing is queued for MQTT then. */
    hs_topics_init(&rt->topics, m ? m->topic_prefix : "halostage", rt->site.site.name);
    rt->state_heartbeat_ms = m ? m->state_heartbeat_ms : 5 * 60 * 1000;
    rt->alarm_sink = (hs_alarm_sink){.store = rt->store, .topics = &rt->topics,
                                     .journal_only = 1};
    rt->commands = (hs_commands){.engine = rt->alarms, .sink = &rt->alarm_sink,
                                 .topics = &rt->topics};
    if (m == NULL || !m->enabled) {
        hs_log(HSP_LOG_NOTICE, "%s: publishing is off", m == NULL ? "no [mqtt] section"
                                                                  : "[mqtt] enabled = no");
        return 0;
    }
    if (hs_topics_init(&rt->topics, m->topic_prefix, rt->site.site.name) != 0) {
        hs_log(HSP_LOG_ERR, "%s:%d: [mqtt]: topic prefix or site name unusable in a topic",
               rt->site.path, m->line);
        return -1;
    }
    hs_store_set_outbox_max(rt->store, m->outbox_max);
    char password[256] = "", pw_err[PATH_MAX + 1024];
    if (hs_mqtt_password(m, rt->site.path, password, sizeof password, pw_err,
                         sizeof pw_err) != 0) {
        hs_log(HSP_LOG_ERR, "%s", pw_err);
        return -1;
    }
    if (hs_mqtt_password_in_clear(m, rt->site.path, pw_err, sizeof pw_err))
        hs_log(HSP_LOG_WARNING, "%s", pw_err);
    char will_topic[HS_TOPIC_MAX], subscribe[HS_TOPIC_MAX + 4], err[256] = "";
    hs_topic(will_topic, sizeof will_topic, &rt->topics, "gateway", NULL, NULL);
    hs_topic(subscribe, sizeof subscribe - 2, &rt->topics, "command", NULL, NULL);
    strcat(subscribe, "/#");
    char *will = hs_gateway_payload(&rt->topics, 0);
    hp_mqtt_options opt = {
        .uri = m->uri, .client_id = m->client_id,
        .username = m->username[0] ? m->username : NULL,
        .password = password[0] ? password : NULL,
        .ca_file = m->ca_file[0] ? m->ca_file : NULL,
        .cert_file = m->cert_file[0] ? m->cert_file : NULL,
        .key_file = m->key_file[0] ? m->key_file : NULL,
        .will_topic = will_topic, .will_payload = will, .will_retained = 1,
        .keepalive_s = (int)m->keepalive_s, .max_inflight = (int)m->window,
        .subscribe = subscribe,
        .min_retry_ms = (int)m->reconnect_min_ms,
        .max_retry_ms = (int)m->reconnect_max_ms,
        .max_inbound = m->max_inbound,
    };
    rt->link = hp_mqtt_new(&opt, err, sizeof err);
    memset(password, 0, sizeof password); /* the library keeps its own copy */
    free(will);
    if (rt->link == NULL) {
        hs_log(HSP_LOG_ERR, "[mqtt]: %s", err);
        return -1;
    }
    rt->publisher = hs_publisher_new(rt->store, rt->link, &rt->topics, (int)m->window);
    if (rt->publisher == NULL || hp_mqtt_start(rt->link, err, sizeof err) != 0) {
        hs_log(HSP_LOG_ERR, "[mqtt]: cannot start: %s", err[0] ? err : "out of memory");
        hs_publisher_free(rt->publisher);
        rt->publisher = NULL;
        hp_mqtt_free(rt->link, 0);
        rt->link = NULL;
        return -1;
    }
    rt->alarm_sink = (hs_alarm_sink){.store = rt->store, .topics = &rt->topics,
                                     .journal_only = 0};
    rt->commands = (hs_commands){.engine = rt->alarms, .sink = &rt->alarm_sink,
                                 .topics = &rt->topics, .max_age_ms = m->command_max_age_ms};
    hs_log(HSP_LOG_NOTICE, "MQTT: %s as %s, topics %s/%s/...", m->uri, m->client_id,
           m->topic_prefix, rt->site.site.name);
    return 0;
}

void hs_rt_mqtt_pump(hs_runtime *rt, int wait_ms)
{
    if (rt->publisher == NULL)
        return;
    if (hs_publisher_pump(rt->publisher, wait_ms, hs_command_on_message, &rt->commands) != 0)
        hs_log(HSP_LOG_ERR, "outbox: %s", hs_store_error(rt->store));
}

void hs_rt_mqtt_close(hs_runtime *rt, int wait_ms)
{
    if (rt->publisher == NULL)
        return;
    int64_t deadline = hs_rt_mono_ms() + wait_ms;
    int64_t waiting = 0;
    hs_publisher_stats stats;
    for (;;) {
        hs_rt_mqtt_pump(rt, 20);
        hs_store_outbox_count(rt->store, &waiting);
        hs_publisher_stats_get(rt->publisher, &stats);
        if ((waiting == 0 && stats.in_flight == 0) || hs_rt_mono_ms() >= deadline ||
            !stats.connected)
            break;
    }
    if (waiting > 0)
        hs_log(HSP_LOG_WARNING, "MQTT: %lld messages stay in the outbox for the next start%s",
               (long long)waiting, stats.connected ? "" : " (broker not reachable)");
    char topic[HS_TOPIC_MAX];
    char *offline = hs_gateway_payload(&rt->topics, 0);
    if (offline != NULL && stats.connected &&
        hs_topic(topic, sizeof topic, &rt->topics, "gateway", NULL, NULL) == 0)
        hp_mqtt_publish(rt->link, topic, offline, strlen(offline), 1, 1, 0);
    free(offline);
    hs_rt_mqtt_pump(rt, 100);
    hs_publisher_free(rt->publisher);
    rt->publisher = NULL;
    hp_mqtt_free(rt->link, 2000); /* a clean disconnect lets in-flight messages finish */
    rt->link = NULL;
}
