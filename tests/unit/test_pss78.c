/* PSS-78 practical salinity: published check values, inverse, Hill
 * extension, and every error path. Sources beside each check. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "calc_assert.h"
#include "hc_pss78.h"
#include "hc_state.h"

/* IPTS-68 -> ITS-90 for published tables given on IPTS-68 (t68 = 1.00024 t90). */
static double t90(double t68)
{
    return t68 / 1.00024;
}

static void unesco44_check_values(void **unused)
{
    (void)unused;
    /* Fofonoff & Millard (1983) UNESCO Tech. Pap. Mar. Sci. 44, p. 9 check
     * values (R, t68, p) -> S; temperatures are IPTS-68. */
    static const struct { double r, t68, p, s, tol; } cv[] = {
        {1.0, 15.0, 0.0, 35.000000, 1e-6},
        {1.2, 20.0, 2000.0, 37.245628, 1e-6},
        {0.65, 5.0, 1500.0, 27.995347, 1e-6},
        {1.888091, 40.0, 10000.0, 40.0000, 1e-4}, /* published to 4 decimals */
    };
    for (size_t i = 0; i < sizeof cv / sizeof cv[0]; i++) {
        double s = -1.0;
        unsigned w = 0;
        assert_int_equal(hc_pss78_sp_from_c(cv[i].r * HC_PSS78_C35_MS_CM, t90(cv[i].t68), cv[i].p,
                                            &s, &w), HC_OK);
        assert_near(s, cv[i].s, cv[i].tol);
        assert_int_equal(w, 0);
    }
}

static void its90_shift_at_standard_seawater(void **unused)
{
    (void)unused;
    /* TEOS-10 gsw 3.6 SP_from_C(42.914, 15 (ITS-90), 0) = 34.99677011 [C];
     * the 0.0032 below 35 is only the ITS-90/IPTS-68 shift. */
    double s;
    assert_int_equal(hc_pss78_sp_from_c(42.914, 15.0, 0.0, &s, NULL), HC_OK);
    assert_near(s, 34.996770111355, 1e-9);
    assert_true(fabs(s - 35.0) < 0.004);
}

static void inverse_round_trips(void **unused)
{
    (void)unused;
    /* Self-consistency (no external source): C(S) then S(C) returns S. */
    static const double sps[] = {0.0, 1e-3, 0.05, 0.5, 1.0, 1.999, 2.0, 2.001,
                                 5.0, 20.0, 35.0, 41.9, 42.0};
    static const double ts[] = {-2.0, 0.0, 15.0, 30.0, 45.0};
    static const double ps[] = {0.0, 100.0, 2000.0, 10000.0};
    for (size_t i = 0; i < sizeof sps / sizeof sps[0]; i++)
        for (size_t j = 0; j < sizeof ts / sizeof ts[0]; j++)
            for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
                double c = -1.0, s = -1.0;
                assert_int_equal(hc_pss78_c_from_sp(sps[i], ts[j], ps[k], &c), HC_OK);
                assert_true(c >= 0.0);
                assert_int_equal(hc_pss78_sp_from_c(c, ts[j], ps[k], &s, NULL), HC_OK);
                assert_near(s, sps[i], 1e-10);
            }
    /* gsw 3.6 C_from_SP(35, 15, 0) = 42.917539851672 [C] */
    double c;
    assert_int_equal(hc_pss78_c_from_sp(35.0, 15.0, 0.0, &c), HC_OK);
    assert_near(c, 42.917539851672, 1e-9);
}

