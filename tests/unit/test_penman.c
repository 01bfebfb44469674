/* Open-water evaporation from weather: FAO-56 auxiliaries against the
 * worked examples of FAO Irrigation and Drainage Paper 56 (Allen et al.
 * 1998, ch. 3), the Penman open-water form (Shuttleworth 1993) against a
 * hand calculation, and the calibration fit. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hc_balance.h"
#include "hc_penman.h"

static void fao56_vapour_pressure_example_3(void **unused)
{
    (void)unused;
    /* FAO-56 Example 3: Tmax 24.5, Tmin 15 degC -> e0 3.075 and 1.705 kPa,
     * es = 2.39 kPa (the e0 values as replicated by NCAR NCL's
     * satvpr_temp_fao56 documentation; es from memory). */
    assert_true(fabs(hc_sat_vapour_pressure_kpa(24.5) - 3.075) < 0.0005);
    assert_true(fabs(hc_sat_vapour_pressure_kpa(15.0) - 1.705) < 0.0005);
    double es = 0.5 * (hc_sat_vapour_pressure_kpa(24.5) + hc_sat_vapour_pressure_kpa(15.0));
    assert_true(fabs(es - 2.39) < 0.005);
}

static void fao56_slope(void **unused)
{
    (void)unused;
    /* FAO-56 eq. 13 at 19.75 degC: 0.142793 kPa/K (NCAR NCL
     * satvpr_slope_fao56 documentation, Example 1). */
    assert_true(fabs(hc_sat_vapour_slope_kpa_k(19.75) - 0.142793) < 2e-6);
    /* The slope is the derivative of eq. 11 (central difference), up to
     * FAO-56's rounding of 17.27 x 237.3 = 4098.17 to 4098. */
    double h = 1e-4;
    double fd = (hc_sat_vapour_pressure_kpa(30 + h) - hc_sat_vapour_pressure_kpa(30 - h)) / (2 * h);
    assert_true(fabs(hc_sat_vapour_slope_kpa_k(30) / fd - 4098.0 / (17.27 * 237.3)) < 1e-8);
}

static void fao56_psychrometric_example_2(void **unused)
{
    (void)unused;
    /* FAO-56 Example 2: at 1800 m, P = 81.8 kPa and gamma = 0.054 kPa/K
     * (from memory); at sea level gamma = 0.0674 (FAO-56 Annex 2 Table 2.2
     * for 0 m, from memory). */
    double p = hc_air_pressure_kpa(1800);
    assert_true(fabs(p - 81.8) < 0.05);
    assert_true(fabs(hc_psychrometric_kpa_k(p) - 0.054) < 0.0005);
    assert_true(fabs(hc_psychrometric_kpa_k(hc_air_pressure_kpa(0)) - 0.0674) < 0.0001);
}

static void fao56_radiation_examples_8_9_11(void **unused)
{
    (void)unused;
    /* FAO-56 Example 8: 20 degS on 3 September (day 246): Ra = 32.2
     * MJ m-2 day-1; Example 9: N = 11.7 h (both from memory). */
    double ra, n;
    assert_int_equal(hc_extraterrestrial_radiation(-20, 246, &ra, &n), HC_OK);
    assert_true(fabs(ra - 32.2) < 0.05);
    assert_true(fabs(n - 11.7) < 0.05);
    /* FAO-56 Example 11: Tmax 25.1, Tmin 19.1 degC, ea 2.1 kPa, Rs 14.5,
     * Rso 18.8 MJ m-2 day-1 -> Rnl = 3.5 (inputs as in the R package FAO56's
     * NLRad example; the result from memory). */
    double rnl;
    assert_int_equal(hc_net_longwave(19.1, 25.1, 2.1, 14.5, 18.8, &rnl), HC_OK);
    assert_true(fabs(rnl - 3.5) < 0.05);
}

