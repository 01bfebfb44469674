/* The carbonate system at fixed pCO2 and CaCO3 along the evaporation path.
 * Sources beside every check: [S] published, [C] computed with this model,
 * [M] from memory. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <string.h>
#include <cmocka.h>

#include "hc_carbonate.h"
#include "hc_equilibrium.h"
#include "hc_feed.h"
#include "hc_minerals.h"
#include "hc_path.h"

#define LN10 2.302585092994046

static const hc_path_onset *onset_of(const hc_path *p, hc_mineral m, hc_path_onset *store)
{
    hc_path_onset list[HC_MINERAL_COUNT];
    size_t n = hc_path_onsets(p, list, HC_MINERAL_COUNT);
    for (size_t i = 0; i < n; i++)
        if (list[i].mineral == m) {
            *store = list[i];
            return store;
        }
    return NULL;
}

static void constants_with_temperature(void **unused)
{
    (void)unused;
    hc_carbonate_params c0, c25;
    assert_int_equal(hc_carbonate_params_at(0.0, 0.0 - 1e-12, &c0), HC_OK);
    assert_int_equal(hc_carbonate_params_at(25.0, -1e-12, &c25), HC_OK);
    /* CO2 solubility, log KH: -1.11 at 0 degC, -1.47 at 25 degC (Plummer &
     * Busenberg 1982, Table 2; Weiss 1974) [M]. */
    assert_true(fabs(c0.ln_kh_pco2 / LN10 - (-1.11)) < 0.02);
    assert_true(fabs(c25.ln_kh_pco2 / LN10 - (-1.47)) < 0.01);
    /* Carbonic acid: pK1 6.58 and pK2 10.63 at 0 degC (Harned & Davis 1943;
     * Harned & Scholes 1941) [M]. */
    assert_true(fabs(c0.ln_k1 / LN10 - (-6.58)) < 0.02);
    assert_true(fabs(c0.ln_k2 / LN10 - (-10.63)) < 0.02);
    /* Retrograde solubility: calcite log K -8.38 at 0 and -8.48 at 25 degC,
     * aragonite -8.22 and -8.34 (Plummer & Busenberg 1982) [M]. HMW84's
     * 25 degC values differ (-8.406 calcite), so check the change: +0.10
     * and +0.12 from 25 to 0 degC, within 0.02. */
    double lk0, lk25;
    assert_int_equal(hc_mineral_log_k(HC_MIN_CALCITE, 0.0, &lk0), HC_OK);
    assert_int_equal(hc_mineral_log_k(HC_MIN_CALCITE, 25.0, &lk25), HC_OK);
    assert_true(fabs(lk0 - lk25 - 0.10) < 0.02);
    assert_int_equal(hc_mineral_log_k(HC_MIN_ARAGONITE, 0.0, &lk0), HC_OK);
    assert_int_equal(hc_mineral_log_k(HC_MIN_ARAGONITE, 25.0, &lk25), HC_OK);
    assert_true(fabs(lk0 - lk25 - 0.12) < 0.02);
    /* Bad input. */
    assert_int_equal(hc_carbonate_params_at(25.0, 0.5, &c0), HC_ERR_ARGUMENT);
    assert_int_equal(hc_carbonate_params_at(25.0, NAN, &c0), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_carbonate_params_at(95.0, -3.4, &c0), HC_ERR_TEMPERATURE_RANGE);
}

