/* Mixing conserves water and ions; the transfer planner against a
 * mass balance worked by hand; interlocks reported. The density model here
 * is a unit-test stand-in (rho = 997 + 40 m_Na, no source claimed): the
 * checks are of the bookkeeping, not of brine density. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hc_mixing.h"

/* Na+ and Cl-, standard atomic weights (IUPAC) [kg/mol]. */
static const double molar_mass[2] = {0.0229898, 0.035453};
#define M_NACL (0.0229898 + 0.035453)

static hc_status stand_in_density(const double *m, size_t n, double t_c, void *ctx, double *rho)
{
    (void)n;
    (void)t_c;
    (*(int *)ctx)++;
    *rho = 997 + 40 * m[0];
    return HC_OK;
}

static void mixing_conserves_water_and_ions(void **unused)
{
    (void)unused;
    const double ma[2] = {4, 4}, mb[2] = {1, 1};
    hc_brine_amount a, b, mix;
    assert_int_equal(hc_amount_from_volume(ma, molar_mass, 2, 100, 1157, &a), HC_OK);
    assert_int_equal(hc_amount_from_volume(mb, molar_mass, 2, 300, 1037, &b), HC_OK);
    /* By hand: 100 m3 at 1157 kg/m3 holding 4 mol/kg NaCl is
     * 115700 / (1 + 4 * 0.0584428) kg of water. */
    assert_near(a.water_kg, 115700 / (1 + 4 * M_NACL), 1e-6);
    assert_near(a.mol[0], 4 * a.water_kg, 1e-6);
    assert_int_equal(hc_amount_mix(&a, &b, &mix), HC_OK);
    assert_near(mix.water_kg, a.water_kg + b.water_kg, 1e-6);
    for (int i = 0; i < 2; i++)
        assert_near(mix.mol[i], a.mol[i] + b.mol[i], 1e-6);
    double m[2], mass;
    assert_int_equal(hc_amount_molality(&mix, molar_mass, m, &mass), HC_OK);
    /* Mass is conserved too: 115700 + 311100 kg. */
    assert_near(mass, 115700 + 311100, 1e-6);
    assert_near(m[0], (a.mol[0] + b.mol[0]) / (a.water_kg + b.water_kg), 1e-12);
    assert_int_equal(hc_amount_from_volume(ma, molar_mass, 2, -1, 1157, &a), HC_ERR_NEGATIVE);
    const double neg[2] = {-1, 1};
    assert_int_equal(hc_amount_from_volume(neg, molar_mass, 2, 1, 1157, &a), HC_ERR_NEGATIVE);
}

/* Source: 2000 m2 vertical walls at 0.80 m, 4 mol/kg (1157 kg/m3).
 * Destination: 1000 m2 at 0.50 m, 1 mol/kg (1037 kg/m3). Target 1077 kg/m3,
 * i.e. 2 mol/kg with the stand-in. By hand: 4 W_A + 1 W_B = 2 (W_A + W_B)
 * gives W_A = W_B / 2, with W_B = 500 * 1037 / (1 + M_NaCl). */
static hc_pond_shape src_shape = {.is_table = 0, .prism = {2000, 0, 0, 1.2}};
static hc_pond_shape dst_shape = {.is_table = 0, .prism = {1000, 0, 0, 1.2}};
static const double m_src[2] = {4, 4}, m_dst[2] = {1, 1};

