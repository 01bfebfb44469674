/* hs_evil_slave --port P [--seed N] [--seconds S] [--only KIND]: a Modbus
 * TCP server on
 * 127.0.0.1 that answers read requests with garbage, for the robustness
 * test of the bus worker. Requests alternate between a good reply (so a
 * client can tell good from bad) and the next fault in turn (a seed varies
 * their details): a byte count
 * shorter or longer than asked, a byte count that disagrees with the frame,
 * a wrong function code, transaction id, unit id or protocol id, a frame
 * cut short (then the link closed, or left hanging), a huge frame, an
 * exception with any code, random bytes, a close, or silence.
 * Good replies carry register value 0x0BB8 (3000) everywhere.
 * --only KIND answers every request with that one fault (e.g. wrong-unit).
 * At the end it prints one line "faults: KIND=N ..." on stdout.
 * Loopback only; ends after S seconds (default 60) so it never lingers. */
#include <arpa/inet.h>
#include <errno.h>
#include <netinet/in.h>
#include <poll.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <time.h>
#include <unistd.h>

#define MAX_CLIENTS 16
#define GOOD_WORD 0x0BB8u

enum fault {
    F_GOOD, F_SHORT_COUNT, F_LONG_COUNT, F_COUNT_DISAGREES, F_WRONG_FUNCTION,
    F_WRONG_TID, F_WRONG_UNIT, F_WRONG_PROTOCOL, F_CUT_CLOSE, F_CUT_HANG,
    F_HUGE, F_EXCEPTION, F_RANDOM, F_CLOSE, F_SILENT, F_TINY_LENGTH, F_COUNT
};
static const char *const fault_name[F_COUNT] = {
    "good", "short-count", "long-count", "count-disagrees", "wrong-function",
    "wrong-tid", "wrong-unit", "wrong-protocol", "cut-close", "cut-hang",
    "huge", "exception", "random", "close", "silent", "tiny-length"};
static unsigned long fault_count[F_COUNT];
static int only_fault = -1; /* --only: every reply is this fault */

static volatile sig_atomic_t stop_flag;
static void on_signal(int sig) { (void)sig; stop_flag = 1; }

static uint64_t rng = 0x9e3779b97f4a7c15ull;
static uint32_t rnd(void)
{
    rng ^= rng >> 12;
    rng ^= rng << 25;
    rng ^= rng >> 27;
    return (uint32_t)((rng * 2685821657736338717ull) >> 32);
}

static int now_ms_after(const struct timespec *t0, long ms)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (t.tv_sec - t0->tv_sec) * 1000L + (t.tv_nsec - t0->tv_nsec) / 1000000L >= ms;
}

/* Reads exactly n bytes within 1 s; 0 on success. */
static int read_full(int fd, uint8_t *buf, size_t n)
{
    size_t got = 0;
    while (got < n) {
        struct pollfd p = {.fd = fd, .events = POLLIN};
        if (poll(&p, 1, 1000) <= 0)
            return -1;
        ssize_t r = read(fd, buf + got, n - got);
        if (r <= 0)
            return -1;
        got += (size_t)r;
    }
    return 0;
}

static void send_all(int fd, const uint8_t *buf, size_t n)
{
    while (n > 0) {
        ssize_t w = send(fd, buf, n, MSG_NOSIGNAL);
        if (w <= 0)
            return;
        buf += w;
        n -= (size_t)w;
    }
}

/* Builds an MBAP frame: tid, protocol, length = 1 + pdu_len, unit, pdu. */
static size_t frame(uint8_t *out, unsigned tid, unsigned proto, unsigned len_field,
                    unsigned unit, const uint8_t *pdu, size_t pdu_len)
{
    out[0] = (uint8_t)(tid >> 8);
    out[1] = (uint8_t)tid;
    out[2] = (uint8_t)(proto >> 8);
    out[3] = (uint8_t)proto;
    out[4] = (uint8_t)(len_field >> 8);
    out[5] = (uint8_t)len_field;
    out[6] = (uint8_t)unit;
    memcpy(out + 7, pdu, pdu_len);
    return 7 + pdu_len;
}

/* A correct reply PDU for the request (reads get GOOD_WORD / all coils on;
 * writes are echoed). Returns its length. */
