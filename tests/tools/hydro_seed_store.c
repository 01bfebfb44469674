/* hydro_seed_store DB POND DAYS DEPTH_M DENSITY TEMP_C RATE1[,RATE2...]
 * Writes one pond state per UTC day for the last DAYS days (today's an hour
 * ago, the others at noon) into the store DB (created if needed): depth,
 * density and temperature as given, and the daily net evaporation cycling
 * through the listed rates, oldest first, so that
 * `halostage forecast` can be tested against known history. Test tool. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hc_state.h"
#include "hs_store.h"

int main(int argc, char **argv)
{
    if (argc != 8) {
        fprintf(stderr, "usage: hydro_seed_store DB POND DAYS DEPTH_M DENSITY TEMP_C RATES\n");
        return 2;
    }
    int days = atoi(argv[3]);
    double depth = strtod(argv[4], NULL), rho = strtod(argv[5], NULL), t = strtod(argv[6], NULL);
    double rates[64];
    int n = 0;
    char *save = NULL;
    for (char *tok = strtok_r(argv[7], ",", &save); tok != NULL && n < 64;
         tok = strtok_r(NULL, ",", &save))
        rates[n++] = strtod(tok, NULL);
    if (days < 1 || days > 60 || n == 0) {
        fprintf(stderr, "hydro_seed_store: bad DAYS or RATES\n");
        return 2;
    }
    char err[512];
    hs_store *st = hs_store_open(argv[1], HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "hydro_seed_store: %s\n", err);
        return 1;
    }
    const int64_t day_ms = 86400000;
    int64_t now = (int64_t)time(NULL) * 1000, midnight = now / day_ms * day_ms;
    for (int d = days - 1; d >= 0; d--) {
        int64_t t_ms = d == 0 ? now - 3600000 : midnight - d * day_ms + day_ms / 2;
        if (t_ms < midnight - d * day_ms)
            t_ms = midnight - d * day_ms; /* just after midnight: stay in today */
        int day = days - 1 - d;
        hc_brine_state s;
        hc_state_clear(&s);
        s.density_kg_m3 = rho;
        s.temperature_c = t;
        s.method = HC_METHOD_DENSITOMETER;
        hs_pond_extra x;
        hs_pond_extra_clear(&x);
        x.depth_m = depth;
        x.net_evaporation_mm_day = rates[day % n];
        if (hs_store_add_state(st, argv[2], t_ms, &s, &x, HS_QUALITY_GOOD) != 0) {
            fprintf(stderr, "hydro_seed_store: %s\n", hs_store_error(st));
            hs_store_close(st);
            return 1;
        }
    }
    int rc = hs_store_flush(st);
    hs_store_close(st);
    return rc == 0 ? 0 : 1;
}
