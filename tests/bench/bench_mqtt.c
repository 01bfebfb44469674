/* MQTT benchmark (make bench), against a real mosquitto that it starts on a
 * free loopback port and stops by PID: messages per second from the outbox
 * to the broker (QoS 1, each row deleted on its PUBACK) while they are
 * produced, and the time to drain a 10,000-message backlog queued while the
 * broker was away, for two in-flight windows. Prints figures only. */
#include <arpa/inet.h>
#include <fcntl.h>
#include <netinet/in.h>
#include <signal.h>
#include <spawn.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "hs_publish.h"

extern char **environ;

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static int free_port(void)
{
    int fd = socket(AF_INET, SOCK_STREAM, 0);
    struct sockaddr_in a = {.sin_family = AF_INET, .sin_addr.s_addr = htonl(INADDR_LOOPBACK)};
    socklen_t len = sizeof a;
    if (fd < 0 || bind(fd, (struct sockaddr *)&a, sizeof a) != 0 ||
        getsockname(fd, (struct sockaddr *)&a, &len) != 0) {
        if (fd >= 0)
            close(fd);
        return -1;
    }
    close(fd);
    return ntohs(a.sin_port);
}

static int port_open(int port)
{
    int fd = socket(AF_INET, SOCK_STREAM, 0);
    struct sockaddr_in a = {.sin_family = AF_INET, .sin_port = htons((uint16_t)port),
                            .sin_addr.s_addr = htonl(INADDR_LOOPBACK)};
    int ok = fd >= 0 && connect(fd, (struct sockaddr *)&a, sizeof a) == 0;
    if (fd >= 0)
        close(fd);
    return ok;
}

static pid_t start_broker(const char *dir, int port)
{
    char conf[600], log[600];
    snprintf(conf, sizeof conf, "%s/mosquitto.conf", dir);
    snprintf(log, sizeof log, "%s/mosquitto.log", dir);
    FILE *f = fopen(conf, "w");
    if (f == NULL)
        return -1;
    fprintf(f, "listener %d 127.0.0.1\nallow_anonymous true\npersistence false\n"
               "max_queued_messages 100000\n%s",
            port, getuid() == 0 ? "user root\n" : "");
    fclose(f);
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, log, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    posix_spawn_file_actions_adddup2(&fa, 1, 2);
    char *argv[] = {"mosquitto", "-c", conf, NULL};
    pid_t pid;
    int rc = posix_spawnp(&pid, "mosquitto", &fa, NULL, argv, environ);
    posix_spawn_file_actions_destroy(&fa);
    if (rc != 0)
        return -1;
    for (int i = 0; i < 200 && !port_open(port); i++) {
        struct timespec ts = {0, 25000000L};
        nanosleep(&ts, NULL);
    }
    return port_open(port) ? pid : -1;
}

static const char payload[] =
    "{\"event_id\":1,\"episode_id\":1,\"time\":\"2026-01-01T00:00:00.000Z\",\"pond\":\"east-1\","
    "\"rule\":\"density-band\",\"kind\":\"density-band\",\"from\":\"normal\",\"state\":"
    "\"unacknowledged\",\"active\":true,\"cause\":\"condition-raised\",\"priority\":\"medium\","
    "\"quantity\":\"density_kg_m3\",\"value\":1250.0,\"limit\":1200.0,\"actor\":null,"
    "\"note\":null}";

static int waiting(hs_store *st)
{
    int64_t n = -1;
    hs_store_outbox_count(st, &n);
    return (int)n;
}

/* One run: a store, a link with the given window; returns 0 / -1. */
static int run(const char *dir, int port, int window, int live, int count, double *secs)
{
    char db[600], err[600], uri[64];
    snprintf(db, sizeof db, "%s/bench-%d-%d.db", dir, window, live);
    snprintf(uri, sizeof uri, "mqtt://127.0.0.1:%d", port);
    hs_store *st = hs_store_open(db, HS_STORE_WRITE, NULL, err, sizeof err);
    hs_topics t;
    hs_topics_init(&t, "halostage", "bench");
    hp_mqtt_options o = {.uri = uri, .client_id = "hs-bench", .max_inflight = window};
    hp_mqtt *link = st ? hp_mqtt_new(&o, err, sizeof err) : NULL;
    hs_publisher *pub = link ? hs_publisher_new(st, link, &t, window) : NULL;
    int rc = -1;
    if (pub == NULL)
        goto out;
    if (!live) { /* the backlog builds up while nothing is connected */
        for (int i = 0; i < count; i++)
            hs_store_outbox_put(st, HS_MSG_ALARM, "halostage/bench/alarm/east-1/band", payload,
                                sizeof payload - 1, 1, 0);
        hs_store_flush(st);
    }
    if (hp_mqtt_start(link, err, sizeof err) != 0)
        goto out;
    hs_publisher_stats ps;
    double deadline = now_s() + 10;
    do { /* connecting is not what we measure */
        hs_publisher_pump(pub, 5, NULL, NULL);
        hs_publisher_stats_get(pub, &ps);
    } while (!ps.connected && now_s() < deadline);
    double t0 = now_s();
    int made = live ? 0 : count;
    deadline = t0 + 60;
    while ((made < count || waiting(st) > 0) && now_s() < deadline) {
        for (int k = 0; live && k < 100 && made < count; k++, made++)
            hs_store_outbox_put(st, HS_MSG_ALARM, "halostage/bench/alarm/east-1/band", payload,
                                sizeof payload - 1, 1, 0);
        hs_publisher_pump(pub, 1, NULL, NULL);
    }
    *secs = now_s() - t0;
    rc = waiting(st) == 0 ? 0 : -1;
out:
    if (rc != 0)
        fprintf(stderr, "bench_mqtt: %s\n", st ? hs_store_error(st) : err);
    hs_publisher_free(pub);
    hp_mqtt_free(link, 1000);
    hs_store_close(st);
    return rc;
}

int main(void)
{
    char dir[] = "/tmp/hs-bench-mqtt.XXXXXX";
    if (mkdtemp(dir) == NULL)
        return 1;
    int port = free_port(), rc = 0;
    pid_t broker = port > 0 ? start_broker(dir, port) : -1;
    if (broker < 0) {
        fprintf(stderr, "bench_mqtt: cannot start mosquitto on a loopback port\n");
        rc = 1;
    }
    printf("MQTT to a local mosquitto, QoS 1, %zu-byte alarm payloads, each outbox row "
           "deleted on its PUBACK:\n", sizeof payload - 1);
    static const int windows[] = {1, 32, 256};
    for (size_t w = 0; rc == 0 && w < 3; w++) {
        double live_s = 0, drain_s = 0;
        if (run(dir, port, windows[w], 1, 20000, &live_s) != 0 ||
            run(dir, port, windows[w], 0, 10000, &drain_s) != 0) {
            rc = 1;
            break;
        }
        printf("  window %3d: produced and sent %6.0f msg/s; 10000-message backlog drained "
               "in %.2f s (%.0f msg/s)\n", windows[w], 20000 / live_s, drain_s,
               10000 / drain_s);
    }
    if (broker > 0) {
        kill(broker, SIGTERM);
        waitpid(broker, NULL, 0);
    }
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    if (system(cmd) != 0)
        rc = 1;
    return rc;
}
