/* hs_acq_probe --config FILE --seconds S [--stream] [--until-file F]:
 * runs the bus workers of a site continuously for S seconds (as the daemon
 * would), then prints one JSON line per bus with its cycle statistics,
 * sample qualities, devices down, and read plan sizes, and one line per
 * (bus, unit id) with its sample counts and its mean interval between good
 * samples. --stream also prints every sample as it arrives
 * ({"t","bus","unit","q","errno","exc"}) and, every 200 ms, each bus's
 * devices down ({"t","bus","down":[...]}), flushed, so a test can wait on
 * them. --until-file F ends early once F exists. For the integration tests
 * and `make bench`. */
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <unistd.h>
#include <stdlib.h>
#include <string.h>

#include "hp_bus.h"
#include "hp_plan.h"
#include "hp_queue.h"
#include "hp_time.h"
#include "hs_config.h"

static long plan_size(const hs_site *site, size_t bus, unsigned max_gap)
{
    size_t n = 0;
    hp_point *pts = calloc(site->n_signals + 1, sizeof *pts);
    uint32_t *which = calloc(site->n_signals + 1, sizeof *which);
    uint32_t *order = calloc(site->n_signals + 1, sizeof *order);
    hp_read *reads = calloc(site->n_signals + 1, sizeof *reads);
    long nr = -1;
    if (pts && which && order && reads) {
        for (size_t s = 0; s < site->n_signals; s++)
            if (site->signals[s].bus_index == (int)bus) {
                pts[n] = site->signals[s].point;
                which[n] = (uint32_t)n;
                n++;
            }
        nr = hp_plan(pts, which, n, site->buses[bus].conf.max_registers, max_gap, order, reads);
    }
    free(pts);
    free(which);
    free(order);
    free(reads);
    return nr;
}

