/* Which density source a pond state uses, and its depth (hs_brine_eval.h, shared by
 * the runtime and halostaged --once).
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

#include "hc_feed.h"
#include "hc_level.h"
#include "hc_seawater.h"
#include "hs_brine_eval.h"
#include "pond_fixture.h"
#include "hs_plausible.h"

#define near(a, b, tol) assert_true(fabs((double)(a) - (double)(b)) <= (tol))

static hs_site site;
static hs_pond pond;
static hs_signal sig[HS_QUANTITY_COUNT];
static hs_reading rd[HS_QUANTITY_COUNT]; /* indexed like sig: signal q carries quantity q */

static void inputs_clear(void)
{
    for (int q = 0; q < HS_QUANTITY_COUNT; q++)
        rd[q] = (hs_reading){.value = NAN, .quality = HS_QUALITY_BAD};
}

/* One sample of quantity q, value in SI units. */
static void put(hs_quantity q, hs_quality quality, double value)
{
    rd[q].quality = quality;
    rd[q].t_ms = 1000;
    if (quality == HS_QUALITY_GOOD) {
        rd[q].value = value;
        rd[q].have = 1;
    }
}

static void compute(const hs_brine_models *models, const hs_pond_aids *aids, hs_pond_view *v)
{
    double g;
    assert_int_equal(hc_gravity(site.site.latitude_deg, 0.0, &g), HC_OK);
    hs_pond_evaluate(&site, 0, rd, models, aids, g, 2000, v);
}

static void setup_site(void)
{
    pond_fixture(&site, &pond, sig, rd);
    inputs_clear();
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
    hs_pond_view r;
    hc_seawater_options opt;
    hc_brine_state want;
    setup_site();
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 20.0);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1025.0);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 80.0);
    compute(NULL, NULL, &r);
    assert_true(r.have_state);
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
    hs_pond_view r;
    setup_site();
    double g = gravity(), rho = 1020.0, depth = 1.2;
    /* Gauge pressures of a brine column (hydrostatics), in Pa. */
    double lower = rho * g * (depth - 0.1), upper = rho * g * (depth - 0.6);
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 20.0);
    put(HS_Q_LEVEL_PRESSURE, HS_QUALITY_GOOD, lower);
    put(HS_Q_PRESSURE_UPPER, HS_QUALITY_GOOD, upper);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 40.0);
    compute(NULL, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_HYDROSTATIC);
    near(r.state.density_kg_m3, rho, 1e-6);
    near(r.depth_m, depth, 1e-9);
    /* A bad upper sensor: conductivity takes over (PSS-78). */
    put(HS_Q_PRESSURE_UPPER, HS_QUALITY_BAD, NAN);
    compute(NULL, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    /* ... and the level then uses the density PSS-78 gave. */
    near(r.depth_m, lower / (r.state.density_kg_m3 * g) + 0.1, 1e-9);
}

static void problems_are_said(void **unused)
{
    (void)unused;
    hs_pond_view r;
    setup_site();
    put(HS_Q_TEMPERATURE, HS_QUALITY_BAD, NAN);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 50.0);
    put(HS_Q_LEVEL_DISTANCE, HS_QUALITY_GOOD, 1.5);
    compute(NULL, NULL, &r);
    assert_non_null(strstr(r.note, "temperature"));
    assert_int_equal(r.state.method, HC_METHOD_NONE);
    near(r.depth_m, 0.5, 1e-12); /* 2.0 m mount - 1.5 m distance */
    /* Beyond PSS-78 without a path: said, not guessed. */
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 20.0);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 150.0);
    compute(NULL, NULL, &r);
    assert_non_null(strstr(r.note, "beyond PSS-78"));
    assert_true(isnan(r.state.density_kg_m3));
}

