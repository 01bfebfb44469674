/* History by exception, counted in full.
 *
 * Raw samples: every sample goes into its signal's 1-minute rollup (n, min,
 * sum, max, worst quality), but the raw row is kept only when
 *   - it is the signal's first, or its quality differs from the last kept,
 *   - or it moved more than the deadband from the last kept value
 *     ([signal] store_deadband, absolute in the signal's unit, else [site]
 *     store_deadband percent of the last kept value),
 *   - or store_max_interval passed since the last kept one.
 * With [site] full_rate_window every sample is kept raw, and those that
 * are not exceptions are deleted once older than the window.
 *
 * Pond states: every computed state goes into the minute rollups of the
 * state quantities (hs_store_state_fields), but a state row is kept only
 * when what a brine master reads changed: its quality or stage, its
 * specific gravity at the reference temperature by more than
 * state_deadband_sg or the state's own standard uncertainty of SG (the
 * larger), its level by more than state_deadband_level, or
 * state_max_interval passed since the last kept row.
 *
 * Kept rows are held in memory and written at each commit (commit_interval),
 * in one short transaction: the write lock is never held between commits.
 * A first row, or a change of quality (or of a pond's stage), is committed
 * at the end of the cycle instead: what an operator must see at once.
 * The minutes are held in memory and written together at each maintenance
 * pass (at most every commit_interval): a batch then touches each series'
 * last page once, not once a minute. A crash loses them with the rest of
 * the open batch; a clean stop or a reload writes them (hs_rt_keep_flush).
 * Ownership: rt->minutes, rt->held_samples and rt->held_states are owned by
 * the runtime (hs_rt_keep_free). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_log.h"
#include "hs_runtime_private.h"

static void acc_clear(struct hs_rt_acc *a) { a->n = 0; }

/* Queues a minute for the next write; written at once when memory fails. */
static void queue_minute(hs_runtime *rt, size_t series, const struct hs_rt_acc *a);

static void acc_add(hs_runtime *rt, size_t series, struct hs_rt_acc *a, int64_t t_ms, double v,
                    hs_quality q)
{
    int64_t minute = t_ms / 60000 * 60000;
    if (a->n > 0 && minute != a->minute_ms) {
        queue_minute(rt, series, a);
        acc_clear(a);
    }
    if (!isfinite(v)) /* the rollup counts the values that are known */
        return;
    if (a->n == 0) {
        a->minute_ms = minute;
        a->vmin = a->vmax = v;
        a->vsum = 0;
        a->worst = (int)q;
    }
    a->n++;
    a->vsum += v;
    a->vmin = v < a->vmin ? v : a->vmin;
    a->vmax = v > a->vmax ? v : a->vmax;
    a->worst = (int)q > a->worst ? (int)q : a->worst;
}