static void plan_matches_hand_balance(void **unused)
{
    (void)unused;
    hc_plan_pond src = {&src_shape, 0.80, m_src, 1157, 0.2, NAN, NAN, NAN};
    hc_plan_pond dst = {&dst_shape, 0.50, m_dst, 1037, NAN, 1.0, 1060, 1100};
    int calls = 0;
    hc_plan_input in = {&src, &dst, 2, molar_mass, 25, stand_in_density, &calls, 1077, 1e-4};
    hc_plan_result r;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_OK);
    double wb = 500 * 1037 / (1 + M_NACL), wa = wb / 2;
    double va = wa * (1 + 4 * M_NACL) / 1157;
    assert_near(r.volume_m3, va, 1e-3);
    assert_near(r.mix_density_kg_m3, 1077, 1e-4);
    assert_near(r.mix_molality[0], 2, 1e-5);
    assert_near(r.source_level_after_m, 0.80 - va / 2000, 1e-6);
    double mass = wa * (1 + 4 * M_NACL) + wb * (1 + M_NACL);
    assert_near(r.dest_level_after_m, mass / 1077 / 1000, 1e-6);
    assert_near(r.mix_mass_kg, mass, 1e-6 * mass);
    assert_int_equal(r.interlocks, 0);
    assert_true(calls > 2);
}

static void interlocks_are_reported(void **unused)
{
    (void)unused;
    int calls = 0;
    hc_plan_result r;
    /* Destination may not rise above 0.70 m; the plan needs about 0.76 m. */
    hc_plan_pond src = {&src_shape, 0.80, m_src, 1157, 0.2, NAN, NAN, NAN};
    hc_plan_pond dst = {&dst_shape, 0.50, m_dst, 1037, NAN, 0.70, 1060, 1070};
    hc_plan_input in = {&src, &dst, 2, molar_mass, 25, stand_in_density, &calls, 1077, 1e-4};
    assert_int_equal(hc_plan_transfer(&in, &r), HC_OK);
    assert_true(r.interlocks & HC_PLAN_DEST_ABOVE_MAX);
    assert_true(r.interlocks & HC_PLAN_DEST_OUT_OF_BAND);
    assert_false(r.interlocks & HC_PLAN_SOURCE_BELOW_MIN);
    /* The source may not fall below 0.75 m: moving ~261 m3 takes it to ~0.67. */
    src.min_level_m = 0.75;
    dst.max_level_m = NAN;
    dst.band_high_kg_m3 = NAN;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_OK);
    assert_int_equal(r.interlocks, HC_PLAN_SOURCE_BELOW_MIN);
    /* A nearly empty source cannot supply it. */
    src.level_m = 0.05;
    src.min_level_m = NAN;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_OK);
    assert_true(r.interlocks & HC_PLAN_SOURCE_SHORT);
    /* A target denser than the source is unreachable by mixing. */
    src.level_m = 0.80;
    in.target_density_kg_m3 = 1200;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_ERR_DOMAIN);
    assert_int_equal(r.interlocks, HC_PLAN_UNREACHABLE);
    /* nothing is known of a plan that cannot be made: NaN, not an empty pond */
    assert_true(isnan(r.volume_m3) && isnan(r.mix_density_kg_m3) && isnan(r.dest_level_after_m) &&
                isnan(r.dest_volume_after_m3) && isnan(r.source_level_after_m));
    /* Diluting works the other way: fresher source into denser pond. */
    hc_plan_pond fresh = {&src_shape, 0.80, m_dst, 1037, NAN, NAN, NAN, NAN};
    hc_plan_pond dense = {&dst_shape, 0.50, m_src, 1157, NAN, NAN, NAN, NAN};
    hc_plan_input dil = {&fresh, &dense, 2, molar_mass, 25, stand_in_density, &calls, 1117, 1e-4};
    assert_int_equal(hc_plan_transfer(&dil, &r), HC_OK);
    assert_near(r.mix_density_kg_m3, 1117, 1e-4);
    /* Bad inputs. */
    in.target_density_kg_m3 = NAN;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_ERR_NOT_FINITE);
    in.target_density_kg_m3 = 1077;
    src.level_m = -1;
    assert_int_equal(hc_plan_transfer(&in, &r), HC_ERR_ARGUMENT);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(mixing_conserves_water_and_ions),
        cmocka_unit_test(plan_matches_hand_balance),
        cmocka_unit_test(interlocks_are_reported),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
