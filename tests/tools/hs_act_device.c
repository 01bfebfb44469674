/* hs_act_device --port P --log FILE --control FIFO [--seconds S]: a Modbus
 * TCP device on 127.0.0.1 for the actuation tests. It is not a happy-path
 * simulator: it logs every write it receives with a timestamp and what it
 * did with it, and on command refuses, ignores, drops or stalls writes.
 *
 * Tables: coils 0..199 and holding registers 0..199 (any unit id); reads
 * answer from them (FC 1, 3), writes (FC 5, 6, 15, 16) change them.
 * Control lines, written into the FIFO (one command a line):
 *   hr ADDR VALUE            set a holding register (a sensor moves)
 *   coil ADDR VALUE          set a coil (as a PLC or a panel would)
 *   writes TARGET MODE [MS]  TARGET all|coil|hr; MODE one of
 *       normal   apply and answer
 *       refuse   answer with exception 4 (server failure), apply nothing
 *       ignore   answer as if applied, apply nothing
 *       drop     neither answer nor apply
 *       stall    hold the connection MS ms, then apply and answer (late)
 *   follow COIL REG          the pump: holding register REG (run feedback)
 *                            copies coil COIL whenever the coil changes
 *                            (follow -1 -1: the feedback stays as it is)
 *   slow UNIT MS             every request to unit UNIT is answered MS ms late
 *                            (a slow unit behind a gateway; 0 = off)
 *   mark TEXT                a line in the log
 * Log lines: "WALL_MS KIND ..." with WALL_MS the wall clock in ms:
 *   WALL_MS write coil|hr ADDR VALUE applied|refused|ignored|dropped|stalled
 *   WALL_MS set coil|hr ADDR VALUE        (a control line took effect)
 *   WALL_MS mark TEXT
 * Loopback only; ends after S seconds (default 300) or on SIGTERM. */
#include <errno.h>
#include <fcntl.h>
#include <modbus.h>
#include <poll.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#define TABLE 200
#define MAX_CLIENTS 8

enum mode { M_NORMAL, M_REFUSE, M_IGNORE, M_DROP, M_STALL };
static const char *const mode_names[] = {"normal", "refuse", "ignore", "drop", "stall", NULL};

struct client {
    int fd;
    int64_t busy_until;                   /* stalled: not read before this */
    uint8_t held[MODBUS_TCP_MAX_ADU_LENGTH]; /* the stalled write */
    int held_len;
};

static volatile sig_atomic_t stop_flag;
static void on_signal(int sig) { (void)sig; stop_flag = 1; }

static modbus_t *ctx;
static modbus_mapping_t *map;
static FILE *devlog;
static enum mode coil_mode, hr_mode;
static int coil_stall_ms, hr_stall_ms;
static int follow_coil = -1, follow_reg = -1;
static int slow_unit = -1, slow_ms;

static int64_t wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static void apply_follow(void)
{
    if (follow_coil >= 0 && follow_reg >= 0)
        map->tab_registers[follow_reg] = map->tab_bits[follow_coil] ? 1 : 0;
}

static int find_mode(const char *name)
{
    for (int i = 0; mode_names[i]; i++)
        if (strcmp(mode_names[i], name) == 0)
            return i;
    return -1;
}

static void control_line(char *line)
{
    char a[32] = "", b[32] = "", c[32] = "";
    int n = sscanf(line, "%31s %31s %31s", a, b, c);
    if (n >= 1 && strcmp(a, "mark") == 0) {
        fprintf(devlog, "%lld mark %s\n", (long long)wall_ms(), line + 5);
    } else if (n == 3 && (strcmp(a, "hr") == 0 || strcmp(a, "coil") == 0)) {
        long addr = strtol(b, NULL, 10), value = strtol(c, NULL, 10);
        if (addr < 0 || addr >= TABLE)
            return;
        if (a[0] == 'h') {
            map->tab_registers[addr] = (uint16_t)value;
        } else {
            map->tab_bits[addr] = value != 0;
            apply_follow();
        }
        fprintf(devlog, "%lld set %s %ld %ld\n", (long long)wall_ms(), a, addr, value);
    } else if (n >= 3 && strcmp(a, "writes") == 0) {
        int m = find_mode(c);
        int ms = 0;
        char d[32] = "";
        if (m < 0)
            return;
        if (sscanf(line, "%*s %*s %*s %31s", d) == 1)
            ms = (int)strtol(d, NULL, 10);
        if (strcmp(b, "all") == 0 || strcmp(b, "coil") == 0) {
            coil_mode = (enum mode)m;
            coil_stall_ms = ms;
        }
        if (strcmp(b, "all") == 0 || strcmp(b, "hr") == 0) {
            hr_mode = (enum mode)m;
            hr_stall_ms = ms;
        }
        fprintf(devlog, "%lld set writes %s %s %d\n", (long long)wall_ms(), b, c, ms);
    } else if (n == 3 && strcmp(a, "slow") == 0) {
        slow_unit = (int)strtol(b, NULL, 10);
        slow_ms = (int)strtol(c, NULL, 10);
        fprintf(devlog, "%lld set slow %d %d\n", (long long)wall_ms(), slow_unit, slow_ms);
    } else if (n == 3 && strcmp(a, "follow") == 0) {
        follow_coil = (int)strtol(b, NULL, 10);
        follow_reg = (int)strtol(c, NULL, 10);
        if (follow_coil < 0 || follow_coil >= TABLE || follow_reg < 0 || follow_reg >= TABLE)
            follow_coil = follow_reg = -1;
        apply_follow();
        fprintf(devlog, "%lld set follow %d %d\n", (long long)wall_ms(), follow_coil, follow_reg);
    }
}

