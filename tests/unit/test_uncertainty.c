/* Uncertainty of a pond state, propagated through the method that made it
 * (calc/hc_uncertainty.h, plugin/hs_brine_eval.c).
 * Sources of the expected values: GUM (JCGM 100:2008) eq. 10 for the
 * combination of independent terms and 4.3.7 for a rectangular accuracy;
 * rho = dP / (g dz) differentiated by hand for the hydrostatic pair; the
 * calibration's own rms residual for a calibrated state. The PSS-78 state is
 * checked against TEOS-10 gsw in tests/integration/test_uncertainty.sh. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hc_level.h"
#include "hc_uncertainty.h"
#include "hs_brine_eval.h"
#include "pond_fixture.h"

#define near(a, b, tol) assert_true(fabs((double)(a) - (double)(b)) <= (tol))

static hs_site site;
static hs_pond pond;
static hs_signal sig[HS_QUANTITY_COUNT];
static hs_reading rd[HS_QUANTITY_COUNT];

static void put(hs_quantity q, double value)
{
    rd[q] = (hs_reading){.value = value, .t_ms = 1000, .quality = HS_QUALITY_GOOD, .have = 1};
}

static double gravity(void)
{
    double g;
    assert_int_equal(hc_gravity(40.0, 0.0, &g), HC_OK);
    return g;
}

static void compute(const hs_brine_models *models, const hs_pond_aids *aids, hs_pond_view *v)
{
    hs_pond_evaluate(&site, 0, rd, models, aids, gravity(), 2000, v);
}

static void setup_site(void)
{
    pond_fixture(&site, &pond, sig, rd);
}

/* accuracy = +-abs on signal q (0: a perfect instrument). */
static void accuracy(hs_quantity q, double abs_si)
{
    sig[q].accuracy_set = 1;
    sig[q].accuracy_abs_si = abs_si;
    sig[q].accuracy_rel = 0.0;
}

/* y = (2 x0 - 3 x1, x0 x1, ...): GUM eq. 10 by hand. */
static hc_status linear(const double *x, const void *ctx, double *y)
{
    (void)ctx;
    y[HC_UNC_DENSITY] = 2.0 * x[0] - 3.0 * x[1];
    y[HC_UNC_SG] = x[0];
    y[HC_UNC_BAUME] = NAN;
    y[HC_UNC_CF] = x[1] > 1.0 ? NAN : x[1]; /* one side leaves the range */
    return HC_OK;
}

static void propagation_is_gum_eq10(void **unused)
{
    (void)unused;
    double x[2] = {1.0, 0.5}, u[2] = {0.1, 0.2}, uy[HC_UNC_OUTPUTS];
    assert_int_equal(hc_unc_propagate(linear, NULL, x, u, 2, uy), HC_OK);
    near(uy[HC_UNC_DENSITY], sqrt(0.2 * 0.2 + 0.6 * 0.6), 1e-12);
    near(uy[HC_UNC_SG], 0.1, 1e-12);
    assert_true(isnan(uy[HC_UNC_BAUME]));          /* unknown stays unknown */
    near(uy[HC_UNC_CF], 0.2, 1e-12);               /* one-sided where needed */
    near(hc_unc_from_accuracy(sqrt(3.0)), 1.0, 1e-12); /* GUM 4.3.7 */
    near(hc_unc_from_resolution(sqrt(12.0)), 1.0, 1e-12); /* GUM F.2.2.1 */
    u[0] = -1.0;
    assert_int_equal(hc_unc_propagate(linear, NULL, x, u, 2, uy), HC_ERR_ARGUMENT);
    assert_int_equal(hc_unc_propagate(linear, NULL, x, u, HC_UNC_MAX_INPUTS + 1, uy),
                     HC_ERR_ARGUMENT);
}

/* A densitometer's density is its own: u(rho) = a / sqrt(3) exactly; a
 * density past the path's end stays as measured, CF unknown. */
static void densitometer_keeps_its_reading(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view v;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    put(HS_Q_TEMPERATURE, 25.0);
    put(HS_Q_DENSITY, 1150.0);
    compute(models, NULL, &v);
    assert_int_equal(v.state.method, HC_METHOD_DENSITOMETER);
    near(v.state.density_uncertainty_kg_m3, 0.5 / sqrt(3.0), 1e-9);
    assert_true(v.state.sg_uncertainty > 0.0 && v.state.sg_uncertainty < 1e-3);
    put(HS_Q_DENSITY, 1340.0);
    compute(models, NULL, &v);
    assert_true(v.have_state);
    near(v.state.density_kg_m3, 1340.0, 1e-9);
    assert_true(v.state.warnings & HC_WARN_BEYOND_PATH);
    assert_true(isnan(v.state.concentration_factor));
    assert_true(v.state.specific_gravity > 1.34);
    hs_brine_models_free(models);
}

