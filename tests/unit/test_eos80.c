/* EOS-80 density: published check values (one atmosphere and with
 * pressure), pure water, the inverse in salinity, and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "calc_assert.h"
#include "hc_eos80.h"

static double t90(double t68)
{
    return t68 / 1.00024; /* published tables are on IPTS-68 */
}

static void unesco44_check_values(void **unused)
{
    (void)unused;
    /* Fofonoff & Millard (1983) UNESCO Tech. Pap. Mar. Sci. 44, p. 19 check
     * values for EOS-80 (S, t68, p in bar -> rho); we take dbar, so 1000 bar
     * is 10000 dbar. Published to 5 decimals. */
    static const struct { double s, t68, p_bar, rho; } cv[] = {
        {0.0, 5.0, 0.0, 999.96675},
        {0.0, 25.0, 0.0, 997.04796},
        {35.0, 5.0, 0.0, 1027.67547},
        {35.0, 25.0, 0.0, 1023.34306},
        {35.0, 25.0, 1000.0, 1062.53817},
    };
    for (size_t i = 0; i < sizeof cv / sizeof cv[0]; i++) {
        double rho = 0.0;
        assert_int_equal(hc_eos80_rho(cv[i].s, t90(cv[i].t68), cv[i].p_bar * 10.0, &rho), HC_OK);
        assert_near(rho, cv[i].rho, 6e-6);
    }
}

static void pure_water(void **unused)
{
    (void)unused;
    /* SMOW, Bigg (1967): rho_w(25 degC IPTS-68) = 997.04796 (UNESCO 44 check
     * value above). At 60 degF (15.556 degC) TEOS-10 gsw 3.6
     * rho_t_exact(0, 15.5556, 0) = 999.01707 [C]; SMOW and the IAPWS pure
     * water of TEOS-10 differ by about 0.002 kg/m3 there, so allow 0.0025.
     * (a quoted 999.014 comes from an unnamed model; SMOW gives
     * 999.0154.) */
    assert_near(hc_eos80_rho_water(t90(25.0)), 997.04796, 6e-6);
    assert_near(hc_eos80_rho_water((60.0 - 32.0) * 5.0 / 9.0), 999.01707, 0.0025);
    /* Maximum density of pure water near 3.98 degC (Bigg 1967; Kell 1975 gives
     * 3.98): the value there beats both neighbours 1 degC away. */
    double top = hc_eos80_rho_water(3.98);
    assert_true(top > hc_eos80_rho_water(2.98) && top > hc_eos80_rho_water(4.98));
    assert_true(isnan(hc_eos80_rho_water(NAN)));
    assert_true(isnan(hc_eos80_rho_water(-2.5)));
    assert_true(isnan(hc_eos80_rho_water(45.5)));
}

static void inverse_round_trips(void **unused)
{
    (void)unused;
    /* Self-consistency: S(rho(S)) = S across the range. */
    static const double ss[] = {0.0, 0.01, 1.0, 10.0, 25.0, 35.0, 40.0, 42.0};
    static const double ts[] = {-2.0, 0.0, 10.0, 25.0, 40.0, 45.0};
    static const double ps[] = {0.0, 50.0, 5000.0, 10000.0};
    for (size_t i = 0; i < sizeof ss / sizeof ss[0]; i++)
        for (size_t j = 0; j < sizeof ts / sizeof ts[0]; j++)
            for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
                double rho, s = -1.0;
                assert_int_equal(hc_eos80_rho(ss[i], ts[j], ps[k], &rho), HC_OK);
                assert_int_equal(hc_eos80_sp_from_rho(rho, ts[j], ps[k], &s), HC_OK);
                assert_near(s, ss[i], 1e-8);
            }
}

static void density_rises_with_salinity_and_pressure(void **unused)
{
    (void)unused;
    /* Physical sense (Millero & Poisson 1981): drho/dS > 0, drho/dp > 0. */
    double a, b, c;
    assert_int_equal(hc_eos80_rho(30.0, 20.0, 0.0, &a), HC_OK);
    assert_int_equal(hc_eos80_rho(31.0, 20.0, 0.0, &b), HC_OK);
    assert_int_equal(hc_eos80_rho(30.0, 20.0, 100.0, &c), HC_OK);
    assert_true(b > a);
    assert_true(c > a);
    /* About 0.76 kg/m3 per unit of S at 20 degC (UNESCO 36 tables), and
     * about 0.044 kg/m3 per dbar near the surface (same). */
    assert_near(b - a, 0.76, 0.03);
    assert_near((c - a) / 100.0, 0.0044, 0.0003);
}

static void extrapolation_flag(void **unused)
{
    (void)unused;
    assert_false(hc_eos80_t_extrapolated(40.0));
    assert_true(hc_eos80_t_extrapolated(40.5));
    assert_true(hc_eos80_t_extrapolated(45.0));
    assert_false(hc_eos80_t_extrapolated(45.5));
    assert_false(hc_eos80_t_extrapolated(-1.0));
}

static void errors(void **unused)
{
    (void)unused;
    double r = 5.0, s = 6.0;
    assert_int_equal(hc_eos80_rho(NAN, 10, 0, &r), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_eos80_rho(35, NAN, 0, &r), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_eos80_rho(35, 10, INFINITY, &r), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_eos80_rho(-0.1, 10, 0, &r), HC_ERR_NEGATIVE);
    assert_int_equal(hc_eos80_rho(42.1, 10, 0, &r), HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_eos80_rho(35, -2.1, 0, &r), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_eos80_rho(35, 45.1, 0, &r), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_eos80_rho(35, 10, -1, &r), HC_ERR_PRESSURE_RANGE);
    assert_int_equal(hc_eos80_rho(35, 10, 10000.1, &r), HC_ERR_PRESSURE_RANGE);
    assert_true(r == 5.0);

    assert_int_equal(hc_eos80_sp_from_rho(NAN, 10, 0, &s), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_eos80_sp_from_rho(1025, 60, 0, &s), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_eos80_sp_from_rho(1025, 10, 20000, &s), HC_ERR_PRESSURE_RANGE);
    /* below pure water: no seawater has it */
    assert_int_equal(hc_eos80_sp_from_rho(990.0, 10, 0, &s), HC_ERR_DOMAIN);
    /* a brine at the halite point, SG ~1.21 (Baseggio 1974): beyond EOS-80 */
    assert_int_equal(hc_eos80_sp_from_rho(1210.0, 25, 0, &s), HC_ERR_SALINITY_RANGE);
    assert_true(s == 6.0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(unesco44_check_values),
        cmocka_unit_test(pure_water),
        cmocka_unit_test(inverse_round_trips),
        cmocka_unit_test(density_rises_with_salinity_and_pressure),
        cmocka_unit_test(extrapolation_flag),
        cmocka_unit_test(errors),
    };
    return cmocka_run_group_tests_name("eos80", tests, NULL, NULL);
}
