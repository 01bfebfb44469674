/* Pond geometry: prism formulas worked by hand, monotone table
 * interpolation, inverse lookups and table validation. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hc_geometry.h"

static void prism_worked_by_hand(void **unused)
{
    (void)unused;
    /* 100 m x 100 m floor, dikes 2:1, h = 0.5 m. Worked by hand: the sides
     * move out 1 m each, so the surface is 102 m x 102 m = 10404 m2, and
     * V = 10000*0.5 + 0.5*2*400*0.25 + (4/3)*4*0.125 = 5100.6667 m3. */
    hc_prism p = {10000, 0, 2, 1.5};
    double v, a;
    assert_int_equal(hc_prism_at_level(&p, 0.5, &v, &a), HC_OK);
    assert_near(a, 10404.0, 1e-9);
    assert_near(v, 5100.0 + 2.0 / 3.0, 1e-9);
    /* A 200 m x 50 m floor (perimeter 500), vertical walls: V = A0 h. */
    hc_prism q = {10000, 500, 0, 1.0};
    assert_int_equal(hc_prism_at_level(&q, 0.8, &v, &a), HC_OK);
    assert_near(v, 8000.0, 1e-9);
    assert_near(a, 10000.0, 1e-9);
}

static void prism_inverse_round_trips(void **unused)
{
    (void)unused;
    hc_prism p = {2500, 0, 3, 2.0};
    for (double h = 0; h <= 2.0; h += 0.137) {
        double v, back;
        assert_int_equal(hc_prism_at_level(&p, h, &v, NULL), HC_OK);
        assert_int_equal(hc_prism_level_of_volume(&p, v, &back), HC_OK);
        assert_near(back, h, 1e-8);
    }
    double h;
    assert_int_equal(hc_prism_level_of_volume(&p, -1, &h), HC_ERR_DOMAIN);
    assert_int_equal(hc_prism_level_of_volume(&p, 1e9, &h), HC_ERR_DOMAIN);
}

static void prism_rejects_bad_shapes(void **unused)
{
    (void)unused;
    hc_prism neg = {1000, 0, -1, 1};
    assert_int_equal(hc_prism_check(&neg), HC_ERR_NEGATIVE);
    hc_prism zero = {0, 0, 1, 1};
    assert_int_equal(hc_prism_check(&zero), HC_ERR_ARGUMENT);
    hc_prism nan_area = {NAN, 0, 1, 1};
    assert_int_equal(hc_prism_check(&nan_area), HC_ERR_NOT_FINITE);
    /* A 100 m2 rectangle cannot have a perimeter under 40 m. */
    hc_prism short_perimeter = {100, 30, 1, 1};
    assert_int_equal(hc_prism_check(&short_perimeter), HC_ERR_DOMAIN);
    double v;
    hc_prism ok = {100, 0, 1, 1};
    assert_int_equal(hc_prism_at_level(&ok, 1.2, &v, NULL), HC_ERR_DOMAIN);
    assert_int_equal(hc_prism_at_level(&ok, -0.1, &v, NULL), HC_ERR_DOMAIN);
}

static void linear_table_is_exact(void **unused)
{
    (void)unused;
    /* V = 1000 h: equal secants, so the monotone slopes equal them and the
     * Hermite cubic reduces to the straight line (worked by hand). */
    const double lv[] = {0, 0.5, 1.0, 1.5}, vv[] = {0, 500, 1000, 1500};
    hc_stage_table t = {4, lv, vv, NULL};
    assert_int_equal(hc_stage_table_check(&t, NULL), HC_OK);
    double v, a;
    assert_int_equal(hc_stage_table_at_level(&t, 0.73, &v, &a), HC_OK);
    assert_near(v, 730.0, 1e-9);
    assert_near(a, 1000.0, 1e-9);
}

static void table_follows_sampled_prism(void **unused)
{
    (void)unused;
    /* A table sampled every 0.1 m from a sloped pond reproduces the pond's
     * formula between the rows (reference: the prism formula above). */
    hc_prism p = {40000, 0, 2, 1.25};
    double lv[13], vv[13], av[13];
    for (int i = 0; i < 13; i++) {
        lv[i] = 0.1 * i;
        hc_prism_at_level(&p, lv[i], &vv[i], &av[i]);
    }
    hc_stage_table with_area = {13, lv, vv, av}, without = {13, lv, vv, NULL};
    assert_int_equal(hc_stage_table_check(&with_area, NULL), HC_OK);
    for (double h = 0.03; h < 1.2; h += 0.1) {
        double v_ref, a_ref, v, a;
        hc_prism_at_level(&p, h, &v_ref, &a_ref);
        assert_int_equal(hc_stage_table_at_level(&with_area, h, &v, &a), HC_OK);
        assert_true(fabs(v - v_ref) / v_ref < 1e-5);
        assert_true(fabs(a - a_ref) / a_ref < 1e-5);
        assert_int_equal(hc_stage_table_at_level(&without, h, NULL, &a), HC_OK);
        assert_true(fabs(a - a_ref) / a_ref < 1e-5);
        double back;
        assert_int_equal(hc_stage_table_level_of_volume(&with_area, v, &back), HC_OK);
        assert_near(back, h, 1e-8);
    }
}

