/* Water and salt balance: closes on a synthetic pond with known
 * evaporation, rain and transfers (worked by hand below); calibration drift;
 * evaporation scaled by water activity (Salhotra, Adams & Harleman 1985). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hc_balance.h"

/* The synthetic brine of these tests has salt concentration c = K (rho -
 * 998.2) kg/m3: invented, linear through fresh water, so the drift check's
 * secant slope is exact for it. */
#define K_SALT 1.5
static double w_of_rho(double rho)
{
    return K_SALT * (rho - 998.2) / rho;
}

/* Synthetic pond, 10 days, 100 m x 100 m with vertical walls (10000 m2):
 * - start: 0.600 m of brine at 1150 kg/m3;
 * - pump in: 5 h at 100 m3/h of brine at 1100 kg/m3, w = 0.14;
 * - flow meter out: 200 m3 of brine at 1150 kg/m3 (the pond's own);
 * - rain 12 mm; true evaporation 6.0 mm/day, i.e. 600 000 kg of water.
 * The end state follows by hand from these masses; the balance must give
 * 6.0 mm/day back and a zero salt residual. */
static void synthetic_pond(hc_balance_input *in, double *v_end, double *rho_end)
{
    const double area = 10000, days = 10;
    hc_brine_mass start, received, sent;
    double v_in;
    assert_int_equal(hc_pumped_volume(5 * 3600.0, 100, &v_in), HC_OK);
    assert_near(v_in, 500, 1e-12);
    assert_int_equal(hc_brine_mass_of(0.600 * area, 1150, w_of_rho(1150), &start), HC_OK);
    assert_int_equal(hc_brine_mass_of(v_in, 1100, 0.14, &received), HC_OK);
    assert_int_equal(hc_brine_mass_of(200, 1150, w_of_rho(1150), &sent), HC_OK);
    double rain_kg = 0.012 * area * 1000, evap_kg = 0.006 * days * area * 1000;
    double water_end = start.water_kg + received.water_kg + rain_kg - sent.water_kg - evap_kg;
    double salt_end = start.salt_kg + received.salt_kg - sent.salt_kg;
    /* End density: solve w(rho) = salt / (salt + water) for the synthetic
     * brine: K (rho - 998.2) / rho = w  ->  rho = 998.2 K / (K - w). */
    double w_end = salt_end / (salt_end + water_end);
    *rho_end = 998.2 * K_SALT / (K_SALT - w_end);
    *v_end = (salt_end + water_end) / *rho_end;
    in->duration_days = days;
    in->mean_area_m2 = area;
    in->start = start;
    in->received = received;
    in->sent = sent;
    in->rain_mm = 12;
    in->deposited_salt_kg = 0;
    assert_int_equal(hc_brine_mass_of(*v_end, *rho_end, w_of_rho(*rho_end), &in->end), HC_OK);
}

static void balance_closes(void **unused)
{
    (void)unused;
    hc_balance_input in;
    double v_end, rho_end;
    synthetic_pond(&in, &v_end, &rho_end);
    hc_balance_result r;
    assert_int_equal(hc_balance_close(&in, &r), HC_OK);
    assert_near(r.net_evaporation_mm_day, 6.0, 1e-9);
    assert_near(r.evaporated_kg, 600000, 1e-6);
    assert_near(r.salt_residual_kg, 0, 1e-6);
    double rho_pred;
    int drift = -1;
    assert_int_equal(hc_balance_density_check(&in, &r, v_end, rho_end, 2.0, &rho_pred, &drift),
                     HC_OK);
    assert_near(rho_pred, rho_end, 1e-9);
    assert_int_equal(drift, 0);
}

static void crystalliser_deposit_closes_salt(void **unused)
{
    (void)unused;
    /* Same pond, but 30 t of salt crystallised: the brine holds 30 t less
     * and the balance, told so, still closes. */
    hc_balance_input in;
    double v_end, rho_end;
    synthetic_pond(&in, &v_end, &rho_end);
    in.end.salt_kg -= 30000;
    in.deposited_salt_kg = 30000;
    hc_balance_result r;
    assert_int_equal(hc_balance_close(&in, &r), HC_OK);
    assert_near(r.salt_residual_kg, 0, 1e-6);
    assert_near(r.net_evaporation_mm_day, 6.0, 1e-9);
}

