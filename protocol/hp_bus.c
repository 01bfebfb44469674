/* Bus worker; see hp_bus.h. Everything below `worker-owned` is touched only
 * by the bus's own thread; the mutex guards stop and stats. */
#include <errno.h>
#include <math.h>
#include <modbus.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>

#include "hp_bus.h"
#include "hp_outcmd.h"
#include "hp_plan.h"
#include "hp_time.h"

#define TIMEOUTS_BEFORE_DOWN 3 /* timed-out attempts in a row that make a device down */
#define PROBE_INTERVAL_DEFAULT_MS 30000
#define UNITS 256
#define STALE_CHECK_MS 1000

/* Health of one device (unit id) of the bus; see the policy in hp_bus.h. */
typedef struct {
    bool present;        /* has points on this bus */
    bool down;
    bool silent;         /* timed out in this cycle: its other reads stay unsent */
    unsigned timeouts;   /* timed-out attempts in a row */
    int64_t probe_at;    /* monotonic: when a down device is asked next */
} device_health;

struct hp_bus {
    hp_bus_conf conf;
    uint32_t bus_id;
    hp_queue *queue;             /* borrowed */
    bool once;
    pthread_t thread;
    pthread_mutex_t mu;
    pthread_cond_t wake;
    bool stop;                   /* under mu */
    hp_bus_stats stats;          /* under mu */
    hp_outcmd *cmds;             /* output commands, ahead of reads (own lock) */
    int64_t connect_tried_ms;    /* worker-owned: last connection attempt, monotonic */
    /* worker-owned */
    hp_point *points;            /* owned copy, n */
    size_t n;
    modbus_t *ctx;
    bool connected;
    unsigned backoff_step;
    int64_t reconnect_at;
    unsigned seed;
    uint16_t tcp_tid;            /* our own transaction ids (tcp_read) */
    device_health dev[UNITS];    /* by unit id */
    unsigned n_present;          /* devices with points */
    int64_t probe_interval_ms;
    int64_t *next_due;           /* per point, monotonic ms */
    int64_t *last_good;          /* per point, monotonic ms, 0 = never */
    double *last_value;
    int64_t *last_wall;
    bool *stale_sent;
    uint32_t *which, *order;
    hp_read *reads;
};

typedef enum { READ_OK, READ_FAILED, READ_EXCEPTION, READ_LINK_LOST } read_result;

static bool stopping(hp_bus *b)
{
    pthread_mutex_lock(&b->mu);
    bool s = b->stop;
    pthread_mutex_unlock(&b->mu);
    return s;
}

static void sleep_until(hp_bus *b, int64_t mono_ms)
{
    struct timespec ts;
    hp_deadline(mono_ms - hp_mono_ms(), &ts);
    pthread_mutex_lock(&b->mu);
    /* waiting writes wake a connected worker; a disconnected one keeps its
     * reconnect schedule (the writes wait or expire) */
    while (!b->stop && !(b->connected && hp_outcmd_pending(b->cmds)) && hp_mono_ms() < mono_ms)
        if (pthread_cond_timedwait(&b->wake, &b->mu, &ts) == ETIMEDOUT)
            break;
    pthread_mutex_unlock(&b->mu);
}

static void stat_add(hp_bus *b, uint64_t *field, uint64_t n, int err)
{
    pthread_mutex_lock(&b->mu);
    *field += n;
    if (err)
        b->stats.last_errno = err;
    pthread_mutex_unlock(&b->mu);
}

static void emit_failure(hp_bus *b, uint32_t p, int err, int exception)
{
    hp_sample s = {.point = p, .bus = b->bus_id, .quality = HP_Q_COMM_FAIL,
                   .exception = exception, .sys_errno = err, .time_ms = hp_wall_ms()};
    s.raw = s.value = NAN;
    hp_queue_push(b->queue, &s);
}

/* Points with a good value older than stale_after get one stale sample. */
static void emit_stale(hp_bus *b, int64_t now)
{
    for (size_t i = 0; i < b->n; i++) {
        if (b->last_good[i] == 0 || b->stale_sent[i] ||
            now - b->last_good[i] < b->conf.stale_after_ms)
            continue;
        hp_sample s = {.point = (uint32_t)i, .bus = b->bus_id, .quality = HP_Q_STALE,
                       .value = b->last_value[i], .time_ms = b->last_wall[i]};
        s.raw = NAN;
        hp_queue_push(b->queue, &s);
        b->stale_sent[i] = true;
    }
}

