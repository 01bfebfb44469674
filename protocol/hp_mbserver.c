/* Read-only Modbus TCP server (see hp_mbserver.h). Ownership: the server
 * owns its sockets, its client table and its copy of the options; the
 * thread is joined in hp_mbserver_stop(). */
#include <errno.h>
#include <fcntl.h>
#include <netinet/in.h>
#include <netinet/tcp.h>
#include <poll.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <time.h>
#include <unistd.h>

#include "hp_mbserver.h"

#define MBAP_LEN 7
#define ADU_MAX 260 /* MBAP + 253-byte PDU, Modbus Messaging on TCP/IP v1.0b §3.1.3 */

struct client {
    int fd;
    uint8_t buf[ADU_MAX];
    size_t used;
    int64_t last_ms; /* monotonic time of the last complete request (or accept) */
};

struct hp_mbserver {
    hp_mbserver_options opt;
    hp_acl allow;
    int listen_fd;
    int wake[2];               /* a byte here ends the thread */
    int port;
    struct client *clients;    /* max_clients slots; fd -1 when free */
    pthread_t thread;
    int thread_started;
    pthread_mutex_t lock;      /* guards stats */
    hp_mbserver_stats stats;
};

static int64_t mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static void count(hp_mbserver *s, uint64_t *field)
{
    pthread_mutex_lock(&s->lock);
    (*field)++;
    pthread_mutex_unlock(&s->lock);
}

static void drop(hp_mbserver *s, struct client *c)
{
    close(c->fd);
    c->fd = -1;
    c->used = 0;
    pthread_mutex_lock(&s->lock);
    s->stats.dropped++;
    s->stats.clients--;
    pthread_mutex_unlock(&s->lock);
}

static void accept_one(hp_mbserver *s)
{
    struct sockaddr_storage peer;
    socklen_t len = sizeof peer;
    int fd = accept4(s->listen_fd, (struct sockaddr *)&peer, &len, SOCK_NONBLOCK | SOCK_CLOEXEC);
    if (fd < 0)
        return;
    if (!hp_acl_allows(&s->allow, (struct sockaddr *)&peer)) {
        close(fd);
        count(s, &s->stats.refused);
        return;
    }
    for (unsigned i = 0; i < s->opt.max_clients; i++)
        if (s->clients[i].fd < 0) {
            int one = 1;
            setsockopt(fd, IPPROTO_TCP, TCP_NODELAY, &one, sizeof one);
            s->clients[i] = (struct client){.fd = fd, .used = 0, .last_ms = mono_ms()};
            pthread_mutex_lock(&s->lock);
            s->stats.clients++;
            pthread_mutex_unlock(&s->lock);
            return;
        }
    close(fd); /* full: the newcomer waits, the polling clients do not */
    count(s, &s->stats.refused);
}

static uint16_t be16(const uint8_t *p) { return (uint16_t)(((unsigned)p[0] << 8) | p[1]); }

/* Builds the reply to one request ADU (req, MBAP + PDU) into out; returns
 * its length. */
static size_t answer(hp_mbserver *s, const uint8_t *req, size_t req_len, uint8_t *out)
{
    uint8_t unit = req[6], fc = req[7];
    size_t pdu_len = req_len - MBAP_LEN;
    int exc = 0;
    uint16_t regs[HP_MB_MAX_READ];
    uint16_t n = 0;
    if (fc != 3 && fc != 4)
        exc = 0x01; /* first: a write is refused whatever unit it names */
    else if (s->opt.unit_id != 0 && unit != s->opt.unit_id)
        exc = 0x0B; /* gateway target device failed to respond */
    else if (pdu_len != 5)
        exc = 0x03;
    else {
        uint16_t addr = be16(req + 8);
        n = be16(req + 10);
        if (n < 1 || n > HP_MB_MAX_READ)
            exc = 0x03;
        else if ((uint32_t)addr + n > 65536u)
            exc = 0x02;
        else
            exc = s->opt.read(s->opt.ctx, addr, n, regs);
    }
    memcpy(out, req, 4); /* transaction and protocol id echo the request */
    out[6] = unit;
    size_t len;
    if (exc != 0) {
        out[7] = (uint8_t)(fc | 0x80);
        out[8] = (uint8_t)exc;
        len = 9;
        count(s, &s->stats.exceptions);
    } else {
        out[7] = fc;
        out[8] = (uint8_t)(2 * n);
        for (uint16_t i = 0; i < n; i++) {
            out[9 + 2 * i] = (uint8_t)(regs[i] >> 8);
            out[10 + 2 * i] = (uint8_t)(regs[i] & 0xFF);
        }
        len = 9 + 2u * n;
    }
    uint16_t follow = (uint16_t)(len - 6);
    out[4] = (uint8_t)(follow >> 8);
    out[5] = (uint8_t)(follow & 0xFF);
    count(s, &s->stats.requests);
    return len;
}

/* Reads what the client sent and answers every complete frame. Returns -1
 * when the client must go. */
static int serve(hp_mbserver *s, struct client *c)
{
    ssize_t got = recv(c->fd, c->buf + c->used, sizeof c->buf - c->used, 0);
    if (got == 0)
        return -1;
    if (got < 0)
        return errno == EAGAIN || errno == EINTR ? 0 : -1;
    c->used += (size_t)got;
    while (c->used >= MBAP_LEN) {
        uint16_t proto = be16(c->buf + 2), follow = be16(c->buf + 4);
        if (proto != 0 || follow < 2 || follow > ADU_MAX - 6)
            return -1;
        size_t frame = 6u + follow;
        if (c->used < frame)
            break;
        uint8_t out[ADU_MAX];
        size_t len = answer(s, c->buf, frame, out);
        ssize_t sent = send(c->fd, out, len, MSG_NOSIGNAL | MSG_DONTWAIT);
        if (sent != (ssize_t)len)
            return -1; /* not reading its replies: no reply queue grows for it */
        memmove(c->buf, c->buf + frame, c->used - frame);
        c->used -= frame;
        c->last_ms = mono_ms();
    }
    return 0;
}

