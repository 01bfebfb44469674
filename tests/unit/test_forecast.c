/* Forecast of days to a target: closed form for a vertical-walled pond
 * (worked by hand), and an independent day-by-day evolution of a sloped
 * pond (explicit time stepping of the same water balance) against the
 * integral the forecast evaluates. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hc_balance.h"
#include "hc_forecast.h"
#include "hydro_demo_curve.h"

static hc_brine_curve curve;

static int setup_curve(void **unused)
{
    (void)unused;
    curve = *hydro_demo_curve();
    return hc_curve_check(&curve, NULL) == HC_OK ? 0 : -1;
}

static void vertical_walls_closed_form(void **unused)
{
    (void)unused;
    /* Vertical walls: the area is constant, so W(t) = W0 - rho_d A E t and
     * CF = W0 CF0 / W give t = W0 (1 - CF0/CF1) / (rho_d A E) (worked by
     * hand from hc_forecast.h's model). */
    hc_pond_shape shape = {.is_table = 0, .prism = {50000, 0, 0, 1.5}};
    hc_forecast_input in = {&shape, &curve, 0.60, 1.5, 5.0, 0, 0};
    hc_curve_point now;
    assert_int_equal(hc_curve_at_cf(&curve, 1.5, &now), HC_OK);
    double w0 = 0.60 * 50000 * now.density_kg_m3 / (1 + now.dissolved_kg_per_kg_water);
    double expect = w0 * (1 - 1.5 / 4.0) / (1000 * 50000 * 0.005);
    double days;
    assert_int_equal(hc_forecast_days_to_cf(&in, 4.0, &days), HC_OK);
    assert_near(days, expect, 1e-6 * expect);
    /* Through density: the curve's density at CF 4 gives the same answer. */
    hc_curve_point target;
    hc_curve_at_cf(&curve, 4.0, &target);
    assert_int_equal(hc_forecast_days_to_density(&in, target.density_kg_m3, &days), HC_OK);
    assert_near(days, expect, 1e-6 * expect);
}

/* The independent evolution: explicit steps of dt days, each removing
 * rho_d A(h) E(CF) dt of water, until CF reaches the target. */
static double evolve(const hc_forecast_input *in, double cf_target, double dt)
{
    hc_curve_point pt;
    hc_curve_at_cf(in->curve, in->cf, &pt);
    double v, f0 = 1, t = 0;
    hc_shape_at_level(in->shape, in->level_m, &v, NULL);
    double w0 = v * pt.density_kg_m3 / (1 + pt.dissolved_kg_per_kg_water), w = w0;
    if (in->scale_by_activity)
        hc_evaporation_activity_factor(pt.water_activity, in->relative_humidity, &f0);
    for (long step = 0; step < 10000000; step++) {
        double cf = w0 * in->cf / w;
        if (cf >= cf_target)
            return t;
        hc_curve_at_cf(in->curve, cf, &pt);
        double h, a, f = 1;
        hc_shape_level_of_volume(in->shape, w * (1 + pt.dissolved_kg_per_kg_water) / pt.density_kg_m3,
                                 &h);
        hc_shape_at_level(in->shape, h, NULL, &a);
        if (in->scale_by_activity)
            hc_evaporation_activity_factor(pt.water_activity, in->relative_humidity, &f);
        double dw = 1000 * a * in->net_evap_mm_day / 1000 * (f / f0) * dt;
        double cf_next = w0 * in->cf / (w - dw);
        if (cf_next >= cf_target) /* land on the target inside the step */
            return t + dt * (w - w0 * in->cf / cf_target) / dw;
        w -= dw;
        t += dt;
    }
    return NAN;
}

static void matches_step_by_step_evolution(void **unused)
{
    (void)unused;
    /* A 4 ha concentrator with 3:1 dikes, 0.8 m deep at CF 2, 6 mm/day,
     * slowing with water activity under RH 0.5: forecast to the halite
     * point of the curve, then on into the crystalliser range. */
    hc_pond_shape shape = {.is_table = 0, .prism = {40000, 0, 3, 1.5}};
    hc_forecast_input in = {&shape, &curve, 0.80, 2.0, 6.0, 1, 0.5};
    const double targets[] = {5.0, 9.8, 14.0};
    for (int i = 0; i < 3; i++) {
        double days;
        assert_int_equal(hc_forecast_days_to_cf(&in, targets[i], &days), HC_OK);
        double ref = evolve(&in, targets[i], 0.001);
        printf("# forecast to CF %.1f: %.3f days, step-by-step evolution %.3f days\n",
               targets[i], days, ref);
        assert_true(isfinite(ref));
        assert_near(days, ref, 0.01);
    }
}