static void density_drift_is_flagged(void **unused)
{
    (void)unused;
    /* The densitometer reads 5 kg/m3 high at the end: the salt it implies
     * exceeds what the balance allows, and the predicted density is the
     * true one (exact for the synthetic linear brine). */
    hc_balance_input in;
    double v_end, rho_true;
    synthetic_pond(&in, &v_end, &rho_true);
    double rho_meas = rho_true + 5;
    assert_int_equal(hc_brine_mass_of(v_end, rho_meas, w_of_rho(rho_meas), &in.end), HC_OK);
    hc_balance_result r;
    assert_int_equal(hc_balance_close(&in, &r), HC_OK);
    assert_true(r.salt_residual_kg < 0);
    double rho_pred;
    int drift = 0;
    assert_int_equal(hc_balance_density_check(&in, &r, v_end, rho_meas, 2.0, &rho_pred, &drift),
                     HC_OK);
    assert_near(rho_pred, rho_true, 1e-6);
    assert_int_equal(drift, 1);
    /* A 10 kg/m3 tolerance accepts the same reading. */
    assert_int_equal(hc_balance_density_check(&in, &r, v_end, rho_meas, 10.0, &rho_pred, &drift),
                     HC_OK);
    assert_int_equal(drift, 0);
}

static void bad_inputs_are_errors(void **unused)
{
    (void)unused;
    hc_balance_input in;
    double v_end, rho_end;
    synthetic_pond(&in, &v_end, &rho_end);
    hc_balance_result r;
    hc_balance_input bad = in;
    bad.rain_mm = -1;
    assert_int_equal(hc_balance_close(&bad, &r), HC_ERR_NEGATIVE);
    bad = in;
    bad.duration_days = 0;
    assert_int_equal(hc_balance_close(&bad, &r), HC_ERR_ARGUMENT);
    bad = in;
    bad.received.water_kg = NAN;
    assert_int_equal(hc_balance_close(&bad, &r), HC_ERR_NOT_FINITE);
    bad = in;
    bad.mean_area_m2 = 0;
    assert_int_equal(hc_balance_close(&bad, &r), HC_ERR_ARGUMENT);
    hc_brine_mass m;
    assert_int_equal(hc_brine_mass_of(-1, 1100, 0.1, &m), HC_ERR_NEGATIVE);
    assert_int_equal(hc_brine_mass_of(1, 1100, 1.2, &m), HC_ERR_DOMAIN);
    double v;
    assert_int_equal(hc_pumped_volume(-5, 100, &v), HC_ERR_NEGATIVE);
    assert_int_equal(hc_pumped_volume(5, NAN, &v), HC_ERR_NOT_FINITE);
}

static void evaporation_slows_with_activity(void **unused)
{
    (void)unused;
    /* f = (a_w - RH) / (1 - RH) (Salhotra, Adams & Harleman 1985, Dalton
     * form at equal surface temperature); worked by hand. */
    double f;
    assert_int_equal(hc_evaporation_activity_factor(0.75, 0.0, &f), HC_OK);
    assert_near(f, 0.75, 1e-15);
    assert_int_equal(hc_evaporation_activity_factor(0.75, 0.5, &f), HC_OK);
    assert_near(f, 0.5, 1e-15);
    /* Brine drier than the air takes up water. */
    assert_int_equal(hc_evaporation_activity_factor(0.45, 0.6, &f), HC_OK);
    assert_true(f < 0);
    assert_int_equal(hc_evaporation_activity_factor(1.1, 0.5, &f), HC_ERR_DOMAIN);
    assert_int_equal(hc_evaporation_activity_factor(0.9, 1.0, &f), HC_ERR_DOMAIN);
    /* Seawater a_w 0.98 (Salhotra et al. 1985; from memory), pan 10 mm/day, pan coefficient 0.7
     * (Kohler, Nordenson & Fox 1955, from memory), RH 0.6: by hand
     * 10 * 0.7 * (0.38 / 0.4) = 6.65 mm/day. */
    double e;
    assert_int_equal(hc_evaporation_expected(10, 0.7, 0.98, 0.6, &e), HC_OK);
    assert_near(e, 6.65, 1e-12);
    /* Halite-point brine (a_w 0.75, HMW84 halite point [C]) under the same weather:
     * 10 * 0.7 * (0.15 / 0.4) = 2.625 mm/day. */
    assert_int_equal(hc_evaporation_expected(10, 0.7, 0.75, 0.6, &e), HC_OK);
    assert_near(e, 2.625, 1e-12);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(balance_closes),
        cmocka_unit_test(crystalliser_deposit_closes_salt),
        cmocka_unit_test(density_drift_is_flagged),
        cmocka_unit_test(bad_inputs_are_errors),
        cmocka_unit_test(evaporation_slows_with_activity),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
