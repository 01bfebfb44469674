/* The simulator's Modbus servers: one thread per bus. TCP: select() over the
 * listening socket and the accepted clients; for each request the unit id
 * picks the device's register image. RTU: frames are cut from the serial
 * line by silence and checked by CRC here, because libmodbus 3.1.6's server
 * receive filters on one slave id and a line carries several devices; the
 * reply is then libmodbus's own. */
#include <arpa/inet.h>
#include <errno.h>
#include <netdb.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/select.h>
#include <sys/socket.h>
#include <time.h>
#include <unistd.h>

#include "sim.h"

#define MAX_CLIENTS 32

typedef struct {
    sim *s;
    int bus;
    pthread_t thread;
    bool started;
} server;

static server servers[64];
static size_t n_servers;

static void sleep_ms(int ms)
{
    struct timespec ts = {ms / 1000, (long)(ms % 1000) * 1000000L};
    while (nanosleep(&ts, &ts) != 0 && errno == EINTR)
        ;
}

/* The simulator serves loopback only: it is a test tool (and our rule). */
static bool loopback(const char *host)
{
    struct in_addr a;
    if (strcmp(host, "localhost") == 0)
        return true;
    return inet_pton(AF_INET, host, &a) == 1 && (ntohl(a.s_addr) >> 24) == 127;
}

/* Answers one request; returns -1 when the connection should close. */
static int answer(sim *s, int bus, modbus_t *ctx, uint8_t *req, int len, int unit_offset)
{
    uint8_t unit = req[unit_offset];
    /* A copy taken under the lock: SIGHUP may change the faults. */
    pthread_mutex_lock(&s->lock);
    const sim_fault *found = sim_fault_for(s, bus, unit);
    sim_fault copy = found ? *found : (sim_fault){.kind = SIM_FAULT_NONE};
    pthread_mutex_unlock(&s->lock);
    const sim_fault *f = &copy;
    if (f->kind == SIM_FAULT_TIMEOUT)
        return 0;
    if (f->kind == SIM_FAULT_DROP)
        return -1;
    if (f->kind == SIM_FAULT_LATENCY)
        sleep_ms(f->latency_ms);
    if (f->kind == SIM_FAULT_EXCEPTION)
        return modbus_reply_exception(ctx, req, MODBUS_EXCEPTION_SLAVE_OR_SERVER_FAILURE) < 0 ? -1 : 0;
    pthread_mutex_lock(&s->lock);
    sim_device *d = sim_device_find(s, bus, unit);
    int rc = d ? modbus_reply(ctx, req, len, d->map)
               /* A gateway whose target does not answer (Modbus Application
                * Protocol v1.1b §7, exception 0B). */
               : modbus_reply_exception(ctx, req, MODBUS_EXCEPTION_GATEWAY_TARGET);
    pthread_mutex_unlock(&s->lock);
    return rc < 0 ? -1 : 0;
}

static void *tcp_server(void *arg)
{
    server *sv = arg;
    sim *s = sv->s;
    const hp_bus_conf *c = &s->site.buses[sv->bus].conf;
    char port[16];
    snprintf(port, sizeof port, "%d", c->port);
    modbus_t *ctx = modbus_new_tcp_pi(c->host, port);
    int listener = ctx ? modbus_tcp_pi_listen(ctx, MAX_CLIENTS) : -1;
    if (listener < 0) {
        fprintf(stderr, "halostage-sim: bus %s: cannot listen on %s:%d: %s\n",
                s->site.buses[sv->bus].name, c->host, c->port, modbus_strerror(errno));
        if (ctx)
            modbus_free(ctx);
        *s->stop = 1;
        return NULL;
    }
    printf("halostage-sim: bus %s serving on %s:%d\n", s->site.buses[sv->bus].name, c->host,
           c->port);
    fflush(stdout);
    int clients[MAX_CLIENTS];
    int n = 0;
    uint8_t req[MODBUS_TCP_MAX_ADU_LENGTH];
    while (!*s->stop) {
        fd_set rd;
        FD_ZERO(&rd);
        FD_SET(listener, &rd);
        int maxfd = listener;
        for (int i = 0; i < n; i++) {
            FD_SET(clients[i], &rd);
            if (clients[i] > maxfd)
                maxfd = clients[i];
        }
        struct timeval tv = {0, 200000};
        if (select(maxfd + 1, &rd, NULL, NULL, &tv) <= 0)
            continue;
        if (FD_ISSET(listener, &rd)) {
            int fd = accept(listener, NULL, NULL);
            if (fd >= 0 && n < MAX_CLIENTS && fd < FD_SETSIZE)
                clients[n++] = fd;
            else if (fd >= 0)
                close(fd);
        }
        for (int i = 0; i < n; i++) {
            if (!FD_ISSET(clients[i], &rd))
                continue;
            modbus_set_socket(ctx, clients[i]);
            int len = modbus_receive(ctx, req);
            int keep = len > 0 ? answer(s, sv->bus, ctx, req, len, 6) : (len == 0 ? 0 : -1);
            if (keep < 0) {
                close(clients[i]);
                clients[i--] = clients[--n];
            }
        }
    }
    for (int i = 0; i < n; i++)
        close(clients[i]);
    close(listener);
    modbus_free(ctx);
    return NULL;
}

