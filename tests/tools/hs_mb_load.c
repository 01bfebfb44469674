/* hs_mb_load --port P --clients N --seconds S [--unit U] [--ponds K] [--transfers T]
 * Load for the read-only Modbus server (make bench): N clients, each its own
 * libmodbus TCP connection and thread, read the full map of a site again and
 * again (site block, transfer blocks, every pond block of 100 registers) for
 * S seconds. Prints one JSON line: reads, errors and the latency of a full-map
 * read (p50, p95, p99, max in ms). */
#include <getopt.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include <modbus.h>

#include "hs_scada_map.h"

struct job {
    int port, unit, ponds, transfers;
    double seconds;
    double *lat_ms;
    size_t n, cap;
    unsigned errors;
};

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + ts.tv_nsec / 1e9;
}

static int full_map(modbus_t *ctx, const struct job *j)
{
    uint16_t regs[125];
    if (modbus_read_registers(ctx, 0, 12, regs) != 12)
        return -1;
    if (j->transfers > 0 &&
        modbus_read_registers(ctx, HS_MAP_TRANSFER_BASE, HS_MAP_TRANSFER_SIZE * j->transfers,
                              regs) != HS_MAP_TRANSFER_SIZE * j->transfers)
        return -1;
    for (int i = 0; i < j->ponds; i++)
        if (modbus_read_input_registers(ctx, HS_MAP_POND_BASE + HS_MAP_POND_SIZE * i,
                                        HS_MAP_POND_SIZE, regs) != HS_MAP_POND_SIZE)
            return -1;
    return 0;
}

static void *client(void *arg)
{
    struct job *j = arg;
    modbus_t *ctx = modbus_new_tcp("127.0.0.1", j->port);
    if (ctx == NULL || modbus_set_slave(ctx, j->unit) != 0 || modbus_connect(ctx) != 0) {
        j->errors++;
        modbus_free(ctx);
        return NULL;
    }
    modbus_set_response_timeout(ctx, 1, 0);
    double end = now_s() + j->seconds;
    while (now_s() < end) {
        double t0 = now_s();
        if (full_map(ctx, j) != 0) {
            j->errors++;
            continue;
        }
        if (j->n == j->cap) {
            j->cap = j->cap ? 2 * j->cap : 1024;
            double *grown = realloc(j->lat_ms, j->cap * sizeof *grown);
            if (grown == NULL)
                break;
            j->lat_ms = grown;
        }
        j->lat_ms[j->n++] = (now_s() - t0) * 1000.0;
    }
    modbus_close(ctx);
    modbus_free(ctx);
    return NULL;
}

static int int_arg(const char *text)
{
    char *end;
    long v = strtol(text, &end, 10);
    return *text && !*end && v >= 0 && v < 65536 ? (int)v : -1;
}

static int by_value(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

int main(int argc, char **argv)
{
    struct job base = {.unit = 1, .ponds = 9, .transfers = 4, .seconds = 5};
    int clients = 10;
    static const struct option opts[] = {
        {"port", required_argument, NULL, 'p'}, {"clients", required_argument, NULL, 'c'},
        {"seconds", required_argument, NULL, 's'}, {"unit", required_argument, NULL, 'u'},
        {"ponds", required_argument, NULL, 'k'}, {"transfers", required_argument, NULL, 't'},
        {NULL, 0, NULL, 0},
    };
    int c;
    while ((c = getopt_long(argc, argv, "", opts, NULL)) != -1) {
        switch (c) {
        case 'p': base.port = int_arg(optarg); break;
        case 'c': clients = int_arg(optarg); break;
        case 's': base.seconds = strtod(optarg, NULL); break;
        case 'u': base.unit = int_arg(optarg); break;
        case 'k': base.ponds = int_arg(optarg); break;
        case 't': base.transfers = int_arg(optarg); break;
        default: fprintf(stderr, "usage: see the header of hs_mb_load.c\n"); return 2;
        }
    }
    if (base.port <= 0 || clients < 1 || clients > 256 || base.unit < 0 || base.ponds < 0 ||
        base.transfers < 0 || base.transfers > 15 || !(base.seconds > 0)) {
        fprintf(stderr, "hs_mb_load: --port and 1..256 --clients needed\n");
        return 2;
    }
    struct job *jobs = calloc((size_t)clients, sizeof *jobs);
    pthread_t *th = calloc((size_t)clients, sizeof *th);
    if (jobs == NULL || th == NULL)
        return 1;
    for (int i = 0; i < clients; i++) {
        jobs[i] = base;
        pthread_create(&th[i], NULL, client, &jobs[i]);
    }
    size_t total = 0;
    unsigned errors = 0;
    for (int i = 0; i < clients; i++) {
        pthread_join(th[i], NULL);
        total += jobs[i].n;
        errors += jobs[i].errors;
    }
    double *all = malloc((total ? total : 1) * sizeof *all);
    size_t k = 0;
    for (int i = 0; i < clients; i++) {
        for (size_t m = 0; m < jobs[i].n; m++)
            all[k++] = jobs[i].lat_ms[m];
        free(jobs[i].lat_ms);
    }
    qsort(all, total, sizeof *all, by_value);
#define PCT(p) (total ? all[(size_t)((p) * (double)(total - 1))] : 0.0)
    printf("{\"clients\": %d, \"reads\": %zu, \"errors\": %u, \"p50_ms\": %.3f, "
           "\"p95_ms\": %.3f, \"p99_ms\": %.3f, \"max_ms\": %.3f}\n",
           clients, total, errors, PCT(0.50), PCT(0.95), PCT(0.99),
           total ? all[total - 1] : 0.0);
    free(all);
    free(jobs);
    free(th);
    return errors ? 1 : 0;
}
