/* weather_seed_store DB POND DAYS TMIN TMAX RH WIND SOLAR_PEAK
 * Writes a weather station's samples into the store DB for the last DAYS
 * complete UTC days (not today), every 10 minutes: POND.air-temperature
 * = TMIN + (TMAX - TMIN)(1 - cos(2 pi (h - 3) / 24)) / 2 (lowest at 03:00,
 * highest at 15:00, both on the sample grid), POND.humidity = RH (fraction),
 * POND.wind-speed = WIND [m/s], POND.solar-radiation = SOLAR_PEAK
 * sin(pi (h - 6) / 12) between 06:00 and 18:00, else 0 [W/m2]; then folds
 * the rollups. Test tool: the scripts recompute the same numbers. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "hs_store.h"

int main(int argc, char **argv)
{
    if (argc != 9) {
        fprintf(stderr, "usage: weather_seed_store DB POND DAYS TMIN TMAX RH WIND SOLAR_PEAK\n");
        return 2;
    }
    int days = atoi(argv[3]);
    double tmin = strtod(argv[4], NULL), tmax = strtod(argv[5], NULL);
    double rh = strtod(argv[6], NULL), wind = strtod(argv[7], NULL), peak = strtod(argv[8], NULL);
    if (days < 1 || days > 60) {
        fprintf(stderr, "weather_seed_store: DAYS must be 1..60\n");
        return 2;
    }
    char err[512], name[4][128];
    hs_store *st = hs_store_open(argv[1], HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "weather_seed_store: %s\n", err);
        return 1;
    }
    const char *q[4] = {"air-temperature", "humidity", "wind-speed", "solar-radiation"};
    for (int k = 0; k < 4; k++)
        snprintf(name[k], sizeof name[k], "%s.%s", argv[2], q[k]);
    const int64_t day_ms = 86400000, step_ms = 600000;
    int64_t now = (int64_t)time(NULL) * 1000, today = now / day_ms * day_ms;
    for (int64_t t = today - days * day_ms; t < today; t += step_ms) {
        double h = (double)(t % day_ms) / 3600000.0;
        double v[4] = {tmin + (tmax - tmin) * (1 - cos(2 * M_PI * (h - 3) / 24)) / 2, rh, wind,
                       h > 6 && h < 18 ? peak * sin(M_PI * (h - 6) / 12) : 0};
        for (int k = 0; k < 4; k++)
            if (hs_store_add_sample(st, name[k], t, v[k], HS_QUALITY_GOOD) != 0) {
                fprintf(stderr, "weather_seed_store: %s\n", hs_store_error(st));
                hs_store_close(st);
                return 1;
            }
    }
    int rc = hs_store_maintain(st, now);
    hs_store_close(st);
    return rc == 0 ? 0 : 1;
}
