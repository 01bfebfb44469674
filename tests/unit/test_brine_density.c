/* Brine density from composition (Laliberte 2009 mixture model, joined to
 * EOS-80). Sources beside each check. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hc_brine_density.h"
#include "hc_feed.h"

/* NaCl molality [mol/kg water] of a solution with mass fraction w. */
static void nacl_solution(double w, double m[HC_ION_COUNT])
{
    double mm = hc_ion_molar_mass(HC_ION_NA) + hc_ion_molar_mass(HC_ION_CL);
    for (int i = 0; i < HC_ION_COUNT; i++)
        m[i] = 0.0;
    m[HC_ION_NA] = m[HC_ION_CL] = 1000.0 * w / ((1.0 - w) * mm);
}

/* EOS-80 at one atmosphere (Millero & Poisson 1981; UNESCO 1981 Tech. Pap.
 * 36), written out here from DOMAIN sec. 2 as an independent reference. */
static double eos80(double s, double t)
{
    double rw = 999.842594 + 6.793952e-2 * t - 9.095290e-3 * t * t + 1.001685e-4 * pow(t, 3) -
                1.120083e-6 * pow(t, 4) + 6.536332e-9 * pow(t, 5);
    double a = 8.24493e-1 - 4.0899e-3 * t + 7.6438e-5 * t * t - 8.2467e-7 * pow(t, 3) +
               5.3875e-9 * pow(t, 4);
    double b = -5.72466e-3 + 1.0227e-4 * t - 1.6546e-6 * t * t;
    return rw + a * s + b * pow(s, 1.5) + 4.8314e-4 * s * s;
}

static void laliberte_own_check_values(void **unused)
{
    (void)unused;
    /* Laliberte & Cooper (2004): rho_w(25 degC) = 997.0448954 kg/m3;
     * NaCl at w = 0.0037838838 and 0 degC: 1002.6250120 kg/m3 [S]. */
    assert_true(fabs(hc_water_density_lc(25.0) - 997.0448954) < 1e-6);
    double m[HC_ION_COUNT], rho;
    nacl_solution(0.0037838838, m);
    assert_int_equal(hc_brine_density_mixture(m, 0.0, &rho), HC_OK);
    assert_true(fabs(rho - 1002.6250120) < 1e-5);
}

static void eos80_reference_is_right(void **unused)
{
    (void)unused;
    /* UNESCO 1981 check values [S]: (0,5) 999.96675, (0,25) 997.04796,
     * (35,5) 1027.67547, (35,25) 1023.34306. */
    assert_true(fabs(eos80(0, 5) - 999.96675) < 1e-4);
    assert_true(fabs(eos80(0, 25) - 997.04796) < 1e-4);
    assert_true(fabs(eos80(35, 5) - 1027.67547) < 1e-4);
    assert_true(fabs(eos80(35, 25) - 1023.34306) < 1e-4);
}

static void joins_eos80_in_seawater_range(void **unused)
{
    (void)unused;
    /* Requirement: within 0.5 kg/m3 of EOS-80 for S 35-42, 0-40 degC. */
    double worst = 0.0;
    for (double s = 35.0; s <= 42.0; s += 1.0) {
        hc_feed f;
        assert_int_equal(hc_feed_seawater(s, &f), HC_OK);
        for (double t = 0.0; t <= 40.0; t += 5.0) {
            double rho;
            assert_int_equal(hc_brine_density(f.molality, t, &rho), HC_OK);
            worst = fmax(worst, fabs(rho - eos80(s, t)));
        }
    }
    assert_true(worst < 0.5);
}

static void nacl_against_crc(void **unused)
{
    (void)unused;
    /* CRC Handbook, "Concentrative properties of aqueous solutions", NaCl
     * [S], g/cm3: 20 degC 5/10/15/20/26 % = 1.0340/1.0707/1.1085/1.1478/
     * 1.1972; 25 degC 10/20/26 % = 1.06879/1.14533/1.19443. */
    const double w20[] = {0.05, 0.10, 0.15, 0.20, 0.26};
    const double r20[] = {1034.0, 1070.7, 1108.5, 1147.8, 1197.2};
    const double w25[] = {0.10, 0.20, 0.26};
    const double r25[] = {1068.79, 1145.33, 1194.43};
    double m[HC_ION_COUNT], rho;
    for (int i = 0; i < 5; i++) {
        nacl_solution(w20[i], m);
        assert_int_equal(hc_brine_density(m, 20.0, &rho), HC_OK);
        assert_true(fabs(rho - r20[i]) < 1.0);
    }
    for (int i = 0; i < 3; i++) {
        nacl_solution(w25[i], m);
        assert_int_equal(hc_brine_density(m, 25.0, &rho), HC_OK);
        assert_true(fabs(rho - r25[i]) < 1.0);
    }
}