/* A write request: which table, address and (first) value. */
static int parse_write(const uint8_t *q, int *is_coil, int *addr, int *value)
{
    int h = modbus_get_header_length(ctx);
    int fn = q[h];
    *addr = (q[h + 1] << 8) | q[h + 2];
    switch (fn) {
    case MODBUS_FC_WRITE_SINGLE_COIL:
        *is_coil = 1;
        *value = q[h + 3] == 0xFF;
        return 1;
    case MODBUS_FC_WRITE_SINGLE_REGISTER:
        *is_coil = 0;
        *value = (q[h + 3] << 8) | q[h + 4];
        return 1;
    case MODBUS_FC_WRITE_MULTIPLE_COILS:
        *is_coil = 1;
        *value = q[h + 6] & 1;
        return 1;
    case MODBUS_FC_WRITE_MULTIPLE_REGISTERS:
        *is_coil = 0;
        *value = (q[h + 6] << 8) | q[h + 7];
        return 1;
    default:
        return 0;
    }
}

static void log_write(int is_coil, int addr, int value, const char *what, int ms)
{
    fprintf(devlog, "%lld write %s %d %d %s", (long long)wall_ms(), is_coil ? "coil" : "hr", addr,
            value, what);
    if (ms)
        fprintf(devlog, " %d", ms);
    fputc('\n', devlog);
}

/* Answers one request; 1 when the client is now stalled. */
static int serve(struct client *cl, const uint8_t *q, int len)
{
    int is_coil, addr, value;
    int h = modbus_get_header_length(ctx);
    if (slow_ms > 0 && q[h - 1] == slow_unit) {
        memcpy(cl->held, q, (size_t)len);
        cl->held_len = len;
        cl->busy_until = wall_ms() + slow_ms;
        return 1;
    }
    if (!parse_write(q, &is_coil, &addr, &value)) {
        modbus_reply(ctx, q, len, map);
        return 0;
    }
    enum mode m = is_coil ? coil_mode : hr_mode;
    int stall = is_coil ? coil_stall_ms : hr_stall_ms;
    switch (m) {
    case M_REFUSE:
        log_write(is_coil, addr, value, "refused", 0);
        modbus_reply_exception(ctx, q, MODBUS_EXCEPTION_SLAVE_OR_SERVER_FAILURE);
        return 0;
    case M_IGNORE: {
        uint8_t bits[TABLE];
        uint16_t regs[TABLE];
        memcpy(bits, map->tab_bits, sizeof bits);
        memcpy(regs, map->tab_registers, sizeof regs);
        modbus_reply(ctx, q, len, map);
        memcpy(map->tab_bits, bits, sizeof bits);
        memcpy(map->tab_registers, regs, sizeof regs);
        log_write(is_coil, addr, value, "ignored", 0);
        return 0;
    }
    case M_DROP:
        log_write(is_coil, addr, value, "dropped", 0);
        return 0;
    case M_STALL:
        if (stall > 0) {
            log_write(is_coil, addr, value, "stalled", stall);
            memcpy(cl->held, q, (size_t)len);
            cl->held_len = len;
            cl->busy_until = wall_ms() + stall;
            return 1;
        }
        /* fall through */
    case M_NORMAL:
    default:
        modbus_reply(ctx, q, len, map);
        if (is_coil)
            apply_follow();
        log_write(is_coil, addr, value, "applied", 0);
        return 0;
    }
}