static int connect_bus(hp_bus *b)
{
    if (b->ctx)
        modbus_close(b->ctx); /* connect would leak the old socket otherwise */
    if (modbus_connect(b->ctx) != 0)
        return -1;
    if (b->conf.kind == HP_BUS_RTU && b->conf.rs485)
        (void)modbus_rtu_set_serial_mode(b->ctx, MODBUS_RTU_RS485); /* ENOTTY is harmless */
    b->connected = true;
    b->backoff_step = 0;
    /* A fresh link: devices that are down get their probe now (when every
     * device is down, the reconnect delay paces these probes). */
    int64_t now = hp_mono_ms();
    for (unsigned u = 0; u < UNITS; u++)
        if (b->dev[u].down)
            b->dev[u].probe_at = now;
    return 0;
}

static void set_down(hp_bus *b, uint8_t unit, bool down)
{
    device_health *d = &b->dev[unit];
    d->down = down;
    d->probe_at = hp_mono_ms() + b->probe_interval_ms;
    pthread_mutex_lock(&b->mu);
    uint64_t bit = (uint64_t)1 << (unit & 63);
    if (down) {
        b->stats.down_units[unit >> 6] |= bit;
        b->stats.devices_down++;
    } else {
        b->stats.down_units[unit >> 6] &= ~bit;
        b->stats.devices_down--;
    }
    pthread_mutex_unlock(&b->mu);
}

/* The device answered (data or an exception). */
static void device_answered(hp_bus *b, uint8_t unit)
{
    b->dev[unit].timeouts = 0;
    if (b->dev[unit].down)
        set_down(b, unit, false);
}

static bool all_down(const hp_bus *b)
{
    unsigned down = 0;
    for (unsigned u = 0; u < UNITS; u++)
        down += b->dev[u].present && b->dev[u].down;
    return b->n_present > 0 && down == b->n_present;
}

static void schedule_reconnect(hp_bus *b)
{
    int64_t delay = b->conf.backoff_min_ms;
    for (unsigned i = 0; i < b->backoff_step && delay < b->conf.backoff_max_ms; i++)
        delay *= 2;
    if (delay > b->conf.backoff_max_ms)
        delay = b->conf.backoff_max_ms;
    /* Jitter: a uniform draw in [delay/2, delay], so that buses that failed
     * together do not retry together. */
    int64_t half = delay / 2;
    delay = half + (int64_t)(rand_r(&b->seed) % (unsigned)(delay - half + 1));
    if (b->backoff_step < 30)
        b->backoff_step++;
    b->reconnect_at = hp_mono_ms() + delay;
    if (b->connected) {
        modbus_close(b->ctx);
        b->connected = false;
    }
}

static bool link_error(int e)
{
    return e == ECONNRESET || e == EPIPE || e == EBADF || e == ECONNREFUSED ||
           e == ENOTCONN || e == ECONNABORTED || e == EIO;
}

/* Read Holding/Input Registers over TCP with our own MBAP header, because
 * libmodbus 3.1.6 checks a TCP reply's transaction and protocol id but not
 * its unit id: behind a serial gateway a reply from the wrong unit would
 * pass. libmodbus still receives the frame (its timeouts and length rules,
 * modbus_receive_confirmation); every field is checked here against what
 * was asked (Modbus Messaging on TCP/IP Implementation Guide v1.0b §3.1.3
 * MBAP header; Modbus Application Protocol v1.1b §6.3/§6.4, §7 exceptions).
 * Returns the registers read (rd->count), or -1 with errno: the link's,
 * MODBUS_ENOBASE + exception code, EMBBADSLAVE (wrong unit id) or
 * EMBBADDATA (anything else that does not match). */
