/* Feed water: reference seawater and site analyses. Sources beside checks. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hc_feed.h"

static void reference_seawater(void **unused)
{
    (void)unused;
    hc_feed f;
    assert_int_equal(hc_feed_seawater(35.0, &f), HC_OK);
    /* mol/kg water at S_P = 35 from Millero et al. (2008) [C] (DOMAIN sec. 4):
     * Na 0.4861, K 0.01058, Mg 0.05474, SO4 0.02926. Ca and Cl also carry the
     * lumped Sr and Br: 0.01066 + 0.00009 and 0.5658 + 0.0009 + balance. */
    assert_true(fabs(f.molality[HC_ION_NA] - 0.4861) < 2e-4);
    assert_true(fabs(f.molality[HC_ION_K] - 0.01058) < 2e-5);
    assert_true(fabs(f.molality[HC_ION_MG] - 0.05474) < 2e-5);
    assert_true(fabs(f.molality[HC_ION_SO4] - 0.02926) < 2e-5);
    assert_true(fabs(f.molality[HC_ION_CA] - 0.01075) < 2e-5);
    /* Water: 1 - 35.16504 g/kg (S_R, Millero et al. 2008) [S]. */
    assert_true(fabs(f.water_mass_fraction - (1.0 - 0.03516504)) < 1e-9);
    /* Carbonate kept: alkalinity about 2.3 meq/kg seawater (Millero et al.
     * 2008, Table 4: HCO3 0.10481, CO3 0.01434 g/kg at S_R 35.165) [S]; Cl only
     * balances the rounding and the brine is electroneutral. */
    assert_true(f.carbonate_alkalinity > 0.0022 && f.carbonate_alkalinity < 0.0025);
    assert_true(fabs(f.chloride_adjustment - f.imbalance_eq) < 1e-12);
    assert_true(fabs(hc_charge_balance(f.molality)) < 1e-12);
    assert_true(fabs(f.molality[HC_ION_HCO3] + 2.0 * f.molality[HC_ION_CO3] -
                     f.carbonate_alkalinity) < 1e-15);
    /* The reference composition balances to 0.03 % (rounding of the table). */
    assert_true(fabs(f.imbalance_percent) < 0.05);
    assert_true(f.practical_salinity == 35.0);
}

static void seawater_scales_with_salinity(void **unused)
{
    (void)unused;
    hc_feed a, b;
    assert_int_equal(hc_feed_seawater(35.0, &a), HC_OK);
    assert_int_equal(hc_feed_seawater(17.5, &b), HC_OK);
    /* Constant composition: half the salt per kg of solution, slightly less
     * than half per kg of water (definition, no source needed). */
    double r = b.molality[HC_ION_NA] / a.molality[HC_ION_NA];
    assert_true(r < 0.5 && r > 0.49);
    assert_int_equal(hc_feed_seawater(50.0, &b), HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_feed_seawater(NAN, &b), HC_ERR_NOT_FINITE);
}

static void site_analysis_g_per_kg(void **unused)
{
    (void)unused;
    /* An invented inland brine, deliberately 2 % short of chloride. */
    hc_feed_analysis an = {.unit = HC_FEED_G_PER_KG, .density_kg_m3 = NAN};
    an.conc[HC_ION_NA] = 20.0;
    an.conc[HC_ION_CL] = 0.98 * 20.0 * 35.453 / 22.98977;
    an.conc[HC_ION_MG] = 1.0;
    an.conc[HC_ION_SO4] = 96.056 / 24.305 * 1.0;
    hc_feed f;
    assert_int_equal(hc_feed_from_analysis("lagoon", &an, &f), HC_OK);
    assert_string_equal(f.name, "lagoon");
    assert_true(isnan(f.practical_salinity));
    /* The 2 % shortfall is reported and restored with Cl. */
    assert_true(f.imbalance_percent > 1.5 && f.imbalance_percent < 2.5);
    assert_true(f.chloride_adjustment > 0.0);
    assert_true(fabs(hc_charge_balance(f.molality)) < 1e-12);
}

static void site_analysis_mg_per_l(void **unused)
{
    (void)unused;
    /* The same seawater given in mg/L must give the same molalities as the
     * reference (mg/L = g/kg * rho; rho from the brine model). */
    hc_feed ref;
    assert_int_equal(hc_feed_seawater(35.0, &ref), HC_OK);
    const double gkg[HC_ION_COUNT] = {10.78145, 0.39910, 1.28372, 0.41208, 19.35271, 2.71235,
                                      0.10481, 0.01434};
    hc_feed_analysis an = {.unit = HC_FEED_MG_PER_L, .density_kg_m3 = 1024.76};
    for (int i = 0; i < HC_ION_COUNT; i++)
        an.conc[i] = gkg[i] * an.density_kg_m3;
    an.br = 0.06728 * an.density_kg_m3;
    an.sr = 0.00795 * an.density_kg_m3;
    hc_feed f;
    assert_int_equal(hc_feed_from_analysis("sea-mgl", &an, &f), HC_OK);
    /* Water differs only by the minor species not given (0.04 g/kg). */
    for (int i = 0; i < HC_ION_COUNT; i++)
        assert_true(fabs(f.molality[i] - ref.molality[i]) <= 1e-4 * ref.molality[i] + 1e-12);
    an.density_kg_m3 = NAN; /* computed from the composition instead */
    assert_int_equal(hc_feed_from_analysis("sea-mgl", &an, &f), HC_OK);
    assert_true(fabs(f.molality[HC_ION_NA] / ref.molality[HC_ION_NA] - 1.0) < 2e-3);
}

static void bad_analyses(void **unused)
{
    (void)unused;
    hc_feed f;
    hc_feed_analysis an = {.unit = HC_FEED_G_PER_KG};
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_ARGUMENT); /* nothing */
    an.conc[HC_ION_NA] = -1.0;
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_NEGATIVE);
    an.conc[HC_ION_NA] = NAN;
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_NOT_FINITE);
    /* Only anions: balancing needs negative chloride. */
    an.conc[HC_ION_NA] = 0.0;
    an.conc[HC_ION_SO4] = 10.0;
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_ARGUMENT);
    an.conc[HC_ION_NA] = 1.0;
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_DOMAIN);
    an.unit = (hc_feed_unit)7;
    assert_int_equal(hc_feed_from_analysis("x", &an, &f), HC_ERR_ARGUMENT);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(reference_seawater),
        cmocka_unit_test(seawater_scales_with_salinity),
        cmocka_unit_test(site_analysis_g_per_kg),
        cmocka_unit_test(site_analysis_mg_per_l),
        cmocka_unit_test(bad_analyses),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
