/* The per-pond tracker over a synthetic pond: daily balances recover the
 * evaporation that drove the pond (worked from the masses), through
 * transfers and rain; the window's spread gives the range; drift is
 * flagged; the report and its JSON carry the figures. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hydro_demo_curve.h"
#include "hydro_near.h"

#include "hc_forecast.h"
#include "hs_hydro.h"
#include "hs_hydro_json.h"

/* Synthetic brine of these tests: salt concentration c = K (rho - 998.2)
 * kg/m3 (invented, linear through fresh water). */
#define K_SALT 1.5
static double rho_of_w(double w)
{
    return 998.2 * K_SALT / (K_SALT - w);
}

/* A 4 ha pond with 3:1 dikes, tracked by water and salt mass. */
struct pond {
    double water_kg, salt_kg;
};

static hc_pond_shape shape = {.is_table = 0, .prism = {40000, 0, 3, 1.5}};

static void observe(const struct pond *p, double t_s, double bias_kg_m3, struct hs_hydro_sample *s)
{
    double w = p->salt_kg / (p->salt_kg + p->water_kg);
    double rho = rho_of_w(w);
    double v = (p->salt_kg + p->water_kg) / rho;
    double h;
    assert_int_equal(hc_shape_level_of_volume(&shape, v, &h), HC_OK);
    double rho_seen = rho + bias_kg_m3;
    s->t_s = t_s;
    s->level_m = h;
    s->density_kg_m3 = rho_seen;
    /* The sensor's salinity follows its own density reading. */
    s->salinity_g_kg = 1000 * K_SALT * (rho_seen - 998.2) / rho_seen;
    s->cf = (p->salt_kg / p->water_kg) / 0.0363;
    s->water_activity = 1 - 0.95 * w;
}

/* Runs `days` days of hourly steps at the given daily rates [mm/day];
 * on day 2 pumps in 300 m3 of brine (rho 1100, from the synthetic
 * relation) at noon, and on day 4 sends out 150 m3; rain 8 mm on day 5. */
static void run_pond(struct hs_hydro *h, struct pond *p, const double *rates, int days,
                     double bias_last_day)
{
    const hc_brine_curve *curve = hydro_demo_curve();
    struct hs_hydro_sample s;
    observe(p, 0, 0, &s);
    assert_int_equal(hs_hydro_sample(h, &s, curve), 0);
    for (int d = 0; d < days; d++) {
        for (int hour = 1; hour <= 24; hour++) {
            double v_now, area, lvl;
            observe(p, 0, 0, &s);
            lvl = s.level_m;
            hc_shape_at_level(&shape, lvl, &v_now, &area);
            p->water_kg -= rates[d] / 1000.0 / 24 * area * 1000; /* E A rho_d per hour */
            if (hour == 12 && d == 2) {
                double w_in = K_SALT * (1100 - 998.2) / 1100, m = 300 * 1100;
                p->water_kg += m * (1 - w_in);
                p->salt_kg += m * w_in;
                assert_int_equal(hs_hydro_transfer(h, 1, 300, 1100, 1000 * w_in), 0);
            }
            if (hour == 12 && d == 4) {
                /* Out at the pond's current make-up (NaN: the tracker's latest
                 * reading; the hour's step is small, so use the true one). */
                double w = p->salt_kg / (p->salt_kg + p->water_kg), rho = rho_of_w(w);
                p->water_kg -= 150 * rho * (1 - w);
                p->salt_kg -= 150 * rho * w;
                assert_int_equal(hs_hydro_transfer(h, 0, 150, rho, 1000 * w), 0);
            }
            if (hour == 18 && d == 5) {
                observe(p, 0, 0, &s);
                hc_shape_at_level(&shape, s.level_m, NULL, &area);
                p->water_kg += 0.008 * area * 1000;
                assert_int_equal(hs_hydro_rain(h, 8), 0);
            }
            double bias = (d == days - 1 && hour == 24) ? bias_last_day : 0;
            observe(p, (d * 24 + hour) * 3600.0, bias, &s);
            assert_int_equal(hs_hydro_sample(h, &s, curve), 0);
        }
    }
}