static int tcp_read(hp_bus *b, const hp_read *rd, uint16_t *regs)
{
    uint8_t req[12], rsp[MODBUS_TCP_MAX_ADU_LENGTH];
    uint8_t fc = rd->table == HP_TABLE_INPUT ? 0x04 : 0x03;
    uint16_t tid = ++b->tcp_tid;
    req[0] = (uint8_t)(tid >> 8);
    req[1] = (uint8_t)tid;
    req[2] = req[3] = 0;            /* protocol id: Modbus */
    req[4] = 0;
    req[5] = 6;                     /* unit id + 5 PDU bytes follow */
    req[6] = rd->unit_id;
    req[7] = fc;
    req[8] = (uint8_t)(rd->start >> 8);
    req[9] = (uint8_t)rd->start;
    req[10] = (uint8_t)(rd->count >> 8);
    req[11] = (uint8_t)rd->count;
    int fd = modbus_get_socket(b->ctx);
    if (fd < 0 || send(fd, req, sizeof req, MSG_NOSIGNAL) != (ssize_t)sizeof req) {
        if (fd < 0 || errno == 0)
            errno = EBADF;
        return -1;
    }
    int n = modbus_receive_confirmation(b->ctx, rsp);
    if (n < 0)
        return -1;
    if (n < 9 || ((uint16_t)((uint16_t)rsp[0] << 8) | rsp[1]) != tid || rsp[2] != 0 ||
        rsp[3] != 0) {
        errno = EMBBADDATA; /* a stale or foreign reply */
        return -1;
    }
    if (rsp[6] != rd->unit_id) {
        errno = EMBBADSLAVE;
        return -1;
    }
    if (rsp[7] == (fc | 0x80)) {
        errno = rsp[8] >= 1 && rsp[8] <= MODBUS_EXCEPTION_GATEWAY_TARGET
                    ? MODBUS_ENOBASE + rsp[8] : EMBBADEXC;
        return -1;
    }
    if (rsp[7] != fc || rsp[8] != 2u * rd->count || n != 9 + 2 * rd->count) {
        errno = EMBBADDATA;
        return -1;
    }
    for (uint16_t i = 0; i < rd->count; i++)
        regs[i] = (uint16_t)(((uint16_t)rsp[9 + 2 * i] << 8) | rsp[10 + 2 * i]);
    return rd->count;
}

/* One read of a block: 1 + retries attempts, or a single one for a probe of
 * a device that is down. */
static read_result do_read(hp_bus *b, const hp_read *rd, bool probe)
{
    uint16_t regs[HP_MAX_READ_REGISTERS];
    device_health *d = &b->dev[rd->unit_id];
    unsigned tries = probe ? 1 : 1 + b->conf.retries;
    int err = 0;
    if (probe)
        stat_add(b, &b->stats.probes, 1, 0);
    for (unsigned attempt = 0; attempt < tries; attempt++) {
        if (stopping(b))
            break;
        modbus_set_slave(b->ctx, rd->unit_id);
        int rc = b->conf.kind == HP_BUS_TCP ? tcp_read(b, rd, regs)
                 : rd->table == HP_TABLE_INPUT
                     ? modbus_read_input_registers(b->ctx, rd->start, rd->count, regs)
                     : modbus_read_registers(b->ctx, rd->start, rd->count, regs);
        err = errno;
        stat_add(b, &b->stats.transactions, 1, 0);
        if (rc == rd->count) {
            device_answered(b, rd->unit_id);
            int64_t now = hp_mono_ms(), wall = hp_wall_ms();
            for (uint32_t k = rd->first; k < rd->first + rd->n_points; k++) {
                uint32_t p = b->order[k];
                hp_sample s = {.point = p, .bus = b->bus_id, .time_ms = wall};
                hp_point_decode(&b->points[p], regs + (b->points[p].address - rd->start), &s);
                if (s.quality == HP_Q_GOOD) {
                    b->last_good[p] = now;
                    b->last_value[p] = s.value;
                    b->last_wall[p] = wall;
                    b->stale_sent[p] = false;
                }
                hp_queue_push(b->queue, &s);
            }
            return READ_OK;
        }
        if (rc >= 0)
            err = EMBBADDATA; /* a reply of the wrong length */
        if (err > MODBUS_ENOBASE && err <= MODBUS_ENOBASE + MODBUS_EXCEPTION_GATEWAY_TARGET) {
            device_answered(b, rd->unit_id);
            stat_add(b, &b->stats.exceptions, 1, err);
            for (uint32_t k = rd->first; k < rd->first + rd->n_points; k++)
                emit_failure(b, b->order[k], 0, err - MODBUS_ENOBASE);
            return READ_EXCEPTION;
        }
        if (link_error(err))
            break;
        if (err == ETIMEDOUT)
            d->timeouts++;
        /* Drop whatever half-reply or late answer is still on the line, so
         * the next request does not read it (RTU framing, stale TCP ids). */
        modbus_flush(b->ctx);
    }
    stat_add(b, &b->stats.failures, 1, err);
    for (uint32_t k = rd->first; k < rd->first + rd->n_points; k++)
        emit_failure(b, b->order[k], err, 0);
    if (link_error(err))
        return READ_LINK_LOST;
    if (err == ETIMEDOUT) {
        d->silent = true;
        if (d->down)
            d->probe_at = hp_mono_ms() + b->probe_interval_ms;
        else if (d->timeouts >= TIMEOUTS_BEFORE_DOWN)
            set_down(b, rd->unit_id, true);
        if (all_down(b))
            return READ_LINK_LOST;
    }
    return READ_FAILED;
}

