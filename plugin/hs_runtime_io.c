/* The runtime's field side: one bus worker per [bus], samples from the
 * queue into the latest reading of each signal (in SI units) and into the
 * store's raw history, staleness by age, and whether a bus is down. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_conf_transfer.h"
#include "hs_log.h"
#include "hs_runtime_private.h"

int64_t hs_rt_wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int64_t hs_rt_mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int hs_rt_buses_start(hs_runtime *rt)
{
    const hs_site *site = &rt->site;
    size_t nb = site->n_buses;
    rt->buses = calloc(nb ? nb : 1, sizeof *rt->buses);
    rt->bus_signals = calloc(nb ? nb : 1, sizeof *rt->bus_signals);
    rt->bus_n_points = calloc(nb ? nb : 1, sizeof *rt->bus_n_points);
    rt->bus_down = calloc(nb ? nb : 1, sizeof *rt->bus_down);
    rt->units_down = calloc(nb ? nb : 1, sizeof *rt->units_down);
    rt->slow_logged = calloc(nb ? nb : 1, sizeof *rt->slow_logged);
    hp_point *points = calloc(site->n_signals ? site->n_signals : 1, sizeof *points);
    if (!rt->buses || !rt->bus_signals || !rt->bus_n_points || !rt->bus_down ||
        !rt->units_down || !rt->slow_logged || !points)
        goto fail;
    for (size_t b = 0; b < nb; b++) {
        rt->bus_signals[b] = calloc(site->n_signals ? site->n_signals : 1, sizeof(uint32_t));
        if (rt->bus_signals[b] == NULL)
            goto fail;
        size_t n = 0;
        for (size_t s = 0; s < site->n_signals; s++) {
            if (site->signals[s].bus_index != (int)b)
                continue;
            points[n] = site->signals[s].point;
            rt->bus_signals[b][n++] = (uint32_t)s;
        }
        rt->bus_n_points[b] = n;
        int writes_here = 0; /* a bus may carry pump outputs only */
        for (size_t t = 0; t < site->n_transfers; t++)
            writes_here |= site->transfers[t].actuate && site->transfers[t].bus_index == (int)b;
        if (n == 0 && !writes_here)
            continue;
        rt->buses[b] = hp_bus_start(&site->buses[b].conf, points, n, (uint32_t)b, rt->queue,
                                    false);
        if (rt->buses[b] == NULL) {
            hs_log(HSP_LOG_ERR, "[bus %s]: cannot start its worker", site->buses[b].name);
            goto fail;
        }
    }
    free(points);
    return 0;
fail:
    free(points);
    hs_log(HSP_LOG_ERR, "cannot start the field buses (out of memory or threads)");
    return -1;
}

void hs_rt_buses_stop(hs_runtime *rt)
{
    for (size_t b = 0; rt->buses != NULL && b < rt->site.n_buses; b++)
        if (rt->buses[b] != NULL)
            hp_bus_stop(rt->buses[b]);
    for (size_t b = 0; rt->bus_signals != NULL && b < rt->site.n_buses; b++)
        free(rt->bus_signals[b]);
    free(rt->buses);
    free(rt->bus_signals);
    free(rt->bus_n_points);
    free(rt->bus_down);
    free(rt->units_down);
    free(rt->slow_logged);
    rt->units_down = NULL;
    rt->slow_logged = NULL;
    rt->buses = NULL;
    rt->bus_signals = NULL;
    rt->bus_n_points = NULL;
    rt->bus_down = NULL;
}

static hs_quality quality_of(hp_quality q)
{
    switch (q) {
    case HP_Q_GOOD: return HS_QUALITY_GOOD;
    case HP_Q_STALE: return HS_QUALITY_STALE;
    default: return HS_QUALITY_BAD;
    }
}

int hs_rt_device_down(const hs_runtime *rt, const hs_signal *g)
{
    if (g->bus_index < 0 || rt->units_down == NULL)
        return 0;
    uint8_t u = g->point.unit_id;
    return (int)((rt->units_down[g->bus_index][u >> 6] >> (u & 63)) & 1u);
}

/* Says in the journal which device (unit id) of bus b went down or came
 * back, and once that the line cannot keep its poll interval. */
static void log_devices(hs_runtime *rt, size_t b)
{
    if (rt->buses == NULL || rt->buses[b] == NULL)
        return;
    const hs_bus *bus = &rt->site.buses[b];
    hp_bus_stats st;
    hp_bus_get_stats(rt->buses[b], &st);
    for (unsigned u = 0; u < 256; u++) {
        int now_down = hp_bus_unit_down(&st, (uint8_t)u);
        int was = (int)((rt->units_down[b][u >> 6] >> (u & 63)) & 1u);
        if (now_down == was)
            continue;
        if (now_down)
            hs_log(HSP_LOG_WARNING, "[bus %s] device (unit id) %u is down: no answer; it is "
                   "asked every %.0f s until it answers, the other devices keep their period",
                   bus->name, u, (double)(bus->conf.probe_interval_ms ? bus->conf.probe_interval_ms
                                                                      : 30000) / 1000.0);
        else
            hs_log(HSP_LOG_NOTICE, "[bus %s] device (unit id) %u answers again", bus->name, u);
        rt->units_down[b][u >> 6] ^= (uint64_t)1 << (u & 63);
    }
    /* Cycles that overran the shortest poll interval without any timeout
     * in them: the line (baud rate, device latency) cannot keep it. */
    if (!rt->slow_logged[b] && st.slow_cycles >= 3 && st.cycles > 0) {
        rt->slow_logged[b] = 1;
        hs_log(HSP_LOG_WARNING, "[bus %s] cannot keep its poll interval of %lld ms: a cycle "
               "takes %lld ms (mean %.0f ms), so values come every %.0f ms at best",
               bus->name, (long long)st.min_interval_ms, (long long)st.last_cycle_ms,
               (double)st.total_cycle_ms / (double)st.cycles,
               fmax((double)st.total_cycle_ms / (double)st.cycles, (double)st.min_interval_ms));
    }
}