int main(int argc, char **argv)
{
    int port = 0, seconds = 300;
    const char *log_path = NULL, *control = NULL;
    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--port") == 0)
            port = atoi(argv[i + 1]);
        else if (strcmp(argv[i], "--log") == 0)
            log_path = argv[i + 1];
        else if (strcmp(argv[i], "--control") == 0)
            control = argv[i + 1];
        else if (strcmp(argv[i], "--seconds") == 0)
            seconds = atoi(argv[i + 1]);
    }
    if (port <= 0 || !log_path || !control) {
        fprintf(stderr, "usage: hs_act_device --port P --log FILE --control FIFO [--seconds S]\n");
        return 2;
    }
    devlog = fopen(log_path, "a");
    int cfd = open(control, O_RDWR | O_NONBLOCK); /* RDWR: never an EOF when writers go */
    if (!devlog || cfd < 0) {
        perror("hs_act_device");
        return 1;
    }
    setvbuf(devlog, NULL, _IOLBF, 0);
    signal(SIGTERM, on_signal);
    signal(SIGINT, on_signal);
    signal(SIGPIPE, SIG_IGN);
    ctx = modbus_new_tcp("127.0.0.1", port);
    map = modbus_mapping_new(TABLE, 0, TABLE, 0);
    int lfd = ctx && map ? modbus_tcp_listen(ctx, MAX_CLIENTS) : -1;
    if (lfd < 0) {
        fprintf(stderr, "hs_act_device: cannot listen on 127.0.0.1:%d\n", port);
        return 1;
    }
    struct client clients[MAX_CLIENTS];
    for (int i = 0; i < MAX_CLIENTS; i++)
        clients[i].fd = -1;
    char cbuf[4096];
    size_t cused = 0;
    int64_t end = wall_ms() + (int64_t)seconds * 1000;
    uint8_t q[MODBUS_TCP_MAX_ADU_LENGTH];
    while (!stop_flag && wall_ms() < end) {
        struct pollfd p[MAX_CLIENTS + 2];
        int idx[MAX_CLIENTS + 2], np = 0;
        int64_t now = wall_ms(), wake = now + 200;
        p[np] = (struct pollfd){.fd = lfd, .events = POLLIN};
        idx[np++] = -1;
        p[np] = (struct pollfd){.fd = cfd, .events = POLLIN};
        idx[np++] = -2;
        for (int i = 0; i < MAX_CLIENTS; i++) {
            struct client *cl = &clients[i];
            if (cl->fd < 0)
                continue;
            if (cl->held_len > 0) {
                if (now < cl->busy_until) {
                    if (cl->busy_until < wake)
                        wake = cl->busy_until;
                    continue;
                }
                /* the stall is over: the write lands, the answer goes late */
                modbus_set_socket(ctx, cl->fd);
                int is_coil, addr, value;
                int is_write = parse_write(cl->held, &is_coil, &addr, &value);
                modbus_reply(ctx, cl->held, cl->held_len, map);
                if (is_write && is_coil)
                    apply_follow();
                if (is_write)
                    log_write(is_coil, addr, value, "applied", 0);
                cl->held_len = 0;
            }
            p[np] = (struct pollfd){.fd = cl->fd, .events = POLLIN};
            idx[np++] = i;
        }
        int wait = (int)(wake - now);
        if (poll(p, (nfds_t)np, wait < 0 ? 0 : wait) <= 0)
            continue;
        for (int k = 0; k < np; k++) {
            if (!(p[k].revents & (POLLIN | POLLHUP | POLLERR)))
                continue;
            if (idx[k] == -1) {
                int fd = modbus_tcp_accept(ctx, &lfd);
                int slot = -1;
                for (int i = 0; i < MAX_CLIENTS && slot < 0; i++)
                    if (clients[i].fd < 0)
                        slot = i;
                if (fd >= 0 && slot >= 0)
                    clients[slot] = (struct client){.fd = fd};
                else if (fd >= 0)
                    close(fd);
            } else if (idx[k] == -2) {
                ssize_t r = read(cfd, cbuf + cused, sizeof cbuf - 1 - cused);
                if (r > 0)
                    cused += (size_t)r;
                char *nl;
                while ((nl = memchr(cbuf, '\n', cused)) != NULL) {
                    *nl = '\0';
                    control_line(cbuf);
                    size_t rest = cused - (size_t)(nl + 1 - cbuf);
                    memmove(cbuf, nl + 1, rest);
                    cused = rest;
                }
                if (cused == sizeof cbuf - 1)
                    cused = 0;
            } else {
                struct client *cl = &clients[idx[k]];
                modbus_set_socket(ctx, cl->fd);
                int len = modbus_receive(ctx, q);
                if (len > 0) {
                    serve(cl, q, len);
                } else if (len < 0) {
                    close(cl->fd);
                    cl->fd = -1;
                    cl->held_len = 0;
                }
            }
        }
    }
    for (int i = 0; i < MAX_CLIENTS; i++)
        if (clients[i].fd >= 0)
            close(clients[i].fd);
    close(lfd);
    modbus_mapping_free(map);
    modbus_free(ctx);
    fclose(devlog);
    return 0;
}