static void hill_extension_below_two(void **unused)
{
    (void)unused;
    /* gsw 3.6 SP_from_C(0.5, 10, 0) = 0.343686208335 [C] (Hill et al. 1986
     * with the TEOS-10 join at S = 2). */
    double s;
    unsigned w = HC_WARN_BELOW_FEED; /* other bits must survive */
    assert_int_equal(hc_pss78_sp_from_c(0.5, 10.0, 0.0, &s, &w), HC_OK);
    assert_near(s, 0.343686208335, 1e-9);
    assert_int_equal(w, HC_WARN_HILL_EXTENSION | HC_WARN_BELOW_FEED);

    /* Zero conductivity is zero salinity. */
    assert_int_equal(hc_pss78_sp_from_c(0.0, 20.0, 0.0, &s, NULL), HC_OK);
    assert_near(s, 0.0, 1e-12);

    /* Continuity at the join (IOC et al. 2010, app. E.3: the scaled Hill
     * extension meets PSS-78 at S = 2): 1e-9 mS/cm either side differ by
     * much less than 1e-6. */
    for (double t = -2.0; t <= 45.0; t += 7.0) {
        double c2, lo, hi;
        unsigned wlo = 0, whi = 0;
        assert_int_equal(hc_pss78_c_from_sp(2.0, t, 0.0, &c2), HC_OK);
        assert_int_equal(hc_pss78_sp_from_c(c2 - 1e-9, t, 0.0, &lo, &wlo), HC_OK);
        assert_int_equal(hc_pss78_sp_from_c(c2 + 1e-9, t, 0.0, &hi, &whi), HC_OK);
        assert_true(wlo & HC_WARN_HILL_EXTENSION);
        assert_false(whi & HC_WARN_HILL_EXTENSION);
        assert_near(lo, 2.0, 1e-8);
        assert_near(hi, 2.0, 1e-8);
    }
}

static void salinity_rises_with_conductivity(void **unused)
{
    (void)unused;
    /* PSS-78 is monotone in R over its range (UNESCO 44 definition). */
    double prev = -1.0;
    for (double c = 0.0; c <= 60.0; c += 0.25) {
        double s;
        assert_int_equal(hc_pss78_sp_from_c(c, 25.0, 0.0, &s, NULL), HC_OK);
        assert_true(s > prev);
        prev = s;
    }
}

static void forward_errors(void **unused)
{
    (void)unused;
    double s = 123.0;
    unsigned w = 0;
    assert_int_equal(hc_pss78_sp_from_c(NAN, 15, 0, &s, &w), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_sp_from_c(INFINITY, 15, 0, &s, &w), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_sp_from_c(40, NAN, 0, &s, &w), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_sp_from_c(40, 15, NAN, &s, &w), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_sp_from_c(-0.1, 15, 0, &s, &w), HC_ERR_NEGATIVE);
    assert_int_equal(hc_pss78_sp_from_c(40, -2.01, 0, &s, &w), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_pss78_sp_from_c(40, 45.01, 0, &s, &w), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_pss78_sp_from_c(40, 15, -0.01, &s, &w), HC_ERR_PRESSURE_RANGE);
    assert_int_equal(hc_pss78_sp_from_c(40, 15, 10000.01, &s, &w), HC_ERR_PRESSURE_RANGE);
    /* 70 mS/cm at 25 degC is S ~ 49: beyond PSS-78, refused, never
     * extrapolated (gsw would extrapolate). */
    assert_int_equal(hc_pss78_sp_from_c(70, 25, 0, &s, &w), HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_pss78_sp_from_c(200, 25, 0, &s, &w), HC_ERR_SALINITY_RANGE);
    /* outputs untouched on failure */
    assert_true(s == 123.0);
    assert_int_equal(w, 0);
}

static void inverse_errors(void **unused)
{
    (void)unused;
    double c = 7.0;
    assert_int_equal(hc_pss78_c_from_sp(NAN, 15, 0, &c), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_c_from_sp(35, INFINITY, 0, &c), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_pss78_c_from_sp(-1e-9, 15, 0, &c), HC_ERR_NEGATIVE);
    assert_int_equal(hc_pss78_c_from_sp(42.0001, 15, 0, &c), HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_pss78_c_from_sp(35, -3, 0, &c), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_pss78_c_from_sp(35, 46, 0, &c), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_pss78_c_from_sp(35, 15, -1, &c), HC_ERR_PRESSURE_RANGE);
    assert_int_equal(hc_pss78_c_from_sp(35, 15, 10001, &c), HC_ERR_PRESSURE_RANGE);
    assert_true(c == 7.0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(unesco44_check_values),
        cmocka_unit_test(its90_shift_at_standard_seawater),
        cmocka_unit_test(inverse_round_trips),
        cmocka_unit_test(hill_extension_below_two),
        cmocka_unit_test(salinity_rises_with_conductivity),
        cmocka_unit_test(forward_errors),
        cmocka_unit_test(inverse_errors),
    };
    return cmocka_run_group_tests_name("pss78", tests, NULL, NULL);
}