static void brine_beyond_seawater_uses_the_path(void **unused)
{
    (void)unused;
    hs_pond_view r;
    hs_brine_models *models = NULL;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    const hc_path *path = hs_brine_models_path(models, -1);
    assert_non_null(path);
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 25.0);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1150.0);
    compute(models, NULL, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    hc_brine_state want;
    assert_int_equal(hc_path_state_from_density(path, 1150.0, 25.0, 20.0, 145.0, &want), HC_OK);
    near(r.state.concentration_factor, want.concentration_factor, 1e-12);
    assert_int_equal(r.state.stage, want.stage);
    hs_brine_models_free(models);
}

/* Stage at the pond's own temperature. One brine (CF 3.4 of reference
 * seawater, read by a densitometer at 10 and at 35 degC) has one density at
 * the reference temperature, but at 10 degC it is past its gypsum onset
 * and at 35 degC it is not yet: each state takes the stage, next stage and
 * next-stage density of the path built at its own temperature. The gypsum
 * onset CF rises with temperature: gypsum grows more soluble from 0 to
 * about 40 degC (Marshall & Slusher 1966, J. Phys. Chem. 70, 4015; from
 * memory) and more CaCO3 forms first in warm brine; this model gives CF 2.7
 * at 0 degC and 3.9 at 35 degC (hc_path). */
static void stage_follows_pond_temperature(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    const hc_path *path = hs_brine_models_path(models, -1);
    const hc_onset_table *onsets = hs_brine_models_onsets(models, -1);
    assert_non_null(onsets);
    assert_int_equal(onsets->n, 10);
    for (size_t i = 0; i + 1 < onsets->n && onsets->t_c[i + 1] <= 40.0; i++)
        assert_true(onsets->stage_cf[i + 1][HC_STAGE_GYPSUM] >
                    onsets->stage_cf[i][HC_STAGE_GYPSUM]);
    hc_feed sw;
    assert_int_equal(hc_feed_seawater(35.0, &sw), HC_OK);
    const double temps[2] = {10.0, 35.0};
    hs_pond_view r[2];
    for (int k = 0; k < 2; k++) {
        hc_brine_state b;
        assert_int_equal(hc_path_state_from_cf(path, 3.4, temps[k], 20.0, 145.0, &b), HC_OK);
        inputs_clear();
        put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, temps[k]);
        put(HS_Q_DENSITY, HS_QUALITY_GOOD, b.density_kg_m3);
        compute(models, NULL, &r[k]);
        assert_true(r[k].have_state);
        near(r[k].state.concentration_factor, 3.4, 1e-3);
        /* what a path of the pond's own temperature says of this CF */
        hc_path *own = NULL;
        assert_int_equal(hc_path_build(&sw, temps[k], HC_PATH_FRACTIONAL, &own), HC_OK);
        hc_stage next;
        hc_stage stage = hc_path_stage_at_cf(own, 3.4, &next);
        assert_int_equal(r[k].state.stage, stage);
        assert_int_equal(r[k].state.next_stage, next);
        hc_path_onset on[HC_MINERAL_COUNT];
        size_t n_on = hc_path_onsets(own, on, HC_MINERAL_COUNT);
        double want = NAN;
        for (size_t i = 0; i < n_on; i++)
            if (fabs(on[i].concentration_factor - hc_path_stage_cf(own, next)) < 1e-9)
                want = on[i].density_kg_m3; /* at the path's = the pond's temperature */
        assert_true(isfinite(want));
        /* the next stage's brine is that path's own (the table row) */
        near(r[k].state.next_stage_density_kg_m3, want, 0.01); /* onset found between steps */
        hc_path_free(own);
    }
    assert_int_equal(r[0].state.stage, HC_STAGE_GYPSUM);
    assert_int_equal(r[0].state.next_stage, HC_STAGE_HALITE);
    assert_int_equal(r[1].state.next_stage, HC_STAGE_GYPSUM);
    assert_true(r[1].state.stage < HC_STAGE_GYPSUM);
    near(r[0].state.density_ref_kg_m3, r[1].state.density_ref_kg_m3, 0.02); /* one brine */
    hs_brine_models_free(models);
}

