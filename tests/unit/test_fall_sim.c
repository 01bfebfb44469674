/* A noisy crystalliser, simulated: 30 days of conductivity with 0.5 %
 * noise (standard deviation; a fixed pseudo-random sequence), a diurnal
 * temperature swing and slow evaporation, read every 10 s through the
 * daemon's own chain (hs_pond_evaluate: the path's brine conductivity model,
 * density at the reference temperature) into the alarm engine with the
 * built-in density-fall rule. It must stay quiet; then a rain dilution of
 * 10 kg/m3 (density at the reference temperature, within 30 min) must raise
 * it. The brine is the evaporation path's own (HMW84 Pitzer, hc_path); the
 * conductivity the model's (hc_brine_cond.h), so the chain sees a brine it
 * can place: this checks the decision, not the model. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hc_brine_cond.h"
#include "hc_path.h"
#include "hs_alarm.h"
#include "hs_brine_eval.h"
#include "pond_fixture.h"

static hs_site site;
static hs_pond pond;
static hs_signal sig[HS_QUANTITY_COUNT];
static hs_reading rd[HS_QUANTITY_COUNT];

static void setup_site(void)
{
    pond_fixture(&site, &pond, sig, rd);
    pond.role = HS_ROLE_CRYSTALLISER;
}

static unsigned rng = 20261202u;

/* N(0, 1) by Irwin-Hall: the sum of 12 uniforms less 6. */
static double gauss(void)
{
    double g = 0.0;
    for (int k = 0; k < 12; k++) {
        rng = rng * 1103515245u + 12345u;
        g += (double)(rng >> 8) / 16777216.0;
    }
    return g - 6.0;
}

struct count {
    int raised;
    double value;
};

static void on_event(void *ctx, const hs_alarm_event *ev)
{
    struct count *c = ctx;
    if (strcmp(ev->cause, "condition-raised") == 0) {
        c->raised++;
        c->value = ev->value;
    }
}

/* One sample at time t [s] of the brine at cf; returns the state's
 * density at the reference temperature. */
static double sample(const hc_path *path, const hs_brine_models *models, hs_alarm_engine *eng,
                     double cf, double t_s, struct count *c)
{
    double temp = 26.0 + 6.0 * sin(2.0 * M_PI * t_s / 86400.0); /* diurnal swing */
    hc_path_point p;
    double k;
    assert_int_equal(hc_path_point_at_cf(path, cf, &p, NULL), HC_OK);
    assert_int_equal(hc_brine_conductivity(p.salinity_g_kg, temp, &k), HC_OK);
    int64_t t_ms = (int64_t)(t_s * 1000.0);
    rd[HS_Q_TEMPERATURE] =
        (hs_reading){.value = temp, .t_ms = t_ms, .quality = HS_QUALITY_GOOD, .have = 1};
    rd[HS_Q_CONDUCTIVITY] = (hs_reading){.value = k * (1.0 + 0.005 * gauss()), .t_ms = t_ms,
                                          .quality = HS_QUALITY_GOOD, .have = 1};
    hs_pond_view v;
    hs_pond_evaluate(&site, 0, rd, models, NULL, 9.80, t_ms, &v);
    assert_true(v.have_state);
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &v.state;
    in.state_t_ms = v.t_ms;
    hs_alarm_update(eng, "x2", &in, t_ms, on_event, c);
    return v.state.density_ref_kg_m3;
}

static void quiet_for_30_days_then_rain(void **unused)
{
    (void)unused;
    hs_brine_models *models = NULL;
    setup_site();
    assert_int_equal(hs_brine_models_build(&site, &models), 0);
    const hc_path *path = hs_brine_models_path(models, -1);
    hs_alarm_rule fall;
    hs_alarm_rule_default(&fall, HS_RULE_DENSITY_FALL);
    snprintf(fall.name, sizeof fall.name, "density-fall");
    hs_alarm_engine *eng = hs_alarm_new(1);
    assert_int_equal(hs_alarm_add(eng, &fall, "x2"), HS_ALARM_DONE);
    struct count c = {0};

    /* a crystalliser brine: 1224 kg/m3 at 20 degC, in the halite stage */
    double cf0;
    assert_int_equal(hc_path_cf_at_density(path, 1224.0, 20.0, &cf0, NULL), HC_OK);
    assert_int_equal(hc_path_stage_at_cf(path, cf0, NULL), HC_STAGE_HALITE);
    const double dt = 10.0, days = 30.0;
    double t = 0.0, lo = INFINITY, hi = -INFINITY;
    for (; t < days * 86400.0; t += dt) {
        double cf = cf0 * (1.0 + 0.002 * t / 86400.0); /* slow evaporation */
        double rho = sample(path, models, eng, cf, t, &c);
        lo = fmin(lo, rho);
        hi = fmax(hi, rho);
    }
    printf("# 30 days, %d samples: density_ref %.1f..%.1f kg/m3 (noise), %d density-fall\n",
           (int)(days * 86400.0 / dt), lo, hi, c.raised);
    assert_int_equal(c.raised, 0);
    assert_true(hi - lo > 20.0); /* the premise: the noise is large */

    /* Rain: 10 kg/m3 down at the reference temperature within 30 minutes. */
    double cf_end = cf0 * (1.0 + 0.002 * days), rho_end, cf_rain;
    hc_brine_state s;
    assert_int_equal(hc_path_state_from_cf(path, cf_end, 20.0, 20.0, 145.0, &s), HC_OK);
    rho_end = s.density_kg_m3;
    assert_int_equal(hc_path_cf_at_density(path, rho_end - 10.0, 20.0, &cf_rain, NULL), HC_OK);
    for (double r = 0.0; r < 1800.0; r += dt, t += dt)
        sample(path, models, eng, exp(log(cf_end) + (log(cf_rain) - log(cf_end)) * r / 1800.0),
               t, &c);
    for (double r = 0.0; r < 3600.0 && c.raised == 0; r += dt, t += dt)
        sample(path, models, eng, cf_rain, t, &c);
    printf("# rain of 10 kg/m3: %d density-fall (fall %.1f kg/m3)\n", c.raised, c.value);
    assert_int_equal(c.raised, 1);
    hs_alarm_free(eng);
    hs_brine_models_free(models);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(quiet_for_30_days_then_rain),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