static void daily_rates_recovered(void **unused)
{
    (void)unused;
    struct hs_hydro_config cfg;
    hs_hydro_config_default(&cfg);
    cfg.shape = shape;
    struct hs_hydro h;
    assert_int_equal(hs_hydro_init(&h, &cfg), 0);
    /* 0.6 m of brine at w = 0.10 to start. */
    struct pond p;
    double v0;
    hc_shape_at_level(&shape, 0.6, &v0, NULL);
    double m0 = v0 * rho_of_w(0.10);
    p.salt_kg = 0.10 * m0;
    p.water_kg = 0.90 * m0;
    const double rates[7] = {5, 6, 7, 5, 6, 7, 6};
    run_pond(&h, &p, rates, 7, 0);
    assert_int_equal(h.n_rates, 7);
    /* The area changes within each hour the pond is stepped, and the
     * balance uses the mean of the hourly areas: agreement within 0.5 %
     * of the rate (the area moves about 0.1 % over a day here). */
    double worst = 0;
    for (int d = 0; d < 7; d++) {
        assert_near(h.rates[d], rates[d], 0.005 * rates[d]);
        worst = fmax(worst, fabs(h.rates[d] - rates[d]) / rates[d]);
    }
    printf("# daily balance vs driven evaporation: worst relative error %.2e\n", worst);
    assert_int_equal(h.drift, 0);
    struct hs_hydro_report r;
    hs_hydro_report(&h, hydro_demo_curve(), 6.0, 9.8, NAN, NAN, &r);
    /* Mean 6.0 and sample s.d. of {5,6,7,5,6,7,6} = sqrt(4/6) (by hand). */
    assert_near(r.net_evaporation_mm_day, 6.0, 0.03);
    assert_near(r.net_evaporation_high_mm_day - r.net_evaporation_mm_day, sqrt(4.0 / 6), 0.03);
    assert_int_equal(r.rate_days, 7);
    /* Dissolved salt: the synthetic pond's own [t]. */
    assert_near(r.dissolved_salt_t, p.salt_kg / 1000, 1e-6 * p.salt_kg / 1000);
    assert_true(isnan(r.deposited_salt_t)); /* not a crystalliser */
    /* The range brackets: faster evaporation, fewer days. */
    assert_true(r.days_to_target_low > 0 && r.days_to_target_low < r.days_to_target_expected &&
                r.days_to_target_expected < r.days_to_target_high);
    hs_pond_extra x;
    hs_hydro_report_to_extra(&r, &x);
    assert_near(x.days_to_next_stage, r.days_to_next_stage_expected, 0);
    assert_near(x.volume_m3, r.volume_m3, 0);
    assert_true(r.days_to_next_stage_low > r.days_to_target_low);
    /* And it is the forecast at the ends of the rate range. */
    hc_forecast_input in = {&shape, hydro_demo_curve(), h.last.level_m, h.last.cf,
                            r.net_evaporation_high_mm_day, 0, 0};
    double d;
    assert_int_equal(hc_forecast_days_to_cf(&in, 6.0, &d), HC_OK);
    assert_near(r.days_to_target_low, d, 1e-9);
}