/* Conductivity beyond PSS-78: the site calibration when one is fitted,
 * else the built-in brine model, each flagged. The readings are invented
 * (plumbing check): the SG they imply must come back through the path. */
static void beyond_pss78_calibration_or_model(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view r;
    hs_pond_aids aids;
    hc_calibration cal;
    const hc_calibration_point pts[] = {
        {100.0, 25.0, 1.080}, {150.0, 25.0, 1.130}, {200.0, 25.0, 1.180},
    };
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    assert_int_equal(hc_calibration_fit(pts, 3, 20.0, &cal), HC_OK);
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 25.0);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 150.0);
    compute(models, NULL, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_BRINE_CONDUCTIVITY);
    assert_true(r.state.warnings & HC_WARN_BRINE_MODEL);
    hs_pond_aids_clear(&aids);
    aids.calibration = &cal;
    compute(models, &aids, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_SITE_CALIBRATION);
    assert_false(r.state.warnings & (HC_WARN_BRINE_MODEL | HC_WARN_CALIBRATION_EXTRAPOLATED));
    near(r.state.specific_gravity, 1.130, 2e-3); /* the fit's knot, through the path */
    /* Beyond the readings' span: extrapolated, and said. */
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 215.0);
    compute(models, &aids, &r);
    assert_int_equal(r.state.method, HC_METHOD_SITE_CALIBRATION);
    assert_true(r.state.warnings & HC_WARN_CALIBRATION_EXTRAPOLATED);
    /* Inside PSS-78 the calibration is not used. */
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 50.0);
    compute(models, &aids, &r);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    hs_brine_models_free(models);
}

/* A density signal is never believed against the brine's own history: one
 * reading below the feed water (a dead loop, a densitometer in fresh water
 * or air) or past the end of the evaporation path is set aside, the next
 * source gives the state, and the state's warnings say why. A zero reading
 * is already out of its plausible range (hs_plausible.h) when decoded. */
static void density_signal_below_feed_or_past_path_not_used(void **unused)
{
    (void)unused;
    hs_pond_view r;
    hs_brine_models *models = NULL;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    const hc_path *path = hs_brine_models_path(models, -1);
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 20.0);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 50.0);

    /* the zero densitometer: decoded out-of-range, so the runtime marks it
     * bad; conductivity (PSS-78) gives the state and the warning says why */
    sig[HS_Q_DENSITY].point.type = HP_UINT16;
    sig[HS_Q_DENSITY].point.scale = 1.0;
    sig[HS_Q_DENSITY].point.valid_min = -INFINITY;
    sig[HS_Q_DENSITY].point.valid_max = INFINITY;
    assert_int_equal(hs_plausible_narrow(&sig[HS_Q_DENSITY], &pond), 0);
    uint16_t zero = 0;
    hp_sample smp;
    hp_point_decode(&sig[HS_Q_DENSITY].point, &zero, &smp);
    assert_int_equal(smp.quality, HP_Q_OUT_OF_RANGE);
    put(HS_Q_DENSITY, HS_QUALITY_BAD, NAN);
    compute(models, NULL, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    assert_true(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BAD);
    assert_string_equal(hc_warning_name(HC_WARN_DENSITY_SIGNAL_BAD), "density-signal-bad");

    /* 1000 kg/m3 is plausible for a liquid but below seawater feed at 20 degC */
    hc_brine_state feed;
    assert_int_equal(hc_path_state_from_cf(path, 1.0, 20.0, 20.0, 145.0, &feed), HC_OK);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1000.0);
    compute(models, NULL, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    assert_true(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BELOW_FEED);
    assert_false(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BAD);
    assert_true(fabs(r.state.density_kg_m3 - 1000.0) > 10.0); /* not the dead sensor's */

    /* within the instrument's margin of the feed: still the densitometer */
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, feed.density_kg_m3 - 1.0);
    compute(models, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    assert_false(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BELOW_FEED);

    /* clearly past the end of the path (more than 20 kg/m3 beyond its end
     * brine, checked first against the path itself); a reading just past
     * it is kept as the measurement it is */
    hc_brine_state past;
    assert_int_equal(hc_path_state_from_density(path, 1399.0, 20.0, 20.0, 145.0, &past), HC_OK);
    assert_true(past.warnings & HC_WARN_BEYOND_PATH);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1399.0);
    compute(models, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    assert_true(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BEYOND_PATH);
    hc_path_point end = *hc_path_step(path, hc_path_step_count(path) - 1);
    hc_brine_state last;
    assert_int_equal(hc_path_state_from_cf(path, end.concentration_factor, 20.0, 20.0, 145.0,
                                           &last), HC_OK);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, last.density_kg_m3 + 5.0);
    compute(models, NULL, &r);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    assert_false(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BEYOND_PATH);

    /* nothing else to fall back on: no state, and the note and warning say so */
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_BAD, NAN);
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1000.0);
    compute(models, NULL, &r);
    assert_false(r.have_state);
    assert_true(r.state.warnings & HC_WARN_DENSITY_SIGNAL_BELOW_FEED);
    assert_non_null(strstr(r.note, "density"));
    hs_brine_models_free(models);
}

