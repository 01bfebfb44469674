/* Daily weather from the store, Penman, and its fit (see hs_weather.h). */
#include "hs_weather.h"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include <time.h>

#include "hc_penman.h"

#define DAY_MS 86400000LL
#define HOUR_MS 3600000LL

static const hs_quantity weather_q[4] = {HS_Q_AIR_TEMPERATURE, HS_Q_HUMIDITY, HS_Q_WIND_SPEED,
                                         HS_Q_SOLAR_RADIATION};

static const hs_signal *first_signal(const hs_site *site, hs_quantity q)
{
    for (size_t i = 0; i < site->n_signals; i++)
        if (site->signals[i].quantity == q)
            return &site->signals[i];
    return NULL;
}

int hs_weather_configured(const hs_site *site)
{
    for (int k = 0; k < 4; k++)
        if (first_signal(site, weather_q[k]) == NULL)
            return 0;
    return 1;
}

/* Per day: hours seen, min, max and sum of the hourly means. */
struct acc {
    int64_t first_day;
    int days;
    int hours[HS_WEATHER_MAX_DAYS];
    double min[HS_WEATHER_MAX_DAYS], max[HS_WEATHER_MAX_DAYS], sum[HS_WEATHER_MAX_DAYS];
};

static void take(void *ctx, const hs_point *p)
{
    struct acc *a = ctx;
    int64_t d = p->t_ms / DAY_MS - a->first_day;
    if (d < 0 || d >= a->days || p->count <= 0 || !isfinite(p->mean) ||
        p->worst != HS_QUALITY_GOOD)
        return;
    a->hours[d]++;
    a->min[d] = fmin(a->min[d], p->min);
    a->max[d] = fmax(a->max[d], p->max);
    a->sum[d] += p->mean;
}

int hs_weather_read(hs_store *st, const hs_site *site, int64_t now_ms, int days,
                    struct hs_weather_day *out, char *err, size_t errlen)
{
    if (!hs_weather_configured(site) || st == NULL)
        return 0;
    if (days > HS_WEATHER_MAX_DAYS)
        days = HS_WEATHER_MAX_DAYS;
    int64_t today = now_ms / DAY_MS;
    struct acc acc[4];
    for (int k = 0; k < 4; k++) {
        struct acc *a = &acc[k];
        memset(a, 0, sizeof *a);
        a->first_day = today - days;
        a->days = days;
        for (int d = 0; d < days; d++) {
            a->min[d] = INFINITY;
            a->max[d] = -INFINITY;
        }
        const hs_signal *sg = first_signal(site, weather_q[k]);
        if (hs_store_history(st, sg->name, a->first_day * DAY_MS, today * DAY_MS, HOUR_MS, take,
                             a) < 0) {
            /* A series never written is not an error: no weather yet. */
            const char *e = hs_store_error(st);
            if (e != NULL && strstr(e, "no series") != NULL)
                return 0;
            snprintf(err, errlen, "weather %s: %s", sg->name, e ? e : "store error");
            return -1;
        }
    }
    int n = 0;
    for (int d = 0; d < days; d++) {
        int complete = 1;
        for (int k = 0; k < 4; k++)
            complete = complete && acc[k].hours[d] >= HS_WEATHER_MIN_HOURS;
        if (!complete)
            continue;
        struct hs_weather_day *w = &out[n];
        w->day = acc[0].first_day + d;
        w->t_min_c = acc[0].min[d];
        w->t_max_c = acc[0].max[d];
        w->relative_humidity = fmin(1.0, fmax(0.0, acc[1].sum[d] / acc[1].hours[d]));
        w->wind_m_s = fmax(0.0, acc[2].sum[d] / acc[2].hours[d]);
        /* Mean irradiance [W/m2] over the day x 86400 s -> [MJ m-2 day-1]. */
        w->solar_mj_m2 = fmax(0.0, acc[3].sum[d] / acc[3].hours[d]) * 0.0864;
        time_t t = (time_t)(w->day * 86400);
        struct tm tm;
        gmtime_r(&t, &tm);
        hc_weather_day wd = {w->t_min_c, w->t_max_c, w->relative_humidity, w->wind_m_s,
                             w->solar_mj_m2, NAN, site->site.latitude_deg, tm.tm_yday + 1,
                             site->site.elevation_m};
        hc_penman_result r;
        if (hc_penman_open_water(&wd, &r) != HC_OK)
            continue;
        w->penman_mm_day = r.evaporation_mm_day;
        n++;
    }
    return n;
}

int hs_weather_fit(const struct hs_weather_day *w, int n_days, const struct hs_weather_pond *ponds,
                   size_t n_ponds, int window, struct hs_weather_fit *out)
{
    double e[HS_WEATHER_MAX_DAYS * 32], a[HS_WEATHER_MAX_DAYS * 32]; /* pairs (30 kB) */
    int m = 0;
    if (window < 1)
        window = 1;
    for (size_t p = 0; p < n_ponds; p++) {
        const struct hs_weather_pond *wp = &ponds[p];
        if (!(wp->brine_factor > 0))
            continue;
        for (int i = 0; i < wp->n && m < (int)(sizeof e / sizeof e[0]); i++) {
            double sum = 0;
            int seen = 0;
            for (int k = 0; k < n_days; k++)
                if (w[k].day > wp->day[i] - window && w[k].day <= wp->day[i]) {
                    sum += w[k].penman_mm_day;
                    seen++;
                }
            if (2 * seen < window || !isfinite(wp->rate_mm_day[i]))
                continue;
            e[m] = sum / seen * wp->brine_factor;
            a[m] = wp->rate_mm_day[i];
            m++;
        }
    }
    memset(out, 0, sizeof *out);
    out->factor = out->rms_mm_day = out->r2 = NAN;
    if (m == 0)
        return 0;
    int used = 0;
    if (hc_evaporation_fit(e, a, m, &out->factor, &out->rms_mm_day, &out->r2, &used) != HC_OK)
        return 0;
    out->pairs = used;
    return used;
}