size_t hs_rt_drain(hs_runtime *rt, int64_t now_ms)
{
    hp_sample batch[256];
    size_t total = 0, n;
    (void)now_ms;
    /* Bounded: at most the queue's capacity per tick, so a flood of samples
     * cannot starve the rest of the loop. */
    while (total < HS_RT_QUEUE_CAPACITY &&
           (n = hp_queue_pop(rt->queue, batch, sizeof batch / sizeof batch[0], 0)) > 0) {
        for (size_t i = 0; i < n; i++) {
            const hp_sample *smp = &batch[i];
            if (smp->bus >= rt->site.n_buses || smp->point >= rt->bus_n_points[smp->bus])
                continue; /* not ours: never trust an index blindly */
            uint32_t si = rt->bus_signals[smp->bus][smp->point];
            const hs_signal *sig = &rt->site.signals[si];
            hs_reading *r = &rt->readings[si];
            hs_quality q = quality_of(smp->quality);
            double v = smp->value * sig->si_factor + sig->si_offset;
            const char *reason = hp_sample_reason(smp);
            if (q == HS_QUALITY_GOOD && isfinite(v)) {
                hs_flat_event fe = hs_flatline_feed(&r->flat, v, smp->time_ms,
                                                    sig->flatline_after_ms);
                if (fe == HS_FLAT_STUCK)
                    hs_log(HSP_LOG_WARNING, "[signal %s] has read exactly %g for %.1f h: the "
                           "sensor is stuck (flatline); its value is not used",
                           sig->name, v, (double)(smp->time_ms - r->flat.since_ms) / 3.6e6);
                else if (fe == HS_FLAT_MOVED)
                    hs_log(HSP_LOG_NOTICE, "[signal %s] moves again: no longer stuck", sig->name);
                if (r->flat.stuck) {
                    q = HS_QUALITY_BAD;
                    reason = "flatline";
                }
            }
            if (q == HS_QUALITY_STALE || !isfinite(v)) {
                /* keep the last good value; only its quality changes */
                r->quality = q == HS_QUALITY_GOOD ? HS_QUALITY_BAD : q;
            } else {
                r->value = v;
                r->t_ms = smp->time_ms;
                r->quality = q;
                r->have = 1;
            }
            if (r->t_ms == 0)
                r->t_ms = smp->time_ms;
            hs_rt_keep_sample(rt, si, smp->time_ms, isfinite(v) ? v : NAN, q, reason,
                              hp_sample_code(smp));
            if (sig->pond_index >= 0)
                rt->ponds[sig->pond_index].dirty = 1;
        }
        total += n;
    }
    rt->samples_in += total;
    return total;
}

void hs_rt_age_readings(hs_runtime *rt, int64_t now_ms)
{
    const hs_site *site = &rt->site;
    int warm = 1;
    for (size_t b = 0; b < site->n_buses; b++) {
        size_t n = rt->bus_n_points[b], failing = 0;
        /* A point whose sample came back bad is failing from that first
         * sample; one that has had no sample at all only once its bus has had
         * its stale time to give one. */
        int silent_too_long = now_ms - rt->started_ms > site->buses[b].conf.stale_after_ms;
        for (size_t i = 0; i < n; i++) {
            const hs_reading *r = &rt->readings[rt->bus_signals[b][i]];
            int sampled = r->have || r->t_ms != 0;
            if ((sampled && r->quality == HS_QUALITY_BAD) || (!sampled && silent_too_long))
                failing++;
        }
        int down = n > 0 && failing == n;
        int answered = 0;
        for (size_t i = 0; i < n && !answered; i++)
            answered = rt->readings[rt->bus_signals[b][i]].have;
        if (n > 0 && !answered && !down)
            warm = 0;
        if (down != rt->bus_down[b])
            hs_log(down ? HSP_LOG_WARNING : HSP_LOG_NOTICE, "[bus %s] is %s", site->buses[b].name,
                   down ? "down: no point answers" : "up again");
        rt->bus_down[b] = down;
        log_devices(rt, b);
    }
    if (warm && !rt->warm)
        hs_log(HSP_LOG_INFO, "every bus has answered or is known down: transfers decide from now");
    rt->warm = rt->warm || warm;
    for (size_t s = 0; s < site->n_signals; s++) {
        hs_reading *r = &rt->readings[s];
        const hs_signal *sig = &site->signals[s];
        if (!r->have || r->quality != HS_QUALITY_GOOD || sig->bus_index < 0)
            continue;
        int64_t limit = site->buses[sig->bus_index].conf.stale_after_ms;
        if (limit > 0 && now_ms - r->t_ms > limit) {
            r->quality = HS_QUALITY_STALE;
            if (sig->pond_index >= 0)
                rt->ponds[sig->pond_index].dirty = 1;
        }
    }
}

int hs_rt_write(hs_runtime *rt, int bus, uint8_t unit_id, int coil, uint16_t address,
                uint16_t value)
{
    if (bus < 0 || (size_t)bus >= rt->site.n_buses || rt->buses[bus] == NULL)
        return -1;
    return hp_bus_write(rt->buses[bus], unit_id, coil, address, value);
}