/* rho = dP / (g dz): u(rho)^2 = 2 (u_p / (g dz))^2 + (rho u_dz / dz)^2. */
static void hydrostatic_pair_spacing(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view v;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    double g = gravity(), rho = 1200.0, dz = pond.pressure_spacing_m;
    put(HS_Q_TEMPERATURE, 25.0);
    put(HS_Q_LEVEL_PRESSURE, 12000.0);
    put(HS_Q_PRESSURE_UPPER, 12000.0 - rho * g * dz);
    compute(models, NULL, &v);
    assert_int_equal(v.state.method, HC_METHOD_HYDROSTATIC);
    double up = 100.0 / sqrt(3.0), udz = 0.002 / sqrt(3.0);
    double want = sqrt(2.0 * pow(up / (g * dz), 2) + pow(rho * udz / dz, 2));
    near(v.state.density_uncertainty_kg_m3, want, 0.01 * want);
    hs_brine_models_free(models);
}

/* With perfect instruments a calibrated state is as uncertain as the
 * calibration's residual: u(SG) = rms residual (the state's t_ref is the
 * calibration's). With real ones it can only be more. */
static void calibrated_state_carries_the_residual(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view v;
    hs_pond_aids aids;
    hc_calibration cal;
    /* invented readings with scatter about a straight line (plumbing check) */
    const hc_calibration_point pts[] = {
        {100.0, 25.0, 1.080}, {125.0, 25.0, 1.106}, {130.0, 25.0, 1.100},
        {150.0, 25.0, 1.130}, {175.0, 25.0, 1.160}, {180.0, 25.0, 1.154},
        {200.0, 25.0, 1.180}, {210.0, 25.0, 1.190},
    };
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    assert_int_equal(hc_calibration_fit(pts, 8, 20.0, &cal), HC_OK);
    assert_true(cal.rms_residual > 1e-4);
    hs_pond_aids_clear(&aids);
    aids.calibration = &cal;
    accuracy(HS_Q_CONDUCTIVITY, 0.0);
    accuracy(HS_Q_TEMPERATURE, 0.0);
    put(HS_Q_TEMPERATURE, 25.0);
    put(HS_Q_CONDUCTIVITY, 160.0);
    compute(models, &aids, &v);
    assert_int_equal(v.state.method, HC_METHOD_SITE_CALIBRATION);
    near(v.state.sg_uncertainty, cal.rms_residual, 0.03 * cal.rms_residual);
    /* Baume: d(Be)/d(SG) = m / SG^2 (the heavy-liquid scale) */
    double sg = v.state.specific_gravity;
    near(v.state.baume_uncertainty, 145.0 / (sg * sg) * v.state.sg_uncertainty,
         0.03 * v.state.baume_uncertainty);
    double only_fit = v.state.density_uncertainty_kg_m3;
    sig[HS_Q_CONDUCTIVITY].accuracy_set = 0; /* back to the instrument class */
    sig[HS_Q_TEMPERATURE].accuracy_set = 0;
    compute(models, &aids, &v);
    assert_true(v.state.density_uncertainty_kg_m3 > only_fit);
    hs_brine_models_free(models);
}

/* Near halite the brine conductivity model flattens against density: the
 * same 0.5 % conductivity class makes a large density uncertainty, far
 * larger than in the PSS-78 range. */
static void near_halite_conductivity_is_uncertain(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view v;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    put(HS_Q_TEMPERATURE, 25.0);
    put(HS_Q_CONDUCTIVITY, 53.0);
    compute(models, NULL, &v);
    assert_int_equal(v.state.method, HC_METHOD_PSS78);
    double seawater = v.state.density_uncertainty_kg_m3;
    assert_true(seawater > 0.0 && seawater < 0.5);
    put(HS_Q_CONDUCTIVITY, 245.0);
    compute(models, NULL, &v);
    assert_int_equal(v.state.method, HC_METHOD_BRINE_CONDUCTIVITY);
    assert_true(v.state.warnings & HC_WARN_CONDUCTIVITY_WEAK);
    printf("# u(rho): PSS-78 %.3f kg/m3, near halite %.1f kg/m3, u(CF) %.2f\n", seawater,
           v.state.density_uncertainty_kg_m3, v.state.cf_uncertainty);
    assert_true(v.state.density_uncertainty_kg_m3 > 10.0);
    assert_true(v.state.density_uncertainty_kg_m3 > 50.0 * seawater);
    assert_true(v.state.cf_uncertainty > 0.5);
    hs_brine_models_free(models);
}

/* A hydrometer reading: the resolution's d / sqrt(12) in SG. */
static void manual_reading_resolution(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view v;
    hs_pond_aids aids;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    hs_pond_aids_clear(&aids);
    aids.manual_sg = 1.200;
    aids.manual_t_ref_c = 20.0;
    aids.manual_t_ms = 1500;
    aids.manual_max_age_ms = 3600000;
    accuracy(HS_Q_TEMPERATURE, 0.0);
    put(HS_Q_TEMPERATURE, 25.0);
    compute(models, &aids, &v);
    assert_int_equal(v.state.method, HC_METHOD_MANUAL);
    near(v.state.sg_uncertainty, 0.001 / sqrt(12.0), 0.03 * 0.001 / sqrt(12.0));
    hs_brine_models_free(models);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(propagation_is_gum_eq10),
        cmocka_unit_test(densitometer_keeps_its_reading),
        cmocka_unit_test(hydrostatic_pair_spacing),
        cmocka_unit_test(calibrated_state_carries_the_residual),
        cmocka_unit_test(near_halite_conductivity_is_uncertain),
        cmocka_unit_test(manual_reading_resolution),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