static void seawater_at_air(void **unused)
{
    (void)unused;
    hc_feed f;
    hc_pitzer_params p;
    hc_carbonate_params c;
    hc_mineral_set set;
    assert_int_equal(hc_feed_seawater(35.0, &f), HC_OK);
    assert_int_equal(hc_pitzer_params_at(25.0, &p), HC_OK);
    assert_int_equal(hc_carbonate_params_at(25.0, HC_LOG_PCO2_AIR, &c), HC_OK);
    assert_int_equal(hc_mineral_set_at(25.0, HC_MINERALS_CALCITE, &set), HC_OK);
    double fr[HC_ION_COUNT], si[HC_MINERAL_COUNT];
    hc_pitzer_result r;
    hc_carbonate_result cr;
    assert_int_equal(hc_carbonate_speciate(&p, &c, f.molality, fr, &r, &cr), HC_OK);
    /* Surface seawater at about 400 uatm: pH 8.05-8.1 on the total scale,
     * about 0.1 higher on the activity (NBS) scale this model uses
     * (Zeebe & Wolf-Gladrow 2001, ch. 1; Millero 2013) [M]: accept 8.1-8.3. */
    assert_true(cr.ph > 8.1 && cr.ph < 8.3);
    /* DIC about 2.0-2.1 mmol/kg and carbonate ion (free + paired) about
     * 0.18-0.26 mmol/kg at alkalinity 2.3 meq/kg (same sources) [M]. */
    assert_true(cr.dic > 1.95e-3 && cr.dic < 2.15e-3);
    double co3 = fr[HC_ION_CO3] + cr.caco3_pair + cr.mgco3_pair;
    assert_true(co3 > 0.18e-3 && co3 < 0.26e-3);
    /* Alkalinity is conserved by the speciation (definition). */
    double alk = fr[HC_ION_HCO3] + 2.0 * co3;
    assert_true(fabs(alk - cr.alkalinity) < 1e-15);
    assert_true(fabs(alk - f.carbonate_alkalinity) < 1e-15);
    assert_true(fabs(fr[HC_ION_CA] + cr.caco3_pair - f.molality[HC_ION_CA]) < 1e-17);
    /* Surface ocean Omega(aragonite) 3-4, Omega(calcite) about 1.5 times
     * that (Feely et al. 2004, Science 305, 362) [M]: SI 0.45-0.65 and
     * 0.6-0.8. */
    assert_int_equal(hc_saturation_indices(&set, fr, &r, si), HC_OK);
    assert_true(si[HC_MIN_ARAGONITE] > 0.4 && si[HC_MIN_ARAGONITE] < 0.65);
    assert_true(si[HC_MIN_CALCITE] > 0.6 && si[HC_MIN_CALCITE] < 0.85);
    /* More CO2, lower pH: about -1 pH unit per 10x pCO2 at fixed
     * alkalinity when HCO3 dominates (pH = pK1 + log(A / [CO2])) [S, algebra]. */
    hc_carbonate_params c2;
    hc_carbonate_result cr2;
    assert_int_equal(hc_carbonate_params_at(25.0, HC_LOG_PCO2_AIR + 1.0, &c2), HC_OK);
    assert_int_equal(hc_carbonate_speciate(&p, &c2, f.molality, fr, &r, &cr2), HC_OK);
    assert_true(cr.ph - cr2.ph > 0.85 && cr.ph - cr2.ph < 1.0);
}

/* SI of calcite in water with Ca [mol/kg] as Ca(HCO3)2 at pCO2 10^-3.5. */
static double calcite_si(double ca)
{
    hc_pitzer_params p;
    hc_carbonate_params c;
    hc_mineral_set set;
    hc_pitzer_params_at(25.0, &p);
    hc_carbonate_params_at(25.0, -3.5, &c);
    hc_mineral_set_at(25.0, HC_MINERALS_CALCITE, &set);
    double t[HC_ION_COUNT] = {0}, fr[HC_ION_COUNT], si[HC_MINERAL_COUNT];
    t[HC_ION_CA] = ca;
    t[HC_ION_HCO3] = 2.0 * ca;
    hc_pitzer_result r;
    if (hc_carbonate_speciate(&p, &c, t, fr, &r, NULL) != HC_OK)
        return NAN;
    hc_saturation_indices(&set, fr, &r, si);
    return si[HC_MIN_CALCITE];
}

static void calcite_in_pure_water(void **unused)
{
    (void)unused;
    /* Calcite solubility in water at 25 degC and pCO2 10^-3.5 atm: about
     * 0.5 mmol/kg Ca, pH 8.3 (Plummer & Busenberg 1982; Langmuir 1997,
     * Aqueous Environmental Geochemistry, ch. 6) [M]. Bisect SI = 0. */
    double lo = 1e-4, hi = 2e-3;
    for (int i = 0; i < 60; i++) {
        double mid = 0.5 * (lo + hi);
        if (calcite_si(mid) < 0.0)
            lo = mid;
        else
            hi = mid;
    }
    assert_true(lo > 0.45e-3 && lo < 0.56e-3);
    hc_pitzer_params p;
    hc_carbonate_params c;
    hc_carbonate_params_at(25.0, -3.5, &c);
    hc_pitzer_params_at(25.0, &p);
    double t[HC_ION_COUNT] = {0}, fr[HC_ION_COUNT];
    t[HC_ION_CA] = lo;
    t[HC_ION_CO3] = lo; /* the split given does not matter: only A counts */
    hc_pitzer_result r;
    hc_carbonate_result cr;
    assert_int_equal(hc_carbonate_speciate(&p, &c, t, fr, &r, &cr), HC_OK);
    assert_true(cr.ph > 8.2 && cr.ph < 8.4);
}

