/* Physical plausibility limits (hs_plausible.h) and the stuck-sensor watch
 * (hs_flatline.h). The limits themselves are common practice, no source
 * (hs_plausible.h gives the reasoning); these tests check that each one is
 * applied at decoding, in the signal's own unit, and that a site's
 * valid_min/valid_max can only narrow it. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hp_codec.h"
#include "hp_point.h"
#include "hs_flatline.h"
#include "hs_plausible.h"

/* A float32 signal of quantity q in `unit` (si_factor: SI per unit). */
static hs_signal signal_of(hs_quantity q, double si_factor)
{
    hs_signal g;
    memset(&g, 0, sizeof g);
    g.quantity = q;
    g.si_factor = si_factor;
    g.point.type = HP_FLOAT32;
    g.point.scale = 1.0;
    g.point.valid_min = -INFINITY;
    g.point.valid_max = INFINITY;
    return g;
}

/* The quality a reading of `value` (in the signal's unit) decodes to. */
static hp_quality decode(const hs_signal *g, double value)
{
    uint16_t regs[4];
    hp_sample s;
    hp_encode(value, g->point.type, g->point.byte_order, g->point.word_order, regs);
    hp_point_decode(&g->point, regs, &s);
    return s.quality;
}

static void check_range(hs_quantity q, const hs_pond *p, double si_factor, double lo, double hi)
{
    hs_signal g = signal_of(q, si_factor);
    assert_int_equal(hs_plausible_narrow(&g, p), 0);
    double span = hi - lo, eps = 1e-3 * span;
    assert_int_equal(decode(&g, lo + eps), HP_Q_GOOD);
    assert_int_equal(decode(&g, hi - eps), HP_Q_GOOD);
    assert_int_equal(decode(&g, lo - eps), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&g, hi + eps), HP_Q_OUT_OF_RANGE);
}

static void each_quantity_has_limits(void **unused)
{
    (void)unused;
    hs_pond pond;
    memset(&pond, 0, sizeof pond);
    pond.freeboard_m = 1.5;          /* crest 1.5 m above the floor */
    pond.pressure_height_m = 0.1;    /* pressure sensor 0.1 m above it */
    pond.distance_height_m = 3.0;    /* distance sensor 3 m above it */
    pond.level_max_m = NAN;
    const double g_n = 9.80665;
    check_range(HS_Q_CONDUCTIVITY, &pond, 1.0, 0.0, 300.0);        /* mS/cm */
    check_range(HS_Q_CONDUCTIVITY, &pond, 10.0, 0.0, 30.0);        /* S/m: same limits */
    check_range(HS_Q_TEMPERATURE, &pond, 1.0, -10.0, 70.0);        /* degC */
    check_range(HS_Q_DENSITY, &pond, 1.0, 990.0, 1400.0);          /* kg/m3 */
    check_range(HS_Q_DENSITY, &pond, 1000.0, 0.990, 1.400);        /* g/cm3 */
    /* pressure: depth above the sensor from 0.2 m below the floor to 0.5 m
     * above the crest, at 1400 kg/m3 (p = rho g h) */
    check_range(HS_Q_LEVEL_PRESSURE, &pond, 1.0, -(0.2 + 0.1) * 1400 * g_n,
                (1.5 + 0.5 - 0.1) * 1400 * g_n);
    check_range(HS_Q_PRESSURE_UPPER, &pond, 1000.0, -(0.2 + 0.1) * 1.4 * g_n,
                (1.5 + 0.5 - 0.1) * 1.4 * g_n);                     /* kPa */
    check_range(HS_Q_LEVEL_DISTANCE, &pond, 1.0, 0.0, 3.0 + 0.2);  /* m */
    check_range(HS_Q_RAIN, &pond, 0.001, 0.0, 100000.0);           /* mm */
    check_range(HS_Q_PUMP_RUN, &pond, 1.0, 0.0, 1.0);
    check_range(HS_Q_PUMP_MANUAL, &pond, 1.0, 0.0, 1.0);
    /* without a crest: level_max + 1 m, else 5 m */
    pond.freeboard_m = NAN;
    pond.level_max_m = 1.0;
    check_range(HS_Q_LEVEL_PRESSURE, &pond, 1.0, -(0.2 + 0.1) * 1400 * g_n,
                (1.0 + 1.0 - 0.1) * 1400 * g_n);
    check_range(HS_Q_LEVEL_PRESSURE, NULL, 1.0, -0.2 * 1400 * g_n, 5.0 * 1400 * g_n);
}

