/* Speed of the hydrology: per call, the level -> volume lookup in a
 * 100-row stage-storage table, one forecast (257 points along the path,
 * each a level inversion), one transfer plan (bisection with the brine
 * density model), and the one-off curve built from the evaporation path.
 * Inputs vary so nothing is constant-folded; best of several rounds. */
#include <math.h>
#include <stdio.h>
#include <time.h>

#include "hc_forecast.h"
#include "hc_geometry.h"
#include "hc_mixing.h"
#include "hs_hydro_brine.h"

#define ROUNDS 5

static double now_ns(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec * 1e9 + ts.tv_nsec;
}

static volatile double sink;

int main(void)
{
    /* A 100-row table sampled from a 20 ha pond with 3:1 dikes. */
    double lv[100], vv[100], av[100];
    hc_prism prism = {200000, 0, 3, 2.0};
    for (int i = 0; i < 100; i++) {
        lv[i] = 0.02 * i;
        hc_prism_at_level(&prism, lv[i], &vv[i], &av[i]);
    }
    hc_pond_shape table = {.is_table = 1, .table = {100, lv, vv, av}};
    const int n_lookup = 1000000;
    double best = INFINITY;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0, v;
        for (int i = 0; i < n_lookup; i++) {
            hc_shape_at_level(&table, 1.98 * (i % 997) / 997.0, &v, NULL);
            acc += v;
        }
        sink = acc;
        best = fmin(best, (now_ns() - t0) / n_lookup);
    }
    printf("stage-storage lookup (100 rows):  %8.1f ns per level\n", best);

    hc_feed feed;
    hc_path *path;
    struct hs_brine_curve curve;
    char err[200];
    double t_build = INFINITY;
    for (int r = 0; r < 3; r++) {
        double t0 = now_ns();
        if (hc_feed_seawater(35, &feed) != HC_OK ||
            hc_path_build(&feed, 25, HC_PATH_FRACTIONAL, &path) != HC_OK ||
            hs_brine_curve_from_path(path, &curve, err, sizeof err) != 0) {
            fprintf(stderr, "bench_hydro: cannot build the path\n");
            return 1;
        }
        t_build = fmin(t_build, now_ns() - t0);
        if (r < 2) {
            hs_brine_curve_free(&curve);
            hc_path_free(path);
        }
    }
    printf("path + hydrology curve (seawater): %7.1f ms once per site\n", t_build / 1e6);

    hc_pond_shape sloped = {.is_table = 0, .prism = prism};
    const int n_fc = 2000;
    best = INFINITY;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0, d;
        for (int i = 0; i < n_fc; i++) {
            hc_forecast_input in = {&sloped, &curve.view, 0.4 + 0.001 * (i % 100), 3.0,
                                    4 + (i % 7), 1, 0.5};
            if (hc_forecast_days_to_cf(&in, 10.6, &d) == HC_OK)
                acc += d;
        }
        sink = acc;
        best = fmin(best, (now_ns() - t0) / n_fc);
    }
    printf("forecast (sloped pond, to halite): %7.1f us per forecast\n", best / 1e3);

    double m_src[HC_ION_COUNT], m_dst[HC_ION_COUNT], mm[HC_ION_COUNT], cf;
    hs_brine_at_density(path, 1180, 25, m_src, &cf, NULL);
    hs_brine_at_density(path, 1050, 25, m_dst, &cf, NULL);
    hs_ion_molar_masses(mm);
    hc_pond_shape a = {.is_table = 0, .prism = {30000, 0, 0, 1.5}};
    hc_pond_shape b = {.is_table = 0, .prism = {40000, 0, 0, 1.5}};
    const int n_plan = 500;
    best = INFINITY;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0;
        for (int i = 0; i < n_plan; i++) {
            hc_plan_pond src = {&a, 0.5, m_src, 1180, NAN, NAN, NAN, NAN};
            hc_plan_pond dst = {&b, 0.3 + 0.001 * (i % 50), m_dst, 1050, NAN, NAN, NAN, NAN};
            hc_plan_input in = {&src, &dst, HC_ION_COUNT, mm, 20, hs_brine_density_cb, NULL,
                                1100, 0.01};
            hc_plan_result res;
            if (hc_plan_transfer(&in, &res) == HC_OK)
                acc += res.volume_m3;
        }
        sink = acc;
        best = fmin(best, (now_ns() - t0) / n_plan);
    }
    printf("transfer plan (to 0.01 kg/m3):     %7.1f us per plan\n", best / 1e3);
    hs_brine_curve_free(&curve);
    hc_path_free(path);
    return 0;
}