static void salt_split_rule(void **unused)
{
    (void)unused;
    /* The stated rule (hc_brine_density.h): SO4 to Mg, then Na, then K;
     * the rest of each cation with Cl. No source: a definition. */
    double m[HC_ION_COUNT] = {0.5, 0.01, 0.05, 0.01, 0.56, 0.03, 0, 0};
    double s[HC_SALT_COUNT];
    assert_int_equal(hc_brine_salts(m, s), HC_OK);
    assert_true(fabs(s[HC_SALT_MGSO4] - 0.03) < 1e-12);
    assert_true(fabs(s[HC_SALT_MGCL2] - 0.02) < 1e-12);
    assert_true(fabs(s[HC_SALT_NACL] - 0.5) < 1e-12);
    assert_true(s[HC_SALT_NA2SO4] == 0.0 && s[HC_SALT_K2SO4] == 0.0);
    assert_true(fabs(s[HC_SALT_CACL2] - 0.01) < 1e-12 && fabs(s[HC_SALT_KCL] - 0.01) < 1e-12);
}

/* Carbonate pairs with sodium before chloride takes what is left; a
 * cation without any anion still counts as its chloride. A definition. */
static void carbonate_split_rule(void **unused)
{
    (void)unused;
    double m[HC_ION_COUNT] = {[HC_ION_NA] = 1.2, [HC_ION_CL] = 0.1, [HC_ION_CO3] = 0.5,
                              [HC_ION_HCO3] = 0.1};
    double s[HC_SALT_COUNT];
    assert_int_equal(hc_brine_salts(m, s), HC_OK);
    assert_true(fabs(s[HC_SALT_NA2CO3] - 0.5) < 1e-12);
    assert_true(fabs(s[HC_SALT_NAHCO3] - 0.1) < 1e-12);
    assert_true(fabs(s[HC_SALT_NACL] - 0.1) < 1e-12);
    /* 0.5 mol/kg Na2CO3 is about 1049 kg/m3 at 25 degC (CRC Handbook,
     * concentrative properties, 5 % at 20 degC 1.0502 g/cm3; from memory),
     * not 1 m NaCl's 1036.4 */
    double na2co3[HC_ION_COUNT] = {[HC_ION_NA] = 1.0, [HC_ION_CO3] = 0.5};
    double nacl[HC_ION_COUNT] = {[HC_ION_NA] = 1.0, [HC_ION_CL] = 1.0};
    double r1, r2;
    assert_int_equal(hc_brine_density(na2co3, 25.0, &r1), HC_OK);
    assert_int_equal(hc_brine_density(nacl, 25.0, &r2), HC_OK);
    assert_true(fabs(r1 - 1049.0) < 8.0);
    assert_true(r1 > r2 + 5.0);
}

static void bad_input(void **unused)
{
    (void)unused;
    double m[HC_ION_COUNT] = {1, 0, 0, 0, 1, 0, 0, 0}, rho;
    assert_int_equal(hc_brine_density(m, NAN, &rho), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_brine_density(m, 120.0, &rho), HC_ERR_TEMPERATURE_RANGE);
    m[HC_ION_MG] = -1.0;
    assert_int_equal(hc_brine_density(m, 20.0, &rho), HC_ERR_NEGATIVE);
    m[HC_ION_MG] = 0.0;
    m[HC_ION_NA] = m[HC_ION_CL] = 40.0;
    assert_int_equal(hc_brine_density(m, 20.0, &rho), HC_ERR_SALINITY_RANGE);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(laliberte_own_check_values),
        cmocka_unit_test(eos80_reference_is_right),
        cmocka_unit_test(joins_eos80_in_seawater_range),
        cmocka_unit_test(nacl_against_crc),
        cmocka_unit_test(salt_split_rule),
        cmocka_unit_test(carbonate_split_rule),
        cmocka_unit_test(bad_input),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