/* The garbage: a dead densitometer (0, 500 kg/m3), 1981 degC,
 * -489 kg/m3, 11,708 m of depth: all out-of-range with no site limits. */
static void garbage_is_out_of_range(void **unused)
{
    (void)unused;
    hs_signal d = signal_of(HS_Q_DENSITY, 1.0);
    hs_signal t = signal_of(HS_Q_TEMPERATURE, 1.0);
    hs_signal l = signal_of(HS_Q_LEVEL_PRESSURE, 1.0);
    hs_signal x = signal_of(HS_Q_LEVEL_DISTANCE, 1.0);
    hs_pond pond;
    memset(&pond, 0, sizeof pond);
    pond.freeboard_m = NAN;
    pond.level_max_m = NAN;
    pond.distance_height_m = 2.0;
    assert_int_equal(hs_plausible_narrow(&d, &pond), 0);
    assert_int_equal(hs_plausible_narrow(&t, &pond), 0);
    assert_int_equal(hs_plausible_narrow(&l, &pond), 0);
    assert_int_equal(hs_plausible_narrow(&x, &pond), 0);
    assert_int_equal(decode(&d, 0.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&d, 500.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&d, -489.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&d, 1210.0), HP_Q_GOOD);
    assert_int_equal(decode(&t, 1981.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&l, 11708.0 * 1025.0 * 9.80665), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&x, -11708.0), HP_Q_OUT_OF_RANGE);
}

/* valid_min/valid_max narrow the built-in limits, never widen them; limits
 * entirely outside them are refused. */
static void site_limits_only_narrow(void **unused)
{
    (void)unused;
    hs_signal g = signal_of(HS_Q_DENSITY, 1.0);
    g.point.valid_min = 500.0;   /* wider than 990: the built-in limit stays */
    g.point.valid_max = 1250.0;  /* narrower than 1400: kept */
    assert_int_equal(hs_plausible_narrow(&g, NULL), 0);
    assert_true(g.point.valid_min == 990.0);
    assert_true(g.point.valid_max == 1250.0);
    assert_int_equal(decode(&g, 700.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&g, 1300.0), HP_Q_OUT_OF_RANGE);
    assert_int_equal(decode(&g, 1200.0), HP_Q_GOOD);
    hs_signal bad = signal_of(HS_Q_TEMPERATURE, 1.0);
    bad.point.valid_min = 80.0;
    bad.point.valid_max = 90.0;
    assert_int_equal(hs_plausible_narrow(&bad, NULL), -1);
}

static void flatline_after_its_time(void **unused)
{
    (void)unused;
    hs_flatline f;
    memset(&f, 0, sizeof f);
    const int64_t h = 3600 * 1000LL, after = 4 * h;
    assert_int_equal(hs_flatline_feed(&f, 55.25, 0, after), HS_FLAT_NONE);
    assert_int_equal(hs_flatline_feed(&f, 55.25, 2 * h, after), HS_FLAT_NONE);
    assert_false(f.stuck);
    assert_int_equal(hs_flatline_feed(&f, 55.25, 4 * h, after), HS_FLAT_STUCK);
    assert_true(f.stuck);
    assert_int_equal(hs_flatline_feed(&f, 55.25, 5 * h, after), HS_FLAT_NONE); /* said once */
    assert_true(f.stuck);
    /* the smallest change is movement: a live analyser's last digit */
    assert_int_equal(hs_flatline_feed(&f, nextafter(55.25, 60.0), 5 * h + 1, after), HS_FLAT_MOVED);
    assert_false(f.stuck);
    /* a value that changes all the time never flatlines */
    for (int i = 0; i < 100; i++)
        assert_int_equal(hs_flatline_feed(&f, 50.0 + (i % 2) * 0.01, 6 * h + i * h, after),
                         HS_FLAT_NONE);
    /* off: never stuck */
    memset(&f, 0, sizeof f);
    assert_int_equal(hs_flatline_feed(&f, 1.0, 0, 0), HS_FLAT_NONE);
    assert_int_equal(hs_flatline_feed(&f, 1.0, 100 * h, 0), HS_FLAT_NONE);
    assert_false(f.stuck);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(each_quantity_has_limits),
        cmocka_unit_test(garbage_is_out_of_range),
        cmocka_unit_test(site_limits_only_narrow),
        cmocka_unit_test(flatline_after_its_time),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
