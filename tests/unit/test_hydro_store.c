/* A pond's hydrology history read back from a real SQLite store: one rate
 * per UTC day (the day's last), the newest usable state, and the salt
 * deposited so far. No science here. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hs_hydro_store.h"

#define DAY 86400000LL

static void add(hs_store *st, const char *pond, int64_t t, double rho, double depth, double rate,
                double dep_t, hs_quality q)
{
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_kg_m3 = rho;
    s.temperature_c = 24;
    hs_pond_extra x;
    hs_pond_extra_clear(&x);
    x.depth_m = depth;
    x.net_evaporation_mm_day = rate;
    x.deposited_salt_t = dep_t;
    assert_int_equal(hs_store_add_state(st, pond, t, &s, &x, q), 0);
}

static void history_by_day(void **unused)
{
    (void)unused;
    char dir[] = "/tmp/hs_hstore_XXXXXX", path[64], err[256];
    assert_non_null(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/h.db", dir);
    hs_store *st = hs_store_open(path, HS_STORE_WRITE, NULL, err, sizeof err);
    assert_non_null(st);
    int64_t d0 = 20000 * DAY; /* an arbitrary UTC midnight */
    add(st, "x1", d0 + 3600000, 1220, 0.30, 4.0, 10, HS_QUALITY_GOOD);
    add(st, "x1", d0 + 7200000, 1221, 0.29, 4.5, 11, HS_QUALITY_GOOD);
    add(st, "x1", d0 + DAY + 1000, 1222, 0.28, 5.0, 12, HS_QUALITY_GOOD);
    add(st, "x1", d0 + 2 * DAY + 1000, 1223, 0.27, 6.0, 13, HS_QUALITY_GOOD);
    add(st, "x1", d0 + 2 * DAY + 2000, 1300, 0.01, NAN, NAN, HS_QUALITY_BAD); /* ignored state */
    add(st, "c1", d0 + 2 * DAY + 3000, 1050, 0.50, 7.0, NAN, HS_QUALITY_GOOD); /* other pond */
    assert_int_equal(hs_store_flush(st), 0);
    struct hs_hydro_history h;
    assert_int_equal(hs_hydro_history_read(st, "x1", d0 + 2 * DAY + 5000, 7, &h), 0);
    assert_int_equal(h.n, 3);
    assert_near(h.rate[0], 4.5, 0);
    assert_near(h.rate[1], 5.0, 0);
    assert_near(h.rate[2], 6.0, 0);
    assert_int_equal(h.have_state, 1);
    assert_near(h.density_kg_m3, 1223, 0);
    assert_near(h.depth_m, 0.27, 0);
    assert_near(h.deposited_salt_t, 13, 0);
    /* The window: only the last day. */
    assert_int_equal(hs_hydro_history_read(st, "x1", d0 + 2 * DAY + 5000, 1, &h), 0);
    assert_int_equal(h.n, 1);
    /* Feeding a tracker. */
    struct hs_hydro_config cfg;
    hs_hydro_config_default(&cfg);
    cfg.shape = (hc_pond_shape){.is_table = 0, .prism = {40000, 0, 0, 1}};
    cfg.crystalliser = 1;
    struct hs_hydro tr;
    assert_int_equal(hs_hydro_init(&tr, &cfg), 0);
    assert_int_equal(hs_hydro_history_read(st, "x1", d0 + 2 * DAY + 5000, 7, &h), 0);
    assert_int_equal(hs_hydro_seed(&tr, h.rate, h.n, 1000 * h.deposited_salt_t), 0);
    struct hs_hydro_report r;
    hs_hydro_report(&tr, NULL, NAN, NAN, NAN, NAN, &r);
    assert_near(r.net_evaporation_mm_day, (4.5 + 5 + 6) / 3, 1e-12);
    assert_near(r.deposited_salt_t, 13, 1e-12);
    assert_int_equal(hs_hydro_history_read(NULL, "x1", 0, 7, &h), -1);
    hs_store_close(st);
    unlink(path);
    char side[80];
    snprintf(side, sizeof side, "%s-wal", path);
    unlink(side);
    snprintf(side, sizeof side, "%s-shm", path);
    unlink(side);
    assert_int_equal(rmdir(dir), 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(history_by_day),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