static void drift_flagged_and_override(void **unused)
{
    (void)unused;
    struct hs_hydro_config cfg;
    hs_hydro_config_default(&cfg);
    cfg.shape = shape;
    cfg.crystalliser = 1;
    cfg.pan_mm_day = 10;
    cfg.relative_humidity = 0.5;
    struct hs_hydro h;
    assert_int_equal(hs_hydro_init(&h, &cfg), 0);
    struct pond p;
    double v0;
    hc_shape_at_level(&shape, 0.6, &v0, NULL);
    double m0 = v0 * rho_of_w(0.10);
    p.salt_kg = 0.10 * m0;
    p.water_kg = 0.90 * m0;
    const double rates[2] = {6, 6};
    run_pond(&h, &p, rates, 2, 6.0); /* the densitometer reads 6 kg/m3 high at the end */
    assert_int_equal(h.drift, 1);
    struct hs_hydro_report r;
    hs_hydro_report(&h, hydro_demo_curve(), NAN, NAN, 4.0, 0.5, &r);
    assert_int_equal(r.density_drift, 1);
    assert_true(fabs(r.balance_density_kg_m3 - (h.last.density_kg_m3 - 6.0)) < 0.5);
    assert_near(r.net_evaporation_mm_day, 4.0, 0);
    assert_near(r.net_evaporation_low_mm_day, 3.5, 0);
    assert_true(isnan(r.days_to_target_low)); /* no target given */
    assert_true(isfinite(r.deposited_salt_t));
    /* Expected: 10 x 0.7 x (a_w - 0.5) / 0.5 (Salhotra et al. 1985 form). */
    assert_near(r.expected_evaporation_mm_day, 7 * (h.water_activity - 0.5) / 0.5, 1e-9);

    json_t *o = json_object();
    assert_int_equal(hs_hydro_report_to_json(&r, o), 0);
    assert_true(json_is_true(json_object_get(o, "calibration_drift")));
    assert_true(json_is_null(json_object_get(json_object_get(o, "days_to_target"), "low")));
    assert_near(json_real_value(json_object_get(json_object_get(o, "net_evaporation_range_mm_day"),
                                                "high")),
                4.5, 0);
    assert_true(json_is_real(json_object_get(o, "volume_m3")));
    assert_true(json_is_real(json_object_get(o, "deposited_salt_t")));
    json_decref(o);
}

static void bad_samples_refused(void **unused)
{
    (void)unused;
    struct hs_hydro_config cfg;
    hs_hydro_config_default(&cfg);
    cfg.shape = shape;
    struct hs_hydro h;
    assert_int_equal(hs_hydro_init(&h, &cfg), 0);
    struct hs_hydro_sample s = {100, 0.5, 1100, 130, 3, 0.9};
    assert_int_equal(hs_hydro_sample(&h, &s, NULL), 0);
    struct hs_hydro_sample back = s;
    back.t_s = 50;
    assert_int_equal(hs_hydro_sample(&h, &back, NULL), -1);
    struct hs_hydro_sample nolevel = s;
    nolevel.level_m = NAN;
    assert_int_equal(hs_hydro_sample(&h, &nolevel, NULL), -1);
    struct hs_hydro_sample over = s;
    over.level_m = 9;
    assert_int_equal(hs_hydro_sample(&h, &over, NULL), -1);
    assert_int_equal(hs_hydro_rain(&h, -1), -1);
    assert_int_equal(hs_hydro_transfer(&h, 1, -5, 1100, 130), -1);
    /* Unknown brine pumped in spoils the day: no rate from it. */
    assert_int_equal(hs_hydro_transfer(&h, 1, 50, NAN, NAN), 0);
    struct hs_hydro_sample next = s;
    next.t_s = 100 + HS_HYDRO_DAY_S;
    assert_int_equal(hs_hydro_sample(&h, &next, NULL), 0);
    assert_int_equal(h.n_rates, 0);
    struct hs_hydro_config bad = cfg;
    bad.window_days = 0;
    assert_int_equal(hs_hydro_init(&h, &bad), -1);
    const double seed[2] = {4, NAN};
    assert_int_equal(hs_hydro_seed(&h, seed, 2, 0), -1);
    assert_int_equal(hs_hydro_seed(&h, seed, 1, 1000), 0);
    assert_int_equal(h.n_rates, 1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(daily_rates_recovered),
        cmocka_unit_test(drift_flagged_and_override),
        cmocka_unit_test(bad_samples_refused),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
