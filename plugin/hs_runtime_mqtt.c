/* MQTT for the runtime: the link from [mqtt], the outbox pump with inbound
 * commands, and a clean goodbye. Without [mqtt] the alarm journal and the
 * CLI's queued commands still work; nothing is queued for publishing. */
#include <stdlib.h>
#include <string.h>

#include "hs_conf_mqtt.h"
#include "hs_log.h"
#include "hs_runtime_private.h"
#include "hs_secret.h"

int hs_rt_mqtt_open(hs_runtime *rt)
{
    const hs_mqtt_conf *c = rt->site.mqtt;
    rt->link = NULL;
    rt->publisher = NULL;
    if (hs_topics_init(&rt->topics, c ? c->topic_prefix : "halostage", rt->site.site.name) != 0) {
        hs_log(HSP_LOG_ERR, "mqtt: topic prefix or site name cannot be a topic");
        return -1;
    }
    rt->alarm_sink = (hs_alarm_sink){.store = rt->store, .topics = &rt->topics,
                                     .journal_only = c == NULL};
    rt->commands = (hs_commands){.engine = rt->alarms, .sink = &rt->alarm_sink,
                                 .topics = &rt->topics};
    if (c == NULL) {
        hs_log(HSP_LOG_NOTICE, "no [mqtt] section: publishing is off");
        return 0;
    }
    hs_store_set_outbox_max(rt->store, c->outbox_max);
    char password[256] = "", err[HS_PATH_MAX + 128];
    if (c->password_file[0] &&
        hs_read_secret(c->password_file, password, sizeof password, err, sizeof err) != 0) {
        hs_log(HSP_LOG_ERR, "mqtt: %s", err);
        return -1;
    }
    char will_topic[HS_TOPIC_MAX], subscribe[HS_TOPIC_MAX], client_id[64];
    char *will = hs_gateway_payload(&rt->topics, 0);
    if (will == NULL || hs_topic(will_topic, sizeof will_topic, &rt->topics, "gateway", NULL,
                                 NULL) != 0 ||
        hs_topic_commands(subscribe, sizeof subscribe, &rt->topics) != 0) {
        free(will);
        hs_log(HSP_LOG_ERR, "mqtt: topics too long");
        return -1;
    }
    hp_mqtt_options o;
    hs_conf_mqtt_options(&rt->site, c, password[0] ? password : NULL, will_topic, will,
                         subscribe, client_id, sizeof client_id, &o);
    rt->link = hp_mqtt_new(&o, err, sizeof err);
    explicit_bzero(password, sizeof password);
    free(will);
    if (rt->link == NULL) {
        hs_log(HSP_LOG_ERR, "%s", err);
        return -1;
    }
    rt->publisher = hs_publisher_new(rt->store, rt->link, &rt->topics, (int)c->max_inflight);
    if (rt->publisher == NULL || hp_mqtt_start(rt->link, err, sizeof err) != 0) {
        hs_log(HSP_LOG_ERR, "mqtt: %s", rt->publisher ? err : "out of memory");
        hs_publisher_free(rt->publisher);
        hp_mqtt_free(rt->link, 0);
        rt->publisher = NULL;
        rt->link = NULL;
        return -1;
    }
    hs_log(HSP_LOG_NOTICE, "mqtt: connecting to %s as %s", c->uri, client_id);
    return 0;
}

void hs_rt_mqtt_pump(hs_runtime *rt, int wait_ms)
{
    if (rt->publisher == NULL)
        return;
    hs_publisher_stats before, after;
    hs_publisher_stats_get(rt->publisher, &before);
    if (hs_publisher_pump(rt->publisher, wait_ms, hs_command_on_message, &rt->commands) != 0)
        hs_log(HSP_LOG_ERR, "mqtt outbox: %s", hs_store_error(rt->store));
    hs_publisher_stats_get(rt->publisher, &after);
    if (after.connected != before.connected)
        hs_log(after.connected ? HSP_LOG_NOTICE : HSP_LOG_WARNING, "mqtt: %s",
               after.connected ? "connected" : "disconnected; the outbox keeps every message");
}

void hs_rt_mqtt_close(hs_runtime *rt, int wait_ms)
{
    if (rt->publisher == NULL)
        return;
    /* Give the broker a moment to take what is queued; the rest stays in the
     * outbox for the next start. */
    for (int waited = 0; waited < wait_ms; waited += 50) {
        int64_t waiting = 0;
        hs_publisher_stats st;
        hs_publisher_stats_get(rt->publisher, &st);
        if (!st.connected || hs_store_outbox_count(rt->store, &waiting) != 0 || waiting == 0)
            break;
        hs_publisher_pump(rt->publisher, 50, NULL, NULL);
    }
    hs_publisher_goodbye(rt->publisher, wait_ms < 2000 ? wait_ms : 2000);
    hs_publisher_free(rt->publisher);
    hp_mqtt_free(rt->link, 1000);
    rt->publisher = NULL;
    rt->link = NULL;
}