/* Points of a read not sent because its device is silent or down. */
static void not_asked(hp_bus *b, const hp_read *rd, int err)
{
    for (uint32_t k = rd->first; k < rd->first + rd->n_points; k++)
        emit_failure(b, b->order[k], err, 0);
}

static void fail_points(hp_bus *b, const uint32_t *which, size_t n, int err)
{
    for (size_t i = 0; i < n; i++)
        emit_failure(b, which[i], err, 0);
}

static void do_writes(hp_bus *b);

static void run_cycle(hp_bus *b, size_t n_due, int64_t started)
{
    long nr = hp_plan(b->points, b->which, n_due, b->conf.max_registers, b->conf.max_gap,
                      b->order, b->reads);
    if (nr < 0) {
        fail_points(b, b->which, n_due, EINVAL);
        return;
    }
    for (unsigned u = 0; u < UNITS; u++)
        b->dev[u].silent = false;
    bool timed_out = false;
    for (long r = 0; r < nr; r++) {
        const hp_read *rd = &b->reads[r];
        do_writes(b); /* output commands go ahead of every queued read */
        if (!b->connected) {
            /* a command found the link broken: this read and the rest fail
             * now (the reconnect is already scheduled) */
            for (long q = r; q < nr; q++)
                not_asked(b, &b->reads[q], ECONNRESET);
            break;
        }
        device_health *d = &b->dev[rd->unit_id];
        bool probe = d->down;
        if (d->silent || (d->down && hp_mono_ms() < d->probe_at)) {
            /* A down device between probes is simply not asked: its points
             * already failed. A once-read owes every point a sample. */
            if (d->silent || b->once)
                not_asked(b, rd, EHOSTDOWN);
            continue;
        }
        read_result res = do_read(b, rd, probe);
        timed_out = timed_out || d->silent;
        if (res == READ_LINK_LOST) {
            /* Everything after the lost read fails now instead of timing out
             * one block after another. */
            int why = all_down(b) ? EHOSTDOWN : ECONNRESET;
            for (long q = r + 1; q < nr; q++)
                not_asked(b, &b->reads[q], why);
            schedule_reconnect(b);
            break;
        }
    }
    int64_t took = hp_mono_ms() - started;
    pthread_mutex_lock(&b->mu);
    if (!timed_out && took > b->stats.min_interval_ms)
        b->stats.slow_cycles++;
    b->stats.cycles++;
    b->stats.last_cycle_ms = took;
    b->stats.total_cycle_ms += took;
    if (took > b->stats.max_cycle_ms)
        b->stats.max_cycle_ms = took;
    pthread_mutex_unlock(&b->mu);
}

/* Carries out the waiting output commands (hp_outcmd.h) before anything
 * else on the bus: called before every read transaction. */
static void do_writes(hp_bus *b)
{
    if (!b->connected || !hp_outcmd_pending(b->cmds))
        return;
    uint64_t transactions = 0, failures = 0;
    int broken = hp_outcmd_run(b->cmds, b->ctx, &transactions, &failures);
    pthread_mutex_lock(&b->mu);
    b->stats.transactions += transactions;
    b->stats.writes += transactions - failures;
    b->stats.write_failures += failures;
    if (broken)
        b->stats.last_errno = broken;
    pthread_mutex_unlock(&b->mu);
    if (broken)
        schedule_reconnect(b);
}

