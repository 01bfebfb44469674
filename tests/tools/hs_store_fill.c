/* Test helper: fills a store with pond states the integration scripts can
 * check against, then folds the rollups.
 *   hs_store_fill --db FILE --pond NAME --start-ms T --minutes N --every-s S
 * State i (at T + i*S seconds) has density 1100 + 0.01 i + (i*7919 mod 13)/10
 * kg/m3 and temperature 20 + (i mod 5) degC; the script recomputes the same
 * numbers independently. Prints "wrote N". */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_store.h"

int main(int argc, char **argv)
{
    const char *db = NULL, *pond = NULL;
    long long start = 0;
    long minutes = 0, every = 10;
    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--db") == 0) db = argv[i + 1];
        else if (strcmp(argv[i], "--pond") == 0) pond = argv[i + 1];
        else if (strcmp(argv[i], "--start-ms") == 0) start = strtoll(argv[i + 1], NULL, 10);
        else if (strcmp(argv[i], "--minutes") == 0) minutes = strtol(argv[i + 1], NULL, 10);
        else if (strcmp(argv[i], "--every-s") == 0) every = strtol(argv[i + 1], NULL, 10);
    }
    if (db == NULL || pond == NULL || minutes <= 0 || every <= 0) {
        fprintf(stderr, "usage: hs_store_fill --db FILE --pond NAME --start-ms T --minutes N "
                        "--every-s S\n");
        return 2;
    }
    char err[512];
    hs_store *st = hs_store_open(db, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "%s\n", err);
        return 1;
    }
    long n = minutes * 60 / every;
    hc_brine_state s;
    hc_state_clear(&s);
    hs_pond_extra x;
    hs_pond_extra_clear(&x);
    for (long i = 0; i < n; i++) {
        s.density_kg_m3 = 1100.0 + 0.01 * (double)i + (double)((i * 7919) % 13) / 10.0;
        s.temperature_c = 20.0 + (double)(i % 5);
        x.depth_m = 0.5;
        if (hs_store_add_state(st, pond, start + (long long)i * every * 1000, &s, &x,
                               HS_QUALITY_GOOD) != 0) {
            fprintf(stderr, "%s\n", hs_store_error(st));
            return 1;
        }
    }
    if (hs_store_maintain(st, start + (long long)minutes * 60000 + 3600000) != 0) {
        fprintf(stderr, "%s\n", hs_store_error(st));
        return 1;
    }
    hs_store_close(st);
    printf("wrote %ld\n", n);
    return 0;
}