static void monotone_table_never_overshoots(void **unused)
{
    (void)unused;
    /* A survey with a flat shelf: a plain cubic spline would dip or bulge;
     * Fritsch-Carlson slopes keep V within each interval's end values. */
    const double lv[] = {0, 0.1, 0.2, 0.3, 0.4, 0.5};
    const double vv[] = {0, 10, 10.001, 10.002, 500, 510};
    hc_stage_table t = {6, lv, vv, NULL};
    assert_int_equal(hc_stage_table_check(&t, NULL), HC_OK);
    double prev = -1;
    for (int i = 0; i <= 500; i++) {
        double h = 0.001 * i, v;
        assert_int_equal(hc_stage_table_at_level(&t, h, &v, NULL), HC_OK);
        size_t k = i == 500 ? 4 : (size_t)(i / 100);
        assert_true(v >= vv[k] - 1e-9 && v <= vv[k + 1] + 1e-9);
        assert_true(v >= prev - 1e-12);
        prev = v;
    }
}

static void bad_tables_name_the_row(void **unused)
{
    (void)unused;
    size_t row = 99;
    const double lv[] = {0, 0.5, 0.4, 1.0}, vv[] = {0, 5, 6, 10};
    hc_stage_table t = {4, lv, vv, NULL};
    assert_int_equal(hc_stage_table_check(&t, &row), HC_ERR_ARGUMENT);
    assert_int_equal(row, 2);
    const double lv2[] = {0, 0.5, 1.0}, vv2[] = {0, 5, 4};
    hc_stage_table t2 = {3, lv2, vv2, NULL};
    assert_int_equal(hc_stage_table_check(&t2, &row), HC_ERR_ARGUMENT);
    assert_int_equal(row, 2);
    const double vv3[] = {0, NAN, 8};
    hc_stage_table t3 = {3, lv2, vv3, NULL};
    assert_int_equal(hc_stage_table_check(&t3, &row), HC_ERR_NOT_FINITE);
    assert_int_equal(row, 1);
    const double av[] = {10, -1, 12}, vv4[] = {0, 5, 10};
    hc_stage_table t4 = {3, lv2, vv4, av};
    assert_int_equal(hc_stage_table_check(&t4, &row), HC_ERR_NEGATIVE);
    assert_int_equal(row, 1);
    hc_stage_table one = {1, lv2, vv4, NULL};
    assert_int_equal(hc_stage_table_check(&one, &row), HC_ERR_ARGUMENT);
    hc_stage_table ok = {3, lv2, vv4, NULL};
    double v;
    assert_int_equal(hc_stage_table_at_level(&ok, 1.01, &v, NULL), HC_ERR_DOMAIN);
    assert_int_equal(hc_stage_table_at_level(&ok, NAN, &v, NULL), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_stage_table_level_of_volume(&ok, 11, &v), HC_ERR_DOMAIN);
}

static void shape_dispatches(void **unused)
{
    (void)unused;
    const double lv[] = {0, 1}, vv[] = {0, 300};
    hc_pond_shape table = {.is_table = 1, .table = {2, lv, vv, NULL}};
    hc_pond_shape prism = {.is_table = 0, .prism = {300, 0, 0, 1}};
    double v1, v2;
    assert_int_equal(hc_shape_at_level(&table, 0.4, &v1, NULL), HC_OK);
    assert_int_equal(hc_shape_at_level(&prism, 0.4, &v2, NULL), HC_OK);
    assert_near(v1, 120.0, 1e-9);
    assert_near(v2, 120.0, 1e-9);
    assert_near(hc_shape_max_level(&table), 1.0, 0);
    assert_near(hc_shape_max_level(&prism), 1.0, 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(prism_worked_by_hand),
        cmocka_unit_test(prism_inverse_round_trips),
        cmocka_unit_test(prism_rejects_bad_shapes),
        cmocka_unit_test(linear_table_is_exact),
        cmocka_unit_test(table_follows_sampled_prism),
        cmocka_unit_test(monotone_table_never_overshoots),
        cmocka_unit_test(bad_tables_name_the_row),
        cmocka_unit_test(shape_dispatches),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