static void *worker(void *arg)
{
    hp_bus *b = arg;
    bool first_connect = true;
    while (!stopping(b)) {
        int64_t now = hp_mono_ms();
        if (!b->connected) {
            /* a waiting output command does not sit out the whole back-off:
             * it tries again backoff_min after the last attempt */
            int64_t at = b->reconnect_at;
            if (hp_outcmd_pending(b->cmds) && b->connect_tried_ms + b->conf.backoff_min_ms < at)
                at = b->connect_tried_ms + b->conf.backoff_min_ms;
            if (now < at) {
                emit_stale(b, now);
                int64_t until = at;
                if (until > now + STALE_CHECK_MS)
                    until = now + STALE_CHECK_MS;
                sleep_until(b, until);
                continue;
            }
            if (!first_connect)
                stat_add(b, &b->stats.reconnects, 1, 0);
            first_connect = false;
            b->connect_tried_ms = now;
            if (connect_bus(b) != 0) {
                int err = errno;
                stat_add(b, &b->stats.failures, 1, err);
                size_t n_due = 0;
                for (size_t i = 0; i < b->n; i++)
                    if (b->next_due[i] <= now) {
                        b->which[n_due++] = (uint32_t)i;
                        b->next_due[i] = now + b->points[i].interval_ms;
                    }
                fail_points(b, b->which, n_due, err);
                if (b->once)
                    break;
                schedule_reconnect(b);
                continue;
            }
        }
        size_t n_due = 0;
        int64_t soonest = INT64_MAX;
        for (size_t i = 0; i < b->n; i++) {
            if (b->next_due[i] <= now) {
                b->which[n_due++] = (uint32_t)i;
                /* Keep the schedule's phase; skip missed slots after a stall. */
                b->next_due[i] += b->points[i].interval_ms;
                if (b->next_due[i] <= now)
                    b->next_due[i] = now + b->points[i].interval_ms;
            }
            if (b->next_due[i] < soonest)
                soonest = b->next_due[i];
        }
        do_writes(b);
        if (n_due > 0)
            run_cycle(b, n_due, now);
        if (b->once)
            break;
        emit_stale(b, hp_mono_ms());
        if (b->connected)
            sleep_until(b, soonest);
    }
    /* A stop leaves the outputs as the owner last asked (the safe state at
     * shutdown): carry out what is waiting before the context closes. */
    if (!b->connected && !b->once) {
        pthread_mutex_lock(&b->mu);
        bool any = hp_outcmd_pending(b->cmds);
        pthread_mutex_unlock(&b->mu);
        if (any)
            (void)connect_bus(b);
    }
    if (b->connected)
        do_writes(b);
    return NULL;
}

int hp_bus_write(hp_bus *b, uint8_t unit_id, bool coil, uint16_t address, uint16_t value)
{
    uint32_t seq;
    return hp_bus_command(b, unit_id, coil, address, HP_OUTCMD_WRITE, value, &seq);
}

int hp_bus_command(hp_bus *b, uint8_t unit_id, bool coil, uint16_t address,
                   hp_outcmd_kind kind, uint16_t value, uint32_t *seq)
{
    if (!b) {
        errno = EINVAL;
        return -1;
    }
    if (hp_outcmd_post(b->cmds, unit_id, coil, address, kind, value, seq) != 0)
        return -1;
    pthread_mutex_lock(&b->mu);
    pthread_cond_broadcast(&b->wake);
    pthread_mutex_unlock(&b->mu);
    return 0;
}

int hp_bus_command_result(hp_bus *b, uint8_t unit_id, bool coil, uint16_t address,
                          hp_outcmd_result *out)
{
    if (!b) {
        errno = EINVAL;
        return -1;
    }
    return hp_outcmd_result_get(b->cmds, unit_id, coil, address, out);
}

static modbus_t *new_context(const hp_bus_conf *c)
{
    modbus_t *ctx;
    if (c->kind == HP_BUS_TCP) {
        char port[16];
        snprintf(port, sizeof port, "%d", c->port);
        ctx = modbus_new_tcp_pi(c->host, port);
    } else {
        static const char parity[] = {'N', 'E', 'O'};
        ctx = modbus_new_rtu(c->device, c->baud, parity[c->parity % 3], c->data_bits,
                             c->stop_bits);
    }
    if (!ctx)
        return NULL;
    /* libmodbus wants microseconds below 1,000,000 (libmodbus 3.1.6, modbus_set_response_timeout). */
    modbus_set_response_timeout(ctx, (uint32_t)(c->response_timeout_ms / 1000),
                                (uint32_t)(c->response_timeout_ms % 1000) * 1000u);
    modbus_set_byte_timeout(ctx, (uint32_t)(c->byte_timeout_ms / 1000),
                            (uint32_t)(c->byte_timeout_ms % 1000) * 1000u);
    modbus_set_error_recovery(ctx, MODBUS_ERROR_RECOVERY_NONE);
    return ctx;
}

