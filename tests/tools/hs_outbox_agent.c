/* Test helper for the MQTT and store integration scripts. Two modes:
 *
 *   hs_outbox_agent --db FILE --uri URI [--alarms N] [--pace-ms MS] [--link-inflight N]
 *       [--ca FILE] [--cert FILE --key FILE] [--user NAME --password-file FILE]
 *       [--prefix P] [--site S] [--commands] [--timeout-s S] [--keep-running]
 *     Raises and clears one alarm N times through the real alarm engine (each
 *     a journal row plus an outbox row), pumps the outbox to the broker and,
 *     with --commands, answers inbound commands and those that
 *     `halostage ack` queued in the store. Prints "connected",
 *     "generated N" and finally "drained" when every row was acknowledged.
 *     --link-inflight sets the link's max_inflight (publishes written and
 *     not yet acknowledged); the publisher's window stays 32, so the rest
 *     waits in the client library's queue. At the end it prints the
 *     publisher's counters ("stats sent N delivered N ...").
 *     Exits 0 when drained, 1 on timeout, 78 on a refused option.
 *
 *   hs_outbox_agent --db FILE --write-samples
 *     Writes samples in batches of 500 forever, printing "committed N" after
 *     each commit, until it is killed (for the SIGKILL test).
 */
#include <errno.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_alarm.h"
#include "hs_command.h"
#include "hs_publish.h"
#include "hs_secret.h"
#include "hs_store.h"

static volatile sig_atomic_t stop;
static void on_term(int sig) { (void)sig; stop = 1; }

static int64_t now_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static int write_samples(hs_store *st)
{
    int64_t n = 0;
    for (;;) {
        for (int i = 0; i < 500; i++, n++)
            if (hs_store_add_sample(st, "east-1.conductivity", 1000 + n, 50.0 + (double)(n % 7),
                                    HS_QUALITY_GOOD) != 0) {
                fprintf(stderr, "%s\n", hs_store_error(st));
                return 1;
            }
        /* an alarm-kind row: a state would replace the previous one */
        if (hs_store_outbox_put(st, HS_MSG_ALARM, "halostage/demo/alarm/east-1/band", "{}", 2,
                                1, 0) < 0 ||
            hs_store_flush(st) != 0) {
            fprintf(stderr, "%s\n", hs_store_error(st));
            return 1;
        }
        printf("committed %lld\n", (long long)n);
        fflush(stdout);
    }
}