static void speciation_bad_input(void **unused)
{
    (void)unused;
    hc_pitzer_params p;
    hc_carbonate_params c;
    hc_pitzer_params_at(25.0, &p);
    hc_carbonate_params_at(25.0, HC_LOG_PCO2_AIR, &c);
    double t[HC_ION_COUNT] = {0}, fr[HC_ION_COUNT];
    hc_pitzer_result r;
    hc_carbonate_result cr;
    t[HC_ION_NA] = t[HC_ION_CL] = 1.0;
    /* No alkalinity: nothing to speciate, pH unknown. */
    assert_int_equal(hc_carbonate_speciate(&p, &c, t, fr, &r, &cr), HC_OK);
    assert_true(isnan(cr.ph));
    assert_true(fr[HC_ION_NA] == 1.0 && fr[HC_ION_HCO3] == 0.0);
    t[HC_ION_HCO3] = -1e-3;
    assert_int_equal(hc_carbonate_speciate(&p, &c, t, fr, &r, &cr), HC_ERR_NEGATIVE);
    t[HC_ION_HCO3] = NAN;
    assert_int_equal(hc_carbonate_speciate(&p, &c, t, fr, &r, &cr), HC_ERR_NOT_FINITE);
    /* A soda brine (alkalinity far above calcium) still speciates. */
    t[HC_ION_HCO3] = 0.5;
    t[HC_ION_NA] = 1.5;
    assert_int_equal(hc_carbonate_speciate(&p, &c, t, fr, &r, &cr), HC_OK);
    assert_true(cr.ph > 8.5 && cr.ph < 11.0); /* soda lakes pH 9-10.5 [M] */
}