static void free_bus(hp_bus *b)
{
    if (b->ctx) {
        modbus_close(b->ctx);
        modbus_free(b->ctx);
    }
    free(b->points);
    free(b->next_due);
    free(b->last_good);
    free(b->last_value);
    free(b->last_wall);
    free(b->stale_sent);
    free(b->which);
    free(b->order);
    free(b->reads);
    hp_outcmd_free(b->cmds);
    pthread_cond_destroy(&b->wake);
    pthread_mutex_destroy(&b->mu);
    free(b);
}

hp_bus *hp_bus_start(const hp_bus_conf *conf, const hp_point *points, size_t n,
                     uint32_t bus_id, hp_queue *queue, bool once)
{
    if (!conf || !queue || (n > 0 && !points)) {
        errno = EINVAL;
        return NULL;
    }
    hp_bus *b = calloc(1, sizeof *b);
    if (!b)
        return NULL;
    if (pthread_mutex_init(&b->mu, NULL) != 0) {
        free(b);
        return NULL;
    }
    if (hp_cond_init_mono(&b->wake) != 0) {
        pthread_mutex_destroy(&b->mu);
        free(b);
        return NULL;
    }
    b->conf = *conf;
    b->bus_id = bus_id;
    b->queue = queue;
    b->once = once;
    b->n = n;
    b->seed = (unsigned)hp_wall_ms() ^ (bus_id * 2654435761u);
    size_t m = n ? n : 1;
    b->points = calloc(m, sizeof *b->points);
    b->next_due = calloc(m, sizeof *b->next_due);
    b->last_good = calloc(m, sizeof *b->last_good);
    b->last_value = calloc(m, sizeof *b->last_value);
    b->last_wall = calloc(m, sizeof *b->last_wall);
    b->stale_sent = calloc(m, sizeof *b->stale_sent);
    b->which = calloc(m, sizeof *b->which);
    b->order = calloc(m, sizeof *b->order);
    b->reads = calloc(m, sizeof *b->reads);
    b->ctx = new_context(conf);
    b->cmds = hp_outcmd_new();
    if (!b->cmds || !b->points || !b->next_due || !b->last_good || !b->last_value || !b->last_wall ||
        !b->stale_sent || !b->which || !b->order || !b->reads || !b->ctx) {
        int e = errno ? errno : ENOMEM;
        free_bus(b);
        errno = e;
        return NULL;
    }
    if (n)
        memcpy(b->points, points, n * sizeof *points);
    b->probe_interval_ms = conf->probe_interval_ms > 0 ? conf->probe_interval_ms
                                                       : PROBE_INTERVAL_DEFAULT_MS;
    b->stats.min_interval_ms = INT64_MAX;
    for (size_t i = 0; i < n; i++) {
        if (!b->dev[points[i].unit_id].present)
            b->n_present++;
        b->dev[points[i].unit_id].present = true;
        if (points[i].interval_ms < b->stats.min_interval_ms)
            b->stats.min_interval_ms = points[i].interval_ms;
    }
    if (n == 0)
        b->stats.min_interval_ms = 0;
    int rc = pthread_create(&b->thread, NULL, worker, b);
    if (rc != 0) {
        free_bus(b);
        errno = rc;
        return NULL;
    }
    return b;
}

void hp_bus_join(hp_bus *b)
{
    if (!b)
        return;
    if (!b->once) {
        hp_bus_stop(b);
        return;
    }
    pthread_join(b->thread, NULL);
    free_bus(b);
}

void hp_bus_stop(hp_bus *b)
{
    if (!b)
        return;
    pthread_mutex_lock(&b->mu);
    b->stop = true;
    pthread_cond_broadcast(&b->wake);
    pthread_mutex_unlock(&b->mu);
    pthread_join(b->thread, NULL);
    free_bus(b);
}

void hp_bus_get_stats(hp_bus *b, hp_bus_stats *out)
{
    pthread_mutex_lock(&b->mu);
    *out = b->stats;
    pthread_mutex_unlock(&b->mu);
}