int main(int argc, char **argv)
{
    const char *db = NULL, *prefix = "halostage", *site = "demo", *pwfile = NULL;
    hp_mqtt_options mo = {0};
    long alarms = 0, pace_ms = 20, timeout_s = 60;
    int commands = 0, samples = 0, keep_running = 0;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i], *v = i + 1 < argc ? argv[i + 1] : NULL;
        if (strcmp(a, "--commands") == 0) { commands = 1; continue; }
        if (strcmp(a, "--write-samples") == 0) { samples = 1; continue; }
        if (strcmp(a, "--keep-running") == 0) { keep_running = 1; continue; }
        if (v == NULL) {
            fprintf(stderr, "hs_outbox_agent: %s needs a value\n", a);
            return 2;
        }
        i++;
        if (strcmp(a, "--db") == 0) db = v;
        else if (strcmp(a, "--uri") == 0) mo.uri = v;
        else if (strcmp(a, "--ca") == 0) mo.ca_file = v;
        else if (strcmp(a, "--cert") == 0) mo.cert_file = v;
        else if (strcmp(a, "--key") == 0) mo.key_file = v;
        else if (strcmp(a, "--user") == 0) mo.username = v;
        else if (strcmp(a, "--password-file") == 0) pwfile = v;
        else if (strcmp(a, "--prefix") == 0) prefix = v;
        else if (strcmp(a, "--site") == 0) site = v;
        else if (strcmp(a, "--alarms") == 0) alarms = strtol(v, NULL, 10);
        else if (strcmp(a, "--pace-ms") == 0) pace_ms = strtol(v, NULL, 10);
        else if (strcmp(a, "--timeout-s") == 0) timeout_s = strtol(v, NULL, 10);
        else if (strcmp(a, "--link-inflight") == 0) mo.max_inflight = (int)strtol(v, NULL, 10);
        else {
            fprintf(stderr, "hs_outbox_agent: unknown option %s\n", a);
            return 2;
        }
    }
    if (db == NULL) {
        fprintf(stderr, "hs_outbox_agent: --db is required\n");
        return 2;
    }
    setvbuf(stdout, NULL, _IOLBF, 0);
    signal(SIGTERM, on_term);
    signal(SIGINT, on_term);
    char err[512], password[256];
    hs_store *st = hs_store_open(db, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "%s\n", err);
        return 1;
    }
    if (samples)
        return write_samples(st);
    if (pwfile) {
        if (hs_read_secret(pwfile, password, sizeof password, err, sizeof err) != 0) {
            fprintf(stderr, "hs_outbox_agent: %s\n", err);
            hs_store_close(st);
            return 78;
        }
        mo.password = password;
    }
    hs_topics topics;
    if (hs_topics_init(&topics, prefix, site) != 0) {
        fprintf(stderr, "hs_outbox_agent: bad prefix or site\n");
        hs_store_close(st);
        return 78;
    }
    char will_topic[HS_TOPIC_MAX], sub[HS_TOPIC_MAX];
    char *will = hs_gateway_payload(&topics, 0);
    hs_topic(will_topic, sizeof will_topic, &topics, "gateway", NULL, NULL);
    hs_topic_commands(sub, sizeof sub, &topics);
    mo.client_id = "hs-outbox-agent";
    mo.will_topic = will_topic;
    mo.will_payload = will;
    mo.will_retained = 1;
    mo.min_retry_s = 1;
    mo.max_retry_s = 2;
    mo.subscribe = commands ? sub : NULL;
    hp_mqtt *link = hp_mqtt_new(&mo, err, sizeof err);
    free(will);
    if (link == NULL) {
        fprintf(stderr, "hs_outbox_agent: %s\n", err);
        hs_store_close(st);
        return 78;
    }
    if (hp_mqtt_start(link, err, sizeof err) != 0) {
        fprintf(stderr, "hs_outbox_agent: %s\n", err);
        hp_mqtt_free(link, 0);
        hs_store_close(st);
        return 1;
    }
    uint64_t last = 0;
    hs_store_last_event_id(st, &last);
    hs_alarm_engine *eng = hs_alarm_new(last + 1);
    hs_alarm_rule rule;
    hs_alarm_rule_default(&rule, HS_RULE_DENSITY_BAND);
    snprintf(rule.name, sizeof rule.name, "band");
    rule.low = 1100;
    rule.high = 1200;
    rule.on_delay_ms = rule.off_delay_ms = 0;
    hs_alarm_add(eng, &rule, "east-1");
    hs_alarm_sink sink = {.store = st, .topics = &topics};
    hs_commands cmds = {.engine = eng, .sink = &sink, .topics = &topics};
    hs_publisher *pub = hs_publisher_new(st, link, &topics, 32);
    int rc = 1, was_connected = 0;
    long generated = 0;
    int64_t start = now_ms(), next = start, next_queue = start;
    hc_brine_state s;
    hc_state_clear(&s);
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &s;
    while (!stop && now_ms() - start < timeout_s * 1000) {
        if (generated < alarms && now_ms() >= next) {
            s.density_kg_m3 = generated % 2 == 0 ? 1250.0 : 1150.0;
            s.density_ref_kg_m3 = s.density_kg_m3; /* what the band compares */
            hs_alarm_update(eng, "east-1", &in, now_ms(), hs_alarm_sink_emit, &sink);
            generated++;
            next += pace_ms;
            if (hs_store_flush(st) != 0 || sink.errors) {
                fprintf(stderr, "store: %s\n", hs_store_error(st));
                break;
            }
            if (generated == alarms || generated % 100 == 0)
                printf("generated %ld\n", generated);
        }
        if (commands && now_ms() >= next_queue) {
            hs_store_command_take(st, hs_command_from_queue, &cmds);
            next_queue = now_ms() + 100;
        }
        if (hs_publisher_pump(pub, 10, commands ? hs_command_on_message : NULL, &cmds) != 0) {
            fprintf(stderr, "store: %s\n", hs_store_error(st));
            break;
        }
        hs_publisher_stats ps;
        hs_publisher_stats_get(pub, &ps);
        if (ps.connected && !was_connected)
            printf("connected\n");
        if (!ps.connected && was_connected)
            printf("disconnected\n");
        was_connected = ps.connected;
        int64_t waiting = -1;
        hs_store_outbox_count(st, &waiting);
        if (generated >= alarms && waiting == 0 && ps.in_flight == 0 && !keep_running) {
            printf("drained\n");
            rc = 0;
            break;
        }
    }
    if (stop)
        rc = 0;
    hs_publisher_stats fin;
    hs_publisher_stats_get(pub, &fin);
    printf("stats sent %lld delivered %lld failed %lld refused %lld stale %lld in_flight %lld "
           "connects %lld\n",
           (long long)fin.sent, (long long)fin.delivered, (long long)fin.failed,
           (long long)fin.refused, (long long)fin.stale, (long long)fin.in_flight,
           (long long)fin.connects);
    hs_publisher_goodbye(pub, 2000);
    hs_publisher_free(pub);
    hp_mqtt_free(link, 1000);
    hs_alarm_free(eng);
    hs_store_close(st);
    explicit_bzero(password, sizeof password);
    return rc;
}