static size_t good_pdu(const uint8_t *req, size_t req_len, uint8_t *pdu, int count_delta)
{
    uint8_t fc = req[0];
    unsigned qty = req_len >= 5 ? ((unsigned)req[3] << 8) | req[4] : 1;
    if (fc == 3 || fc == 4) {
        int bytes = (int)(qty * 2) + count_delta;
        if (bytes < 0)
            bytes = 0;
        if (bytes > 250)
            bytes = 250;
        pdu[0] = fc;
        pdu[1] = (uint8_t)bytes;
        for (int i = 0; i < bytes; i++)
            pdu[2 + i] = (i % 2) == 0 ? (uint8_t)(GOOD_WORD >> 8) : (uint8_t)GOOD_WORD;
        return 2 + (size_t)bytes;
    }
    if (fc == 1 || fc == 2) {
        int bytes = (int)((qty + 7) / 8) + count_delta;
        if (bytes < 0)
            bytes = 0;
        if (bytes > 250)
            bytes = 250;
        pdu[0] = fc;
        pdu[1] = (uint8_t)bytes;
        memset(pdu + 2, 0xff, (size_t)bytes);
        return 2 + (size_t)bytes;
    }
    size_t n = req_len < 5 ? req_len : 5;
    memcpy(pdu, req, n);
    return n;
}

/* Serves one request on fd; returns -1 when the link should be closed. */
static int serve(int fd)
{
    uint8_t hdr[7], req[260], pdu[300], out[70000];
    if (read_full(fd, hdr, 7) != 0)
        return -1;
    unsigned tid = ((unsigned)hdr[0] << 8) | hdr[1];
    unsigned len = ((unsigned)hdr[4] << 8) | hdr[5];
    unsigned unit = hdr[6];
    if (len < 2 || len > 254 || read_full(fd, req, len - 1) != 0)
        return -1;
    size_t req_len = len - 1;
    /* Every other reply is good so that the link carries real data between
     * faults; the faults take turns so that a short run meets them all. */
    static unsigned served;
    enum fault f = only_fault >= 0 ? (enum fault)only_fault
                   : served % 2 == 0 ? F_GOOD : (enum fault)(1 + (served / 2) % (F_COUNT - 1));
    served++;
    fault_count[f]++;
    size_t n, m;
    switch (f) {
    case F_GOOD:
        n = good_pdu(req, req_len, pdu, 0);
        send_all(fd, out, frame(out, tid, 0, 1 + (unsigned)n, unit, pdu, n));
        return 0;
    case F_SHORT_COUNT:
    case F_LONG_COUNT:
        n = good_pdu(req, req_len, pdu, f == F_SHORT_COUNT ? -2 : 2 + (int)(rnd() % 40));
        send_all(fd, out, frame(out, tid, 0, 1 + (unsigned)n, unit, pdu, n));
        return 0;
    case F_COUNT_DISAGREES:
        n = good_pdu(req, req_len, pdu, 0);
        pdu[1] = (uint8_t)(pdu[1] + 1 + rnd() % 100);
        send_all(fd, out, frame(out, tid, 0, 1 + (unsigned)n, unit, pdu, n));
        return 0;
    case F_WRONG_FUNCTION:
        n = good_pdu(req, req_len, pdu, 0);
        pdu[0] = (uint8_t)(1 + rnd() % 0x7f);
        if (pdu[0] == req[0])
            pdu[0] = (uint8_t)(pdu[0] ^ 0x10);
        send_all(fd, out, frame(out, tid, 0, 1 + (unsigned)n, unit, pdu, n));
        return 0;
    case F_WRONG_TID:
        n = good_pdu(req, req_len, pdu, 0);
        send_all(fd, out, frame(out, (tid + 1 + rnd() % 1000) & 0xffff, 0, 1 + (unsigned)n,
                                unit, pdu, n));
        return 0;
    case F_WRONG_UNIT:
        n = good_pdu(req, req_len, pdu, 0);
        send_all(fd, out, frame(out, tid, 0, 1 + (unsigned)n, (unit + 1) & 0xff, pdu, n));
        return 0;
    case F_WRONG_PROTOCOL:
        n = good_pdu(req, req_len, pdu, 0);
        send_all(fd, out, frame(out, tid, 1 + rnd() % 0xfffe, 1 + (unsigned)n, unit, pdu, n));
        return 0;
    case F_CUT_CLOSE:
    case F_CUT_HANG:
        n = good_pdu(req, req_len, pdu, 0);
        m = frame(out, tid, 0, 1 + (unsigned)n, unit, pdu, n);
        send_all(fd, out, 1 + rnd() % (m - 1));
        return f == F_CUT_CLOSE ? -1 : 0;
    case F_HUGE:
        n = 8000 + rnd() % 60000;
        pdu[0] = req[0];
        m = frame(out, tid, 0, 0xffff, unit, pdu, 1);
        for (size_t i = m; i < n && i < sizeof out; i++)
            out[i] = (uint8_t)rnd();
        send_all(fd, out, n < sizeof out ? n : sizeof out);
        return 0;
    case F_EXCEPTION:
        pdu[0] = (uint8_t)(req[0] | 0x80);
        pdu[1] = (uint8_t)rnd(); /* any code, including unassigned ones and 0 */
        send_all(fd, out, frame(out, tid, 0, 3, unit, pdu, 2));
        return 0;
    case F_RANDOM:
        n = 1 + rnd() % 300;
        for (size_t i = 0; i < n; i++)
            out[i] = (uint8_t)rnd();
        send_all(fd, out, n);
        return 0;
    case F_CLOSE:
        return -1;
    case F_SILENT:
        return 0;
    case F_TINY_LENGTH:
        pdu[0] = req[0];
        send_all(fd, out, frame(out, tid, 0, rnd() % 2, unit, pdu, 1));
        return 0;
    case F_COUNT:
        break;
    }
    return -1;
}