static void edge_cases(void **unused)
{
    (void)unused;
    hc_pond_shape shape = {.is_table = 0, .prism = {40000, 0, 3, 1.5}};
    double days;
    /* Already there. */
    hc_forecast_input in = {&shape, &curve, 0.80, 5.0, 6.0, 0, 0};
    assert_int_equal(hc_forecast_days_to_cf(&in, 4.0, &days), HC_OK);
    assert_near(days, 0, 0);
    /* Net gain of water: never. */
    in.net_evap_mm_day = -1;
    assert_int_equal(hc_forecast_days_to_cf(&in, 8.0, &days), HC_OK);
    assert_true(isinf(days));
    /* Humid air stalls the brine before CF 30 (a_w falls below 0.7). */
    hc_forecast_input humid = {&shape, &curve, 0.80, 2.0, 6.0, 1, 0.7};
    assert_int_equal(hc_forecast_days_to_cf(&humid, 30.0, &days), HC_OK);
    assert_true(isinf(days));
    /* Beyond the curve. */
    in.net_evap_mm_day = 6;
    assert_int_equal(hc_forecast_days_to_cf(&in, 80.0, &days), HC_ERR_DOMAIN);
    /* A surveyed pond whose table starts at 0.2 m runs out of survey
     * (too shallow to say) before CF 30 from 0.25 m. */
    const double lv[] = {0.2, 0.6, 1.0}, vv[] = {8000, 24000, 40000};
    hc_pond_shape table = {.is_table = 1, .table = {3, lv, vv, NULL}};
    hc_forecast_input shallow = {&table, &curve, 0.25, 2.0, 6.0, 0, 0};
    assert_int_equal(hc_forecast_days_to_cf(&shallow, 30.0, &days), HC_ERR_DOMAIN);
    /* Missing or negative inputs. */
    hc_forecast_input bad = in;
    bad.level_m = NAN;
    assert_int_equal(hc_forecast_days_to_cf(&bad, 8.0, &days), HC_ERR_NOT_FINITE);
    bad = in;
    bad.level_m = -0.1;
    assert_int_equal(hc_forecast_days_to_cf(&bad, 8.0, &days), HC_ERR_NEGATIVE);
    bad = in;
    bad.curve = NULL;
    assert_int_equal(hc_forecast_days_to_cf(&bad, 8.0, &days), HC_ERR_ARGUMENT);
    assert_int_equal(hc_forecast_days_to_density(&in, 990, &days), HC_ERR_DOMAIN);
}

static void rate_spread(void **unused)
{
    (void)unused;
    /* Worked by hand: {5, 6, 7} has mean 6 and sample s.d. 1. */
    const double r[] = {5, 6, 7};
    double lo, mean, hi;
    assert_int_equal(hc_rate_spread(r, 3, 1.0, &lo, &mean, &hi), HC_OK);
    assert_near(mean, 6, 1e-12);
    assert_near(lo, 5, 1e-12);
    assert_near(hi, 7, 1e-12);
    assert_int_equal(hc_rate_spread(r, 1, 1.0, &lo, &mean, &hi), HC_OK);
    assert_near(lo, hi, 0);
    assert_int_equal(hc_rate_spread(r, 0, 1.0, &lo, &mean, &hi), HC_ERR_ARGUMENT);
    const double bad[] = {5, NAN};
    assert_int_equal(hc_rate_spread(bad, 2, 1.0, &lo, &mean, &hi), HC_ERR_NOT_FINITE);
}

static void curve_checks(void **unused)
{
    (void)unused;
    size_t row;
    double cf2[] = {1, 2, 1.5}, rho2[] = {1025, 1050, 1060}, s2[] = {0.03, 0.06, 0.09},
           d2[] = {0, 0, 0};
    hc_brine_curve bad = {3, cf2, rho2, s2, d2, NULL};
    assert_int_equal(hc_curve_check(&bad, &row), HC_ERR_ARGUMENT);
    assert_int_equal(row, 2);
    /* Deposit per CF worked by hand: 1000 kg water at CF 12 going to CF 20
     * deposits 1000 * 12 * (D(20) - D(12)). */
    hc_curve_point a, b;
    hc_curve_at_cf(&curve, 12, &a);
    hc_curve_at_cf(&curve, 20, &b);
    double kg;
    assert_int_equal(hc_curve_deposit_between(&curve, 1000, 12, 20, &kg), HC_OK);
    assert_near(kg, 12000 * (b.deposited_kg_per_kg_feed_water - a.deposited_kg_per_kg_feed_water),
                1e-9);
    assert_true(kg > 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(vertical_walls_closed_form),
        cmocka_unit_test(matches_step_by_step_evolution),
        cmocka_unit_test(edge_cases),
        cmocka_unit_test(rate_spread),
        cmocka_unit_test(curve_checks),
    };
    return cmocka_run_group_tests(tests, setup_curve, NULL);
}
