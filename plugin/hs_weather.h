/* The site's weather from its stored signals, day by day, as the Penman
 * open-water evaporation (hc_penman.h), and the fit of that estimate to
 * the net evaporation the ponds achieved (the daemon's daily balance).
 *
 * A day (UTC) counts when every weather quantity (air-temperature,
 * humidity, wind-speed, solar-radiation; the first signal of each) has at
 * least HS_WEATHER_MIN_HOURS hourly rollups in it: air temperature gives
 * the day's minimum and maximum, the others their mean (the mean
 * irradiance x 86400 s is the day's radiation).
 * Error convention: 0 or a count on success, -1 with a message in err.
 * Memory: the caller owns the arrays. */
#ifndef HS_WEATHER_H
#define HS_WEATHER_H

#include <stddef.h>
#include <stdint.h>

#include "hs_site.h"
#include "hs_store.h"

#define HS_WEATHER_MAX_DAYS 60
#define HS_WEATHER_MIN_HOURS 20

struct hs_weather_day {
    int64_t day;                 /* UTC day number (ms / 86400000) */
    double t_min_c, t_max_c, relative_humidity, wind_m_s, solar_mj_m2;
    double penman_mm_day;        /* open fresh water */
};

/* 1 when the site has a signal of every weather quantity. */
int hs_weather_configured(const hs_site *site);

/* Complete days among the last `days` (<= HS_WEATHER_MAX_DAYS) before
 * now_ms, oldest first; returns how many. */
int hs_weather_read(hs_store *st, const hs_site *site, int64_t now_ms, int days,
                    struct hs_weather_day *out, char *err, size_t errlen);

/* The fit of k x Penman x f (f: the brine factor of each pond) to what the
 * ponds achieved. For each pond, each recorded rate (the daemon records the
 * mean of its window of `window` days) is paired with the mean Penman
 * estimate of the same days (at least half of them known). */
struct hs_weather_fit {
    double factor, rms_mm_day, r2;
    int pairs;
};
struct hs_weather_pond {
    const int64_t *day;          /* UTC days of the achieved rates */
    const double *rate_mm_day;   /* achieved net evaporation */
    int n;
    double brine_factor;         /* f of the pond's brine (hc_evaporation_activity_factor) */
};
int hs_weather_fit(const struct hs_weather_day *w, int n_days, const struct hs_weather_pond *ponds,
                   size_t n_ponds, int window, struct hs_weather_fit *out);

#endif