int main(int argc, char **argv)
{
    long port = 0, seconds = 60;
    for (int i = 1; i + 1 < argc; i += 2) {
        char *end;
        if (strcmp(argv[i], "--only") == 0) {
            for (int f = 0; f < F_COUNT; f++)
                if (strcmp(argv[i + 1], fault_name[f]) == 0)
                    only_fault = f;
            if (only_fault < 0)
                port = -1;
            continue;
        }
        long v = strtol(argv[i + 1], &end, 10);
        if (*end != '\0')
            port = -1;
        else if (strcmp(argv[i], "--port") == 0)
            port = v;
        else if (strcmp(argv[i], "--seed") == 0)
            rng ^= (uint64_t)v * 0x100000001b3ull;
        else if (strcmp(argv[i], "--seconds") == 0)
            seconds = v;
    }
    if (port <= 0 || port > 65535 || seconds <= 0 || seconds > 600) {
        fprintf(stderr, "usage: hs_evil_slave --port P [--seed N] [--seconds S<=600] "
                        "[--only KIND]\n");
        return 2;
    }
    signal(SIGTERM, on_signal);
    signal(SIGINT, on_signal);
    int ls = socket(AF_INET, SOCK_STREAM, 0);
    int one = 1;
    setsockopt(ls, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one);
    struct sockaddr_in a = {.sin_family = AF_INET, .sin_port = htons((uint16_t)port)};
    a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
    if (ls < 0 || bind(ls, (struct sockaddr *)&a, sizeof a) != 0 || listen(ls, 8) != 0) {
        perror("hs_evil_slave: listen");
        return 1;
    }
    struct pollfd fds[1 + MAX_CLIENTS];
    size_t nc = 0;
    fds[0] = (struct pollfd){.fd = ls, .events = POLLIN};
    struct timespec t0;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    while (!stop_flag && !now_ms_after(&t0, seconds * 1000)) {
        if (poll(fds, 1 + nc, 200) <= 0)
            continue;
        if (fds[0].revents & POLLIN) {
            int c = accept(ls, NULL, NULL);
            if (c >= 0 && nc < MAX_CLIENTS)
                fds[1 + nc++] = (struct pollfd){.fd = c, .events = POLLIN};
            else if (c >= 0)
                close(c);
        }
        for (size_t i = 1; i <= nc; i++) {
            if (fds[i].revents == 0)
                continue;
            if ((fds[i].revents & POLLIN) == 0 || serve(fds[i].fd) != 0) {
                close(fds[i].fd);
                fds[i] = fds[nc];
                nc--;
                i--;
            }
        }
    }
    for (size_t i = 1; i <= nc; i++)
        close(fds[i].fd);
    close(ls);
    printf("faults:");
    for (int f = 0; f < F_COUNT; f++)
        printf(" %s=%lu", fault_name[f], fault_count[f]);
    printf("\n");
    return 0;
}