/* Modbus over Serial Line v1.02 §6.2.2: CRC-16, polynomial 0xA001 reflected. */
static uint16_t crc16(const uint8_t *p, int n)
{
    uint16_t crc = 0xFFFF;
    for (int i = 0; i < n; i++) {
        crc ^= p[i];
        for (int b = 0; b < 8; b++)
            crc = (crc & 1u) ? (uint16_t)((crc >> 1) ^ 0xA001u) : (uint16_t)(crc >> 1);
    }
    return crc;
}

static void *rtu_server(void *arg)
{
    server *sv = arg;
    sim *s = sv->s;
    const hp_bus_conf *c = &s->site.buses[sv->bus].conf;
    static const char parity[] = {'N', 'E', 'O'};
    const char *path = s->rtu_path[sv->bus];
    modbus_t *ctx = modbus_new_rtu(path, c->baud, parity[c->parity % 3], c->data_bits,
                                   c->stop_bits);
    if (!ctx || modbus_connect(ctx) != 0) {
        fprintf(stderr, "halostage-sim: bus %s: cannot open %s: %s\n",
                s->site.buses[sv->bus].name, path, modbus_strerror(errno));
        if (ctx)
            modbus_free(ctx);
        *s->stop = 1;
        return NULL;
    }
    int fd = modbus_get_socket(ctx);
    printf("halostage-sim: bus %s serving RTU on %s\n", s->site.buses[sv->bus].name, path);
    fflush(stdout);
    uint8_t frame[MODBUS_RTU_MAX_ADU_LENGTH];
    int len = 0;
    while (!*s->stop) {
        fd_set rd;
        FD_ZERO(&rd);
        FD_SET(fd, &rd);
        /* A frame ends after a silence; 3.5 characters at 9600 baud is 4 ms,
         * a pty needs a little more slack. */
        struct timeval tv = {0, len > 0 ? 15000 : 200000};
        int r = select(fd + 1, &rd, NULL, NULL, &tv);
        if (r > 0) {
            ssize_t got = read(fd, frame + len, sizeof frame - (size_t)len);
            if (got > 0)
                len += (int)got;
            if (len >= (int)sizeof frame)
                len = 0; /* garbage longer than any frame: drop it */
            continue;
        }
        if (r < 0 || len == 0)
            continue;
        if (len >= 4 && crc16(frame, len - 2) ==
                            (uint16_t)(frame[len - 2] | ((uint16_t)frame[len - 1] << 8))) {
            modbus_set_slave(ctx, frame[0]);
            pthread_mutex_lock(&s->lock);
            bool known = sim_device_find(s, sv->bus, frame[0]) != NULL;
            pthread_mutex_unlock(&s->lock);
            if (known) /* on a serial line an absent device is silent */
                (void)answer(s, sv->bus, ctx, frame, len, 0);
        }
        len = 0;
    }
    modbus_close(ctx);
    modbus_free(ctx);
    return NULL;
}

int sim_servers_start(sim *s)
{
    for (size_t b = 0; b < s->site.n_buses && n_servers < 64; b++) {
        const hp_bus_conf *c = &s->site.buses[b].conf;
        if (c->kind == HP_BUS_TCP && !loopback(c->host)) {
            fprintf(stderr, "halostage-sim: bus %s: %s is not a loopback address; the "
                    "simulator serves 127.0.0.0/8 only\n", s->site.buses[b].name, c->host);
            return -1;
        }
        if (c->kind == HP_BUS_RTU && (b >= 16 || !s->rtu_path[b])) {
            fprintf(stderr, "halostage-sim: bus %s is rtu: give --rtu %s=PTY\n",
                    s->site.buses[b].name, s->site.buses[b].name);
            return -1;
        }
        server *sv = &servers[n_servers];
        sv->s = s;
        sv->bus = (int)b;
        if (pthread_create(&sv->thread, NULL, c->kind == HP_BUS_TCP ? tcp_server : rtu_server,
                           sv) != 0) {
            fprintf(stderr, "halostage-sim: cannot start a thread\n");
            return -1;
        }
        sv->started = true;
        n_servers++;
    }
    return 0;
}

void sim_servers_join(sim *s)
{
    (void)s;
    for (size_t i = 0; i < n_servers; i++)
        if (servers[i].started)
            pthread_join(servers[i].thread, NULL);
    n_servers = 0;
}