static void write_minute(hs_runtime *rt, size_t series, const struct hs_rt_acc *a)
{
    char name[2 * HS_NAME_MAX + 64];
    const char *series_name = name;
    if (series < rt->site.n_signals) {
        series_name = rt->site.signals[series].name;
    } else {
        size_t k = series - rt->site.n_signals;
        size_t pond = k / HS_STORE_STATE_FIELDS, field = k % HS_STORE_STATE_FIELDS;
        if (pond >= rt->site.n_ponds)
            return;
        snprintf(name, sizeof name, "%s:%s", rt->site.ponds[pond].name,
                 hs_store_state_fields[field]);
    }
    if (hs_store_add_rollup(rt->store, series_name, a->minute_ms, a->n, a->vmin, a->vsum, a->vmax,
                            (hs_quality)a->worst) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
}

static void queue_minute(hs_runtime *rt, size_t series, const struct hs_rt_acc *a)
{
    if (rt->n_minutes == rt->cap_minutes) {
        size_t cap = rt->cap_minutes ? rt->cap_minutes * 2 : 256;
        struct hs_rt_minute *m = realloc(rt->minutes, cap * sizeof *m);
        if (m == NULL) {
            write_minute(rt, series, a);
            return;
        }
        rt->minutes = m;
        rt->cap_minutes = cap;
    }
    rt->minutes[rt->n_minutes++] = (struct hs_rt_minute){.series = series, .acc = *a};
}

/* Closes the open minutes that ended by now_ms (all of them when all). */
static void close_minutes(hs_runtime *rt, int64_t now_ms, int all)
{
    for (size_t i = 0; rt->keep != NULL && i < rt->site.n_signals; i++) {
        struct hs_rt_acc *a = &rt->keep[i].acc;
        if (a->n > 0 && (all || a->minute_ms + 60000 <= now_ms)) {
            queue_minute(rt, i, a);
            acc_clear(a);
        }
    }
    for (size_t p = 0; rt->keep_state != NULL && p < rt->site.n_ponds; p++)
        for (size_t f = 0; f < HS_STORE_STATE_FIELDS; f++) {
            struct hs_rt_acc *a = &rt->keep_state[p].acc[f];
            if (a->n > 0 && (all || a->minute_ms + 60000 <= now_ms)) {
                queue_minute(rt, rt->site.n_signals + p * HS_STORE_STATE_FIELDS + f, a);
                acc_clear(a);
            }
        }
}

static void write_queued(hs_runtime *rt)
{
    for (size_t i = 0; i < rt->n_minutes; i++)
        write_minute(rt, rt->minutes[i].series, &rt->minutes[i].acc);
    rt->n_minutes = 0;
}

void hs_rt_keep_write(hs_runtime *rt, int64_t now_ms)
{
    if (rt->store == NULL)
        return;
    close_minutes(rt, now_ms, 0);
    write_queued(rt);
}

static void write_held_sample(hs_runtime *rt, const struct hs_rt_held_sample *h)
{
    if (hs_store_add_sample_rolled(rt->store, rt->site.signals[h->signal].name, h->t_ms,
                                   h->value, (hs_quality)h->quality, h->reason, h->code,
                                   h->flags) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
}

static void write_held_state(hs_runtime *rt, const struct hs_rt_held_state *h)
{
    if (hs_store_add_state_rolled(rt->store, rt->site.ponds[h->pond].name, h->t_ms, &h->state,
                                  &h->extra, (hs_quality)h->quality, 1) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
}

void hs_rt_keep_commit(hs_runtime *rt)
{
    if (rt->store == NULL)
        return;
    for (size_t i = 0; i < rt->n_held_samples; i++)
        write_held_sample(rt, &rt->held_samples[i]);
    for (size_t i = 0; i < rt->n_held_states; i++)
        write_held_state(rt, &rt->held_states[i]);
    rt->n_held_samples = rt->n_held_states = 0;
    rt->held_now = 0;
}

/* arr with room for one more of n rows of size bytes (grown, *cap updated),
 * or NULL when memory fails (arr is kept; the caller writes the row at once). */
static void *held_room(void *arr, size_t *cap, size_t n, size_t size)
{
    if (n < *cap)
        return arr;
    size_t grown = *cap ? *cap * 2 : 64;
    void *p = realloc(arr, grown * size);
    if (p != NULL)
        *cap = grown;
    return p;
}

/* Past HS_RT_HELD_MAX held rows (a noisy site with a long commit_interval),
 * they are written and committed now rather than grow without bound. */
static void held_bound(hs_runtime *rt)
{
    if (rt->n_held_samples + rt->n_held_states < HS_RT_HELD_MAX)
        return;
    hs_rt_keep_commit(rt);
    if (hs_store_flush(rt->store) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
}

void hs_rt_keep_flush(hs_runtime *rt)
{
    if (rt->store == NULL)
        return;
    hs_rt_keep_commit(rt);
    close_minutes(rt, 0, 1);
    write_queued(rt);
}

void hs_rt_keep_free(hs_runtime *rt)
{
    free(rt->minutes);
    rt->minutes = NULL;
    rt->n_minutes = rt->cap_minutes = 0;
    free(rt->held_samples);
    rt->held_samples = NULL;
    rt->n_held_samples = rt->cap_held_samples = 0;
    free(rt->held_states);
    rt->held_states = NULL;
    rt->n_held_states = rt->cap_held_states = 0;
}

static int exception(const hs_runtime *rt, size_t si, int64_t t_ms, double v, hs_quality q)
{
    const struct hs_rt_keep *k = &rt->keep[si];
    const hs_signal *sig = &rt->site.signals[si];
    if (!k->have || (int)q != k->q)
        return 1;
    if (t_ms - k->t_ms >= rt->site.site.store_max_interval_ms)
        return 1;
    if (isfinite(v) != isfinite(k->v))
        return 1;
    if (!isfinite(v))
        return 0;
    double band = isfinite(sig->store_deadband)
                      ? sig->store_deadband * fabs(sig->si_factor)
                      : rt->site.site.store_deadband_pct / 100.0 * fabs(k->v);
    return fabs(v - k->v) > band;
}

void hs_rt_keep_sample(hs_runtime *rt, size_t si, int64_t t_ms, double v, hs_quality q,
                       const char *reason, int code)
{
    if (rt->store == NULL || rt->keep == NULL)
        return;
    struct hs_rt_keep *k = &rt->keep[si];
    acc_add(rt, si, &k->acc, t_ms, v, q);
    int keep = exception(rt, si, t_ms, v, q);
    int full = rt->site.site.full_rate_window_ms > 0;
    if (!keep && !full)
        return;
    if (!k->have || (int)q != k->q)
        rt->held_now = 1;
    struct hs_rt_held_sample h = {.signal = si, .t_ms = t_ms, .value = v, .quality = (int)q,
                                  .code = code,
                                  .flags = HS_SAMPLE_ROLLED | (keep ? 0 : HS_SAMPLE_THIN)};
    if (reason != NULL)
        snprintf(h.reason, sizeof h.reason, "%s", reason);
    struct hs_rt_held_sample *room =
        held_room(rt->held_samples, &rt->cap_held_samples, rt->n_held_samples, sizeof h);
    if (room != NULL) {
        rt->held_samples = room;
        rt->held_samples[rt->n_held_samples++] = h;
    } else {
        write_held_sample(rt, &h);
    }
    held_bound(rt);
    if (keep) {
        k->have = 1;
        k->v = v;
        k->q = (int)q;
        k->t_ms = t_ms;
    }
}

/* 1 when a and b differ by more than band, or one is known and not the other. */
static int moved(double a, double b, double band)
{
    if (isfinite(a) != isfinite(b))
        return 1;
    return isfinite(a) && fabs(a - b) > band;
}

void hs_rt_keep_state(hs_runtime *rt, size_t pond, int64_t t_ms, const hc_brine_state *b,
                      const hs_pond_extra *extra, hs_quality q)
{
    if (rt->store == NULL || rt->keep_state == NULL)
        return;
    struct hs_rt_keep_state *k = &rt->keep_state[pond];
    for (size_t f = 0; f < HS_STORE_STATE_FIELDS; f++)
        acc_add(rt, rt->site.n_signals + pond * HS_STORE_STATE_FIELDS + f, &k->acc[f], t_ms,
                hs_store_state_value(b, extra, (int)f), q);
    const hs_site_conf *s = &rt->site.site;
    /* a move within the state's own standard uncertainty is no change a
     * brine master could act on */
    double sg_band = s->state_deadband_sg;
    if (isfinite(b->sg_uncertainty) && b->sg_uncertainty > sg_band)
        sg_band = b->sg_uncertainty;
    int keep = !k->have || (int)q != k->quality || (int)b->stage != k->stage ||
               t_ms - k->t_ms >= s->state_max_interval_ms ||
               moved(b->specific_gravity, k->sg, sg_band) ||
               moved(extra->depth_m, k->depth_m, s->state_deadband_level_m);
    if (!keep)
        return;
    if (!k->have || (int)q != k->quality || (int)b->stage != k->stage)
        rt->held_now = 1;
    struct hs_rt_held_state h = {.pond = pond, .t_ms = t_ms, .state = *b, .extra = *extra,
                                 .quality = (int)q};
    struct hs_rt_held_state *room =
        held_room(rt->held_states, &rt->cap_held_states, rt->n_held_states, sizeof h);
    if (room != NULL) {
        rt->held_states = room;
        rt->held_states[rt->n_held_states++] = h;
    } else {
        write_held_state(rt, &h);
    }
    held_bound(rt);
    k->have = 1;
    k->t_ms = t_ms;
    k->sg = b->specific_gravity;
    k->depth_m = extra->depth_m;
    k->stage = (int)b->stage;
    k->quality = (int)q;
    rt->states_stored++;
}