int main(int argc, char **argv)
{
    const char *config = NULL, *until_file = NULL;
    double seconds = 0;
    int stream = 0;
    for (int i = 1; i < argc; i++) {
        if (strcmp(argv[i], "--stream") == 0)
            stream = 1;
        else if (i + 1 < argc && strcmp(argv[i], "--config") == 0)
            config = argv[++i];
        else if (i + 1 < argc && strcmp(argv[i], "--seconds") == 0)
            seconds = strtod(argv[++i], NULL);
        else if (i + 1 < argc && strcmp(argv[i], "--until-file") == 0)
            until_file = argv[++i];
        else
            seconds = -1;
    }
    if (!config || !(seconds > 0 && seconds < 3600)) {
        fprintf(stderr, "usage: hs_acq_probe --config FILE --seconds S [--stream] "
                        "[--until-file F]\n");
        return 2;
    }
    hs_site site;
    hs_diag diag;
    if (hs_site_load(config, &site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            fprintf(stderr, "%s\n", diag.msg[i]);
        return 78;
    }
    size_t nb = site.n_buses;
    hp_queue *q = hp_queue_new(8192);
    hp_bus **buses = calloc(nb, sizeof *buses);
    hp_point *pts = calloc(site.n_signals + 1, sizeof *pts);
    unsigned long (*counts)[HP_Q_COUNT] = calloc(nb, sizeof *counts);
    /* per (bus, unit): samples, good samples, first and last good time of
     * its first point */
    struct unit_count { unsigned long n, good, good_first_point; int64_t first_ms, last_ms; };
    struct unit_count (*units)[256] = calloc(nb ? nb : 1, sizeof *units);
    size_t *first_point = calloc(nb ? nb : 1, sizeof *first_point);
    int rc = 1;
    if (!q || !buses || !pts || !counts || !units || !first_point)
        goto out;
    size_t k = 0;
    for (size_t b = 0; b < nb; b++) {
        size_t first = k;
        first_point[b] = first;
        for (size_t s = 0; s < site.n_signals; s++)
            if (site.signals[s].bus_index == (int)b)
                pts[k++] = site.signals[s].point;
        buses[b] = hp_bus_start(&site.buses[b].conf, pts + first, k - first, (uint32_t)b, q, false);
        if (!buses[b]) {
            perror("hp_bus_start");
            goto out;
        }
    }
    int64_t end = hp_mono_ms() + (int64_t)(seconds * 1000);
    hp_sample batch[256];
    int64_t next_down = 0;
    while (hp_mono_ms() < end) {
        size_t n = hp_queue_pop(q, batch, 256, 100);
        for (size_t i = 0; i < n; i++) {
            const hp_sample *x = &batch[i];
            if (x->bus >= nb || x->quality >= HP_Q_COUNT)
                continue;
            counts[x->bus][x->quality]++;
            /* the points of bus b are pts[first_point[b] ..] in hp_bus order */
            uint8_t unit = pts[first_point[x->bus] + x->point].unit_id;
            struct unit_count *u = &units[x->bus][unit];
            u->n++;
            if (x->quality == HP_Q_GOOD) {
                u->good++;
                /* the interval is timed on one point per unit: the first */
                int first_of_unit = 1;
                for (uint32_t p = 0; p < x->point; p++)
                    first_of_unit &= pts[first_point[x->bus] + p].unit_id != unit;
                if (first_of_unit) {
                    if (u->good_first_point++ == 0)
                        u->first_ms = x->time_ms;
                    u->last_ms = x->time_ms;
                }
            }
            if (stream)
                printf("{\"t\":%lld,\"bus\":\"%s\",\"unit\":%u,\"q\":\"%s\",\"errno\":%d,"
                       "\"exc\":%d}\n", (long long)x->time_ms, site.buses[x->bus].name, unit,
                       hp_quality_name(x->quality), x->sys_errno, x->exception);
        }
        if (stream && hp_mono_ms() >= next_down) {
            next_down = hp_mono_ms() + 200;
            for (size_t b = 0; b < nb; b++) {
                hp_bus_stats st;
                hp_bus_get_stats(buses[b], &st);
                printf("{\"t\":%lld,\"bus\":\"%s\",\"down\":[", (long long)hp_wall_ms(),
                       site.buses[b].name);
                const char *sep = "";
                for (unsigned u = 0; u < 256; u++)
                    if (hp_bus_unit_down(&st, (uint8_t)u)) {
                        printf("%s%u", sep, u);
                        sep = ",";
                    }
                printf("]}\n");
            }
        }
        if (stream)
            fflush(stdout);
        if (until_file && access(until_file, F_OK) == 0)
            break;
    }
    for (size_t b = 0; b < nb; b++) {
        hp_bus_stats st;
        hp_bus_get_stats(buses[b], &st);
        json_t *o = json_object();
        json_t *qs = json_object();
        for (int x = 0; x < HP_Q_COUNT; x++)
            json_object_set_new(qs, hp_quality_name((hp_quality)x), json_integer((json_int_t)counts[b][x]));
        json_object_set_new(o, "bus", json_string(site.buses[b].name));
        json_object_set_new(o, "cycles", json_integer((json_int_t)st.cycles));
        json_object_set_new(o, "transactions", json_integer((json_int_t)st.transactions));
        json_object_set_new(o, "failures", json_integer((json_int_t)st.failures));
        json_object_set_new(o, "exceptions", json_integer((json_int_t)st.exceptions));
        json_object_set_new(o, "reconnects", json_integer((json_int_t)st.reconnects));
        json_object_set_new(o, "mean_cycle_ms",
                            json_real(st.cycles ? (double)st.total_cycle_ms / (double)st.cycles : 0.0));
        json_object_set_new(o, "max_cycle_ms", json_integer(st.max_cycle_ms));
        json_object_set_new(o, "plan_reads", json_integer(plan_size(&site, b, site.buses[b].conf.max_gap)));
        json_object_set_new(o, "min_reads", json_integer(plan_size(&site, b, HP_MAX_READ_REGISTERS - 1)));
        json_object_set_new(o, "samples", qs);
        json_object_set_new(o, "probes", json_integer((json_int_t)st.probes));
        json_object_set_new(o, "slow_cycles", json_integer((json_int_t)st.slow_cycles));
        json_t *down = json_array();
        for (unsigned u = 0; u < 256; u++)
            if (hp_bus_unit_down(&st, (uint8_t)u))
                json_array_append_new(down, json_integer(u));
        json_object_set_new(o, "down", down);
        char *line = json_dumps(o, JSON_COMPACT | JSON_PRESERVE_ORDER);
        if (line)
            printf("%s\n", line);
        free(line);
        json_decref(o);
        for (unsigned u = 0; u < 256; u++) {
            const struct unit_count *c = &units[b][u];
            if (c->n == 0)
                continue;
            double period = c->good_first_point > 1
                                ? (double)(c->last_ms - c->first_ms) / (double)(c->good_first_point - 1)
                                : NAN;
            printf("{\"device_bus\":\"%s\",\"unit\":%u,\"samples\":%lu,\"good\":%lu,"
                   "\"good_period_ms\":%.1f}\n", site.buses[b].name, u, c->n, c->good,
                   isfinite(period) ? period : -1.0);
        }
    }
    rc = 0;
out:
    for (size_t b = 0; buses && b < nb; b++)
        hp_bus_stop(buses[b]);
    if (q)
        printf("{\"dropped\":%llu}\n", (unsigned long long)hp_queue_dropped(q));
    hp_queue_free(q);
    free(buses);
    free(pts);
    free(counts);
    free(units);
    free(first_point);
    hs_site_free(&site);
    return rc;
}