static void *run(void *arg)
{
    hp_mbserver *s = arg;
    unsigned cap = s->opt.max_clients + 2;
    struct pollfd *fds = calloc(cap, sizeof *fds);
    unsigned *slot = calloc(cap, sizeof *slot);
    if (fds == NULL || slot == NULL) {
        free(fds);
        free(slot);
        return NULL;
    }
    for (;;) {
        unsigned n = 0;
        fds[n++] = (struct pollfd){.fd = s->wake[0], .events = POLLIN};
        fds[n++] = (struct pollfd){.fd = s->listen_fd, .events = POLLIN};
        for (unsigned i = 0; i < s->opt.max_clients; i++)
            if (s->clients[i].fd >= 0) {
                slot[n] = i;
                fds[n++] = (struct pollfd){.fd = s->clients[i].fd, .events = POLLIN};
            }
        int rc = poll(fds, n, 1000);
        if (rc < 0 && errno != EINTR)
            break;
        if (fds[0].revents)
            break;
        int64_t now = mono_ms();
        for (unsigned k = 2; rc > 0 && k < n; k++) {
            struct client *c = &s->clients[slot[k]];
            if (fds[k].revents & (POLLIN | POLLERR | POLLHUP))
                if (serve(s, c) != 0)
                    drop(s, c);
        }
        if (rc > 0 && (fds[1].revents & POLLIN))
            accept_one(s);
        for (unsigned i = 0; i < s->opt.max_clients; i++)
            if (s->clients[i].fd >= 0 && now - s->clients[i].last_ms > s->opt.idle_timeout_ms)
                drop(s, &s->clients[i]);
    }
    free(fds);
    free(slot);
    return NULL;
}

hp_mbserver *hp_mbserver_start(const hp_mbserver_options *opt, char *err, size_t errlen)
{
    struct sockaddr_storage addr;
    socklen_t alen;
    char why[160];
    if (opt->read == NULL || hp_listen_parse(opt->listen, &addr, &alen, why, sizeof why) != 0) {
        snprintf(err, errlen, "modbus server: listen %s", opt->read ? why : "without data");
        return NULL;
    }
    hp_mbserver *s = calloc(1, sizeof *s);
    if (s == NULL) {
        snprintf(err, errlen, "modbus server: out of memory");
        return NULL;
    }
    s->opt = *opt;
    s->opt.listen = NULL; /* not kept */
    if (opt->allow != NULL)
        s->allow = *opt->allow;
    if (s->opt.max_clients == 0)
        s->opt.max_clients = 8;
    if (s->opt.idle_timeout_ms <= 0)
        s->opt.idle_timeout_ms = 60000;
    s->listen_fd = s->wake[0] = s->wake[1] = -1;
    pthread_mutex_init(&s->lock, NULL);
    s->clients = calloc(s->opt.max_clients, sizeof *s->clients);
    if (s->clients == NULL)
        goto fail;
    for (unsigned i = 0; i < s->opt.max_clients; i++)
        s->clients[i].fd = -1;
    if (pipe2(s->wake, O_CLOEXEC | O_NONBLOCK) != 0)
        goto fail;
    s->listen_fd = socket(addr.ss_family, SOCK_STREAM | SOCK_NONBLOCK | SOCK_CLOEXEC, 0);
    int one = 1;
    if (s->listen_fd < 0 ||
        setsockopt(s->listen_fd, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one) != 0 ||
        bind(s->listen_fd, (struct sockaddr *)&addr, alen) != 0 || listen(s->listen_fd, 16) != 0)
        goto fail;
    struct sockaddr_storage bound;
    socklen_t blen = sizeof bound;
    if (getsockname(s->listen_fd, (struct sockaddr *)&bound, &blen) == 0)
        s->port = ntohs(bound.ss_family == AF_INET ? ((struct sockaddr_in *)&bound)->sin_port
                                                   : ((struct sockaddr_in6 *)&bound)->sin6_port);
    if (pthread_create(&s->thread, NULL, run, s) != 0)
        goto fail;
    s->thread_started = 1;
    return s;
fail:
    snprintf(err, errlen, "modbus server: cannot listen on %s: %s", opt->listen,
             strerror(errno));
    hp_mbserver_stop(s);
    return NULL;
}

void hp_mbserver_stop(hp_mbserver *s)
{
    if (s == NULL)
        return;
    if (s->thread_started) {
        ssize_t w = write(s->wake[1], "x", 1);
        (void)w;
        pthread_join(s->thread, NULL);
    }
    for (unsigned i = 0; s->clients != NULL && i < s->opt.max_clients; i++)
        if (s->clients[i].fd >= 0)
            close(s->clients[i].fd);
    if (s->listen_fd >= 0)
        close(s->listen_fd);
    if (s->wake[0] >= 0)
        close(s->wake[0]);
    if (s->wake[1] >= 0)
        close(s->wake[1]);
    free(s->clients);
    pthread_mutex_destroy(&s->lock);
    free(s);
}

void hp_mbserver_stats_get(hp_mbserver *s, hp_mbserver_stats *out)
{
    pthread_mutex_lock(&s->lock);
    *out = s->stats;
    pthread_mutex_unlock(&s->lock);
}

int hp_mbserver_port(const hp_mbserver *s) { return s->port; }
