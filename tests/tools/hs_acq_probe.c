/* hs_acq_probe --config FILE --seconds S: runs the bus workers of a site
 * continuously for S seconds (as the daemon would), then prints one JSON line
 * per bus with its cycle statistics, sample qualities and read plan sizes.
 * For the integration tests (hung device, valgrind) and `make bench`. */
#include <jansson.h>
#include <stdio.h>
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
    const char *config = NULL;
    double seconds = 0;
    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--config") == 0)
            config = argv[i + 1];
        else if (strcmp(argv[i], "--seconds") == 0)
            seconds = strtod(argv[i + 1], NULL);
    }
    if (!config || !(seconds > 0 && seconds < 3600)) {
        fprintf(stderr, "usage: hs_acq_probe --config FILE --seconds S\n");
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
    int rc = 1;
    if (!q || !buses || !pts || !counts)
        goto out;
    size_t k = 0;
    for (size_t b = 0; b < nb; b++) {
        size_t first = k;
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
    while (hp_mono_ms() < end) {
        size_t n = hp_queue_pop(q, batch, 256, 100);
        for (size_t i = 0; i < n; i++)
            if (batch[i].bus < nb && batch[i].quality < HP_Q_COUNT)
                counts[batch[i].bus][batch[i].quality]++;
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
        char *line = json_dumps(o, JSON_COMPACT | JSON_PRESERVE_ORDER);
        if (line)
            printf("%s\n", line);
        free(line);
        json_decref(o);
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
    hs_site_free(&site);
    return rc;
}
