/* Which density source a pond state uses, and its depth (hs_pond_state.h).
 * Expected values come from the calc functions themselves (EOS-80, PSS-78,
 * hc_gravity) or from arithmetic (rho = dP / (g dz), depth = z - distance),
 * so this checks the choice and the plumbing, not the science again. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hc_level.h"
#include "hc_seawater.h"
#include "hs_feed_model.h"
#include "hs_pond_state.h"

#define near(a, b, tol) assert_true(fabs((double)(a) - (double)(b)) <= (tol))

static hs_site site;
static hs_pond pond;
static hs_signal sig[HS_QUANTITY_COUNT];

static void setup_site(void)
{
    memset(&site, 0, sizeof site);
    memset(&pond, 0, sizeof pond);
    snprintf(site.site.name, sizeof site.site.name, "t");
    site.site.latitude_deg = 40.0;
    site.site.reference_temperature_c = 20.0;
    site.site.baume_modulus = 145.0;
    pond.pressure_spacing_m = 0.5;
    pond.pressure_height_m = 0.1;
    pond.distance_height_m = 2.0;
    pond.feed_index = -1;
    site.ponds = &pond;
    site.n_ponds = 1;
    for (int q = 0; q < HS_QUANTITY_COUNT; q++) {
        sig[q].quantity = (hs_quantity)q;
        sig[q].si_factor = 1.0;
    }
    sig[HS_Q_LEVEL_PRESSURE].si_factor = 1000.0; /* kPa */
    sig[HS_Q_PRESSURE_UPPER].si_factor = 1000.0;
}

static double gravity(void)
{
    double g;
    assert_int_equal(hc_gravity(40.0, 0.0, &g), HC_OK);
    return g;
}

static void densitometer_first(void **unused)
{
    (void)unused;
    hs_pond_inputs in;
    hs_pond_result r;
    hc_seawater_options opt;
    hc_brine_state want;
    setup_site();
    hs_pond_inputs_clear(&in);
    hs_pond_inputs_put(&in, &sig[HS_Q_TEMPERATURE], HP_Q_GOOD, 20.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_DENSITY], HP_Q_GOOD, 1025.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_CONDUCTIVITY], HP_Q_GOOD, 80.0);
    hs_pond_compute(&site, 0, &in, NULL, &r);
    assert_null(r.problem);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    hc_seawater_options_default(&opt);
    opt.reference_temperature_c = 20.0;
    assert_int_equal(hc_seawater_state_from_density(1025.0, 20.0, 0.0, &opt, &want), HC_OK);
    near(r.state.practical_salinity, want.practical_salinity, 1e-9);
    near(r.state.baume, want.baume, 1e-9);
}

static void pressure_pair_then_depth(void **unused)
{
    (void)unused;
    hs_pond_inputs in;
    hs_pond_result r;
    setup_site();
    double g = gravity(), rho = 1020.0, depth = 1.2;
    /* Gauge pressures of a brine column (hydrostatics), in kPa. */
    double lower = rho * g * (depth - 0.1) / 1000.0, upper = rho * g * (depth - 0.6) / 1000.0;
    hs_pond_inputs_clear(&in);
    hs_pond_inputs_put(&in, &sig[HS_Q_TEMPERATURE], HP_Q_GOOD, 20.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_LEVEL_PRESSURE], HP_Q_GOOD, lower);
    hs_pond_inputs_put(&in, &sig[HS_Q_PRESSURE_UPPER], HP_Q_GOOD, upper);
    hs_pond_inputs_put(&in, &sig[HS_Q_CONDUCTIVITY], HP_Q_GOOD, 40.0);
    hs_pond_compute(&site, 0, &in, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_HYDROSTATIC);
    near(r.state.density_kg_m3, rho, 1e-6);
    near(r.depth_m, depth, 1e-9);
    /* A bad upper sensor: conductivity takes over (PSS-78). */
    hs_pond_inputs_put(&in, &sig[HS_Q_PRESSURE_UPPER], HP_Q_COMM_FAIL, NAN);
    hs_pond_compute(&site, 0, &in, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    /* ... and the level then uses the density PSS-78 gave. */
    near(r.depth_m, lower * 1000.0 / (r.state.density_kg_m3 * g) + 0.1, 1e-9);
}

static void problems_are_said(void **unused)
{
    (void)unused;
    hs_pond_inputs in;
    hs_pond_result r;
    setup_site();
    hs_pond_inputs_clear(&in);
    hs_pond_inputs_put(&in, &sig[HS_Q_TEMPERATURE], HP_Q_SENTINEL, NAN);
    hs_pond_inputs_put(&in, &sig[HS_Q_CONDUCTIVITY], HP_Q_GOOD, 50.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_LEVEL_DISTANCE], HP_Q_GOOD, 1.5);
    hs_pond_compute(&site, 0, &in, NULL, &r);
    assert_non_null(strstr(r.problem, "temperature"));
    assert_int_equal(r.state.method, HC_METHOD_NONE);
    near(r.depth_m, 0.5, 1e-12); /* 2.0 m mount - 1.5 m distance */
    /* Beyond PSS-78 without a path: said, not guessed. */
    hs_pond_inputs_put(&in, &sig[HS_Q_TEMPERATURE], HP_Q_GOOD, 20.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_CONDUCTIVITY], HP_Q_GOOD, 150.0);
    hs_pond_compute(&site, 0, &in, NULL, &r);
    assert_non_null(strstr(r.problem, "beyond PSS-78"));
    assert_true(isnan(r.state.density_kg_m3));
}

static void brine_beyond_seawater_uses_the_path(void **unused)
{
    (void)unused;
    hs_pond_inputs in;
    hs_pond_result r;
    hs_paths paths;
    setup_site();
    assert_int_equal(hs_paths_build(&site, &paths), 0);
    const hc_path *path = hs_paths_for(&paths, -1);
    assert_non_null(path);
    hs_pond_inputs_clear(&in);
    hs_pond_inputs_put(&in, &sig[HS_Q_TEMPERATURE], HP_Q_GOOD, 25.0);
    hs_pond_inputs_put(&in, &sig[HS_Q_DENSITY], HP_Q_GOOD, 1150.0);
    hs_pond_compute(&site, 0, &in, path, &r);
    assert_null(r.problem);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    hc_brine_state want;
    assert_int_equal(hc_path_state_from_density(path, 1150.0, 25.0, 20.0, 145.0, &want), HC_OK);
    near(r.state.concentration_factor, want.concentration_factor, 1e-12);
    assert_int_equal(r.state.stage, want.stage);
    hs_paths_free(&paths);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(densitometer_first),
        cmocka_unit_test(pressure_pair_then_depth),
        cmocka_unit_test(problems_are_said),
        cmocka_unit_test(brine_beyond_seawater_uses_the_path),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