static void penman_open_water_by_hand(void **unused)
{
    (void)unused;
    /* A summer day at a coastal works (invented inputs): Tmin 20, Tmax 30
     * degC, RH 0.55, u2 3 m/s, Rs 28 MJ m-2 day-1, 37.5 degN, day 196, 2 m.
     * Worked independently (a separate Python calculation of FAO-56 eqs.
     * 7-13, 21-25, 37-40 and Shuttleworth's open-water Penman): es = 3.29067,
     * ea = 1.80987 kPa, Delta = 0.188682, gamma = 0.0673488 kPa/K,
     * Ra = 40.820, Rso = 30.617, Rnl = 5.2073, Rn = 20.5527 MJ m-2 day-1,
     * E = 8.8483 mm/day. */
    hc_weather_day w = {20, 30, 0.55, 3, 28, NAN, 37.5, 196, 2};
    hc_penman_result r;
    assert_int_equal(hc_penman_open_water(&w, &r), HC_OK);
    assert_true(fabs(r.es_kpa - 3.29067) < 1e-5);
    assert_true(fabs(r.ea_kpa - 1.80987) < 1e-5);
    assert_true(fabs(r.delta_kpa_k - 0.188682) < 1e-6);
    assert_true(fabs(r.gamma_kpa_k - 0.0673488) < 1e-7);
    assert_true(fabs(r.rso_mj_m2 - 30.617) < 1e-3);
    assert_true(fabs(r.rn_mj_m2 - 20.5527) < 1e-4);
    assert_true(fabs(r.evaporation_mm_day - 8.8483) < 1e-4);
    /* Sunshine instead of radiation: FAO-56 eq. 35 with N. */
    hc_weather_day s = w;
    s.solar_mj_m2 = NAN;
    s.sunshine_h = 12;
    assert_int_equal(hc_penman_open_water(&s, &r), HC_OK);
    double ra, n;
    assert_int_equal(hc_extraterrestrial_radiation(37.5, 196, &ra, &n), HC_OK);
    assert_true(fabs(r.rs_mj_m2 - (0.25 + 0.5 * 12 / n) * ra) < 1e-9);
    /* Saturated air: the aerodynamic term vanishes, only radiation drives. */
    hc_weather_day d = {15, 15, 1.0, 4, 10, NAN, 37.5, 100, 0};
    assert_int_equal(hc_penman_open_water(&d, &r), HC_OK);
    assert_true(fabs(r.evaporation_mm_day * HC_PENMAN_LAMBDA_MJ_KG *
                         (r.delta_kpa_k + r.gamma_kpa_k) -
                     r.delta_kpa_k * r.rn_mj_m2) < 1e-12);
}

static void penman_refuses_what_it_cannot_use(void **unused)
{
    (void)unused;
    hc_penman_result r;
    hc_weather_day w = {20, 30, 0.55, 3, NAN, NAN, NAN, 0, 0};
    assert_int_equal(hc_penman_open_water(&w, &r), HC_ERR_ARGUMENT); /* no radiation */
    w.solar_mj_m2 = 20;
    w.relative_humidity = 1.5;
    assert_int_equal(hc_penman_open_water(&w, &r), HC_ERR_DOMAIN);
    w.relative_humidity = NAN;
    assert_int_equal(hc_penman_open_water(&w, &r), HC_ERR_NOT_FINITE);
    w.relative_humidity = 0.5;
    w.t_max_c = 10; /* below Tmin */
    assert_int_equal(hc_penman_open_water(&w, &r), HC_ERR_DOMAIN);
}

static void brine_scaling_and_fit(void **unused)
{
    (void)unused;
    /* Halite-saturated brine (a_w 0.75, DOMAIN of Salhotra et al. 1985) in
     * air at RH 0.55: f = (0.75 - 0.55) / 0.45. */
    double f;
    assert_int_equal(hc_evaporation_activity_factor(0.75, 0.55, &f), HC_OK);
    assert_true(fabs(f - 0.2 / 0.45) < 1e-12);
    /* Fit: achieved = 0.8 x estimate exactly gives k 0.8, no residual. */
    double e[5] = {5, 6, 7, 8, NAN}, a[5] = {4, 4.8, 5.6, 6.4, 3};
    double k, rms, r2;
    int used;
    assert_int_equal(hc_evaporation_fit(e, a, 5, &k, &rms, &r2, &used), HC_OK);
    assert_int_equal(used, 4);
    assert_true(fabs(k - 0.8) < 1e-12 && rms < 1e-12 && fabs(r2 - 1) < 1e-12);
    /* With scatter: k by hand = sum(a e) / sum(e e) = 175 / 174. */
    double a2[4] = {5, 5, 8, 8};
    assert_int_equal(hc_evaporation_fit(e, a2, 4, &k, &rms, &r2, &used), HC_OK);
    assert_true(fabs(k - 175.0 / 174.0) < 1e-12);
    assert_true(rms > 0.5 && r2 < 1); /* residuals -0.35, -1.03, 0.96, -0.05 */
    double z[2] = {0, 0};
    assert_int_equal(hc_evaporation_fit(z, a, 2, &k, &rms, &r2, &used), HC_ERR_DOMAIN);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(fao56_vapour_pressure_example_3),
        cmocka_unit_test(fao56_slope),
        cmocka_unit_test(fao56_psychrometric_example_2),
        cmocka_unit_test(fao56_radiation_examples_8_9_11),
        cmocka_unit_test(penman_open_water_by_hand),
        cmocka_unit_test(penman_refuses_what_it_cannot_use),
        cmocka_unit_test(brine_scaling_and_fit),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
