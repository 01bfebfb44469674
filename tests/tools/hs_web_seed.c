/* Test helper: gives every pond of a site a week of invented history so the
 * page's trend views have something to draw, then folds the rollups.
 *   hs_web_seed --config FILE [--days N]
 * Invented demo data, no source: density at the reference temperature
 * rises from the pond's density_in to its density_out over the period with
 * a small daily wiggle; temperature swings 6 degC a day around 22 degC;
 * depth falls slowly from the middle of the pond's limits. One state every
 * 10 minutes, ending one hour ago (the daemon adds the present). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hc_baume.h"
#include "hs_config.h"
#include "hs_store.h"

int main(int argc, char **argv)
{
    const char *config = NULL;
    long days = 7;
    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--config") == 0)
            config = argv[i + 1];
        else if (strcmp(argv[i], "--days") == 0)
            days = strtol(argv[i + 1], NULL, 10);
    }
    if (config == NULL || days < 1 || days > 60) {
        fprintf(stderr, "usage: hs_web_seed --config FILE [--days 1..60]\n");
        return 2;
    }
    hs_site site;
    hs_diag diag;
    if (hs_site_load(config, &site, &diag) != 0) {
        fprintf(stderr, "%s\n", diag.n ? diag.msg[0] : "bad config");
        return 78;
    }
    char err[512];
    hs_store *st = hs_store_open(site.site.database, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "%s\n", err);
        return 1;
    }
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    int64_t now = (int64_t)ts.tv_sec * 1000, end = now - 3600000, every = 600000;
    int64_t start = end - days * 86400000;
    long rows = 0;
    for (size_t p = 0; p < site.n_ponds; p++) {
        const hs_pond *pd = &site.ponds[p];
        double lo = isfinite(pd->density_in_kg_m3) ? pd->density_in_kg_m3 : 1025.0;
        double hi = isfinite(pd->density_out_kg_m3) ? pd->density_out_kg_m3 : lo + 10.0;
        double dmin = isfinite(pd->level_min_m) ? pd->level_min_m : 0.2;
        double dmax = isfinite(pd->level_max_m) ? pd->level_max_m : 1.0;
        for (int64_t t = start; t < end; t += every) {
            double f = (double)(t - start) / (double)(end - start);
            double day = 2.0 * M_PI * (double)(t % 86400000) / 86400000.0;
            hc_brine_state s;
            hc_state_clear(&s);
            double rho = lo + (hi - lo) * (0.1 + 0.8 * f) + 0.3 * sin(day);
            s.reference_temperature_c = site.site.reference_temperature_c;
            s.baume_modulus = site.site.baume_modulus;
            if (hc_baume_sg(rho, s.reference_temperature_c, &s.specific_gravity) != HC_OK ||
                hc_baume_from_sg(s.specific_gravity, s.baume_modulus, &s.baume) != HC_OK)
                continue;
            s.temperature_c = 22.0 - 3.0 * cos(day - 0.5);
            s.density_kg_m3 = rho - 0.4 * (s.temperature_c - s.reference_temperature_c);
            hs_pond_extra x;
            hs_pond_extra_clear(&x);
            x.depth_m = dmin + (dmax - dmin) * (0.6 - 0.25 * f);
            if (hs_store_add_state(st, pd->name, t, &s, &x, HS_QUALITY_GOOD) != 0) {
                fprintf(stderr, "%s\n", hs_store_error(st));
                return 1;
            }
            rows++;
        }
    }
    if (hs_store_flush(st) != 0 || hs_store_maintain(st, now) != 0) {
        fprintf(stderr, "%s\n", hs_store_error(st));
        return 1;
    }
    hs_store_close(st);
    hs_site_free(&site);
    printf("seeded %ld states\n", rows);
    return 0;
}
