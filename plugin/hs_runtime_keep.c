/* Raw samples by exception (deadband with a maximum interval), counted in
 * full: every sample goes into its signal's 1-minute rollup as it arrives
 * (n, min, sum, max, worst quality), but the raw row is kept only when
 *   - it is the signal's first, or its quality differs from the last kept,
 *   - or it moved more than the deadband from the last kept value
 *     ([signal] store_deadband, absolute in the signal's unit, else [site]
 *     store_deadband percent of the last kept value),
 *   - or store_max_interval passed since the last kept one.
 * With [site] full_rate_window every sample is kept raw, and those that
 * are not exceptions are deleted once older than the window. */
#include <math.h>

#include "hs_log.h"
#include "hs_runtime_private.h"

static void flush_minute(hs_runtime *rt, size_t si)
{
    struct hs_rt_keep *k = &rt->keep[si];
    if (k->n > 0 &&
        hs_store_add_rollup(rt->store, rt->site.signals[si].name, k->minute_ms, k->n, k->vmin,
                            k->vsum, k->vmax, (hs_quality)k->worst) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
    k->n = 0;
}

void hs_rt_keep_flush(hs_runtime *rt)
{
    for (size_t i = 0; rt->keep != NULL && rt->store != NULL && i < rt->site.n_signals; i++)
        flush_minute(rt, i);
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
    int64_t minute = t_ms / 60000 * 60000;
    if (k->n > 0 && minute != k->minute_ms)
        flush_minute(rt, si);
    if (isfinite(v)) { /* the rollup counts the values that are known */
        if (k->n == 0) {
            k->minute_ms = minute;
            k->vmin = k->vmax = v;
            k->vsum = 0;
            k->worst = (int)q;
        }
        k->n++;
        k->vsum += v;
        k->vmin = v < k->vmin ? v : k->vmin;
        k->vmax = v > k->vmax ? v : k->vmax;
        k->worst = (int)q > k->worst ? (int)q : k->worst;
    }
    int keep = exception(rt, si, t_ms, v, q);
    int full = rt->site.site.full_rate_window_ms > 0;
    if (!keep && !full)
        return;
    if (hs_store_add_sample_rolled(rt->store, rt->site.signals[si].name, t_ms, v, q, reason, code,
                                   HS_SAMPLE_ROLLED | (keep ? 0 : HS_SAMPLE_THIN)) != 0)
        hs_log(HSP_LOG_ERR, "store: %s", hs_store_error(rt->store));
    if (keep) {
        k->have = 1;
        k->v = v;
        k->q = (int)q;
        k->t_ms = t_ms;
    }
}