/* A recent manual reading: used where conductivity is weak or absent and no
 * density signal exists; never over a density signal; never when too old. */
static void manual_reading_when_conductivity_is_weak(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    hs_pond_view r;
    hs_pond_aids aids;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    hs_pond_aids_clear(&aids);
    aids.manual_sg = 1.220;          /* about 26 Be: halite saturation, invented */
    aids.manual_t_ref_c = 20.0;
    aids.manual_t_ms = 1500;         /* compute() evaluates at 2000 ms */
    aids.manual_max_age_ms = 3600000;
    put(HS_Q_TEMPERATURE, HS_QUALITY_GOOD, 25.0);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 250.0);
    compute(models, NULL, &r);
    /* the premise: the brine model calls this conductivity weak */
    assert_true(r.state.warnings & HC_WARN_CONDUCTIVITY_WEAK);
    compute(models, &aids, &r);
    assert_true(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_MANUAL);
    assert_true(r.state.warnings & HC_WARN_CONDUCTIVITY_WEAK);
    near(r.state.specific_gravity, 1.220, 2e-3); /* the reading, through the path */
    /* No conductivity at all: the manual reading still gives the state. */
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_BAD, NAN);
    compute(models, &aids, &r);
    assert_int_equal(r.state.method, HC_METHOD_MANUAL);
    /* Too old: not used. */
    aids.manual_max_age_ms = 100;
    compute(models, &aids, &r);
    assert_false(r.have_state);
    assert_int_equal(r.state.method, HC_METHOD_NONE);
    /* A density signal beats a fresh reading. */
    aids.manual_max_age_ms = 3600000;
    put(HS_Q_DENSITY, HS_QUALITY_GOOD, 1150.0);
    compute(models, &aids, &r);
    assert_int_equal(r.state.method, HC_METHOD_DENSITOMETER);
    /* Conductivity not weak (PSS-78 range): the reading is not needed. */
    put(HS_Q_DENSITY, HS_QUALITY_BAD, NAN);
    put(HS_Q_CONDUCTIVITY, HS_QUALITY_GOOD, 50.0);
    compute(models, &aids, &r);
    assert_int_equal(r.state.method, HC_METHOD_PSS78);
    hs_brine_models_free(models);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(densitometer_first),
        cmocka_unit_test(pressure_pair_then_depth),
        cmocka_unit_test(problems_are_said),
        cmocka_unit_test(brine_beyond_seawater_uses_the_path),
        cmocka_unit_test(stage_follows_pond_temperature),
        cmocka_unit_test(beyond_pss78_calibration_or_model),
        cmocka_unit_test(manual_reading_when_conductivity_is_weak),
        cmocka_unit_test(density_signal_below_feed_or_past_path_not_used),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