static void path_carbonate_stage(void **unused)
{
    (void)unused;
    hc_feed f;
    assert_int_equal(hc_feed_seawater(35.0, &f), HC_OK);
    hc_path *with = NULL, *without = NULL, *calcite = NULL;
    hc_path_options none = {.mineral_flags = HC_MINERALS_NO_CARBONATE};
    hc_path_options cal = {.mineral_flags = HC_MINERALS_CALCITE};
    assert_int_equal(hc_path_build(&f, 25.0, HC_PATH_FRACTIONAL, &with), HC_OK);
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &none, &without), HC_OK);
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &cal, &calcite), HC_OK);
    hc_path_onset a, b;
    /* Aragonite near CF 1.5-2 in field brines (DOMAIN sec. 7) [S]. */
    assert_non_null(onset_of(with, HC_MIN_ARAGONITE, &a));
    assert_true(a.concentration_factor > 1.5 && a.concentration_factor < 2.0);
    assert_true(fabs(hc_path_stage_cf(with, HC_STAGE_CARBONATE) - a.concentration_factor) < 1e-9);
    assert_null(onset_of(with, HC_MIN_CALCITE, &b));
    /* Halite barely moves (aragonite takes no Na or Cl): within 1 % [C];
     * gypsum moves later as aragonite takes about 9 % of the calcium:
     * 6 % here [C], toward the observed CF 3.8-4 (McCaffrey et al. 1987) [M]. */
    assert_non_null(onset_of(with, HC_MIN_HALITE, &a));
    assert_non_null(onset_of(without, HC_MIN_HALITE, &b));
    assert_true(fabs(a.concentration_factor / b.concentration_factor - 1.0) < 0.01);
    assert_non_null(onset_of(with, HC_MIN_GYPSUM, &a));
    assert_non_null(onset_of(without, HC_MIN_GYPSUM, &b));
    assert_true(a.concentration_factor > b.concentration_factor &&
                a.concentration_factor < 1.07 * b.concentration_factor);
    /* Amount: about 0.1 g CaCO3 per kg of seawater; Usiglio (1849) found
     * 0.117 g with Fe2O3 per litre [M]. Accept 0.07-0.12 g. */
    double g = hc_path_max_precipitated(with, HC_MIN_ARAGONITE) * 100.087;
    assert_true(g > 0.07 && g < 0.12);
    /* Alkalinity: what the brine holds plus 2 eq per mol of CaCO3 laid
     * down is the feed's, at every step (mass balance). */
    double feed_alk = f.carbonate_alkalinity; /* eq per kg feed water */
    for (size_t i = 0; i < hc_path_step_count(with); i++) {
        const hc_path_point *q = hc_path_step(with, i);
        double held = q->alkalinity / q->concentration_factor;
        double laid = 2.0 * q->precipitated[HC_MIN_ARAGONITE] / f.water_mass_fraction;
        assert_true(fabs(held + laid - feed_alk) < 1e-9 * feed_alk + 1e-15);
    }
    /* The feed point: seawater at the air's pCO2, pH 8.1-8.3 (as above) [M];
     * without carbonate there is no pH. */
    assert_true(hc_path_step(with, 0)->ph > 8.1 && hc_path_step(with, 0)->ph < 8.3);
    assert_true(isnan(hc_path_step(without, 0)->ph));
    /* Lookups between steps carry pH and alkalinity (between the two
     * neighbouring steps' values: linear interpolation). */
    hc_path_point q;
    assert_int_equal(hc_path_point_at_cf(with, 1.3, &q, NULL), HC_OK);
    size_t k = 1;
    while (hc_path_step(with, k)->concentration_factor < 1.3)
        k++;
    const hc_path_point *lo = hc_path_step(with, k - 1), *hi = hc_path_step(with, k);
    assert_true(q.ph >= fmin(lo->ph, hi->ph) && q.ph <= fmax(lo->ph, hi->ph));
    assert_true(q.alkalinity >= fmin(lo->alkalinity, hi->alkalinity) &&
                q.alkalinity <= fmax(lo->alkalinity, hi->alkalinity));
    assert_int_equal(hc_path_point_at_cf(without, 1.3, &q, NULL), HC_OK);
    assert_true(isnan(q.ph) && q.alkalinity == 0.0);
    assert_true(isnan(hc_path_stage_cf(without, HC_STAGE_CARBONATE)));
    /* Calcite when asked for; never aragonite then. Calcite's lower
     * solubility (log K 0.19 lower, HMW84/DOMAIN sec. 5) lays down at
     * least as much. */
    assert_non_null(onset_of(calcite, HC_MIN_CALCITE, &a));
    assert_null(onset_of(calcite, HC_MIN_ARAGONITE, &b));
    assert_true(hc_path_max_precipitated(calcite, HC_MIN_CALCITE) >=
                hc_path_max_precipitated(with, HC_MIN_ARAGONITE));
    hc_path_free(with);
    hc_path_free(without);
    hc_path_free(calcite);
}

static void path_options_checked(void **unused)
{
    (void)unused;
    hc_feed f;
    assert_int_equal(hc_feed_seawater(35.0, &f), HC_OK);
    hc_path *p = NULL;
    hc_path_options bad = {.log_p_co2 = 1.0};
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &bad, &p), HC_ERR_ARGUMENT);
    bad.log_p_co2 = NAN;
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &bad, &p), HC_ERR_ARGUMENT);
    hc_path_options bad2 = {.caco3_onset_si = 5.0};
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &bad2, &p), HC_ERR_ARGUMENT);
    assert_null(p);
    /* Plain equilibrium (no nucleation step): seawater itself is
     * supersaturated with aragonite (SI +0.49 [C]), so CaCO3 begins at CF 1. */
    hc_path_options eq = {.caco3_onset_si = -1.0};
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &eq, &p), HC_OK);
    hc_path_onset a;
    assert_non_null(onset_of(p, HC_MIN_ARAGONITE, &a));
    assert_true(a.concentration_factor == 1.0);
    hc_path_free(p);
    /* A higher pCO2 dissolves more CO2 and lowers the pH of the feed. */
    hc_path_options high = {.log_p_co2 = -2.4};
    assert_int_equal(hc_path_build_ex(&f, 25.0, HC_PATH_FRACTIONAL, &high, &p), HC_OK);
    assert_true(hc_path_step(p, 0)->ph < 7.4);
    hc_path_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(constants_with_temperature),
        cmocka_unit_test(seawater_at_air),
        cmocka_unit_test(calcite_in_pure_water),
        cmocka_unit_test(speciation_bad_input),
        cmocka_unit_test(path_carbonate_stage),
        cmocka_unit_test(path_options_checked),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
