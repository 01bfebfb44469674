/* Speed of the brine thermodynamics: us per Pitzer evaluation (seawater and
 * a near-bittern brine), us per carbonate speciation, ms per evaporation path (built once per site, both
 * modes), and ns per runtime state lookup (from CF, from density at the path
 * temperature and at another one, from conductivity). Inputs vary so that
 * nothing is constant-folded; the best of several rounds is reported. */
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "hc_brine_density.h"
#include "hc_carbonate.h"
#include "hc_minerals.h"
#include "hc_onset_table.h"
#include "hc_path.h"
#include "hc_pitzer.h"

#define ROUNDS 5

static double now_ns(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec * 1e9 + ts.tv_nsec;
}

/* ns per Pitzer evaluation of `base` scaled by factors 0.9..1.1. */
static double bench_pitzer(const double base[HC_ION_COUNT], double *sink)
{
    enum { N = 100000 };
    hc_pitzer_params p;
    if (hc_pitzer_params_at(25.0, &p) != HC_OK)
        exit(1);
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0.0;
        for (int i = 0; i < N; i++) {
            double f = 0.9 + 0.2 * (i % 1000) / 1000.0, m[HC_ION_COUNT];
            for (int k = 0; k < HC_ION_COUNT; k++)
                m[k] = base[k] * f;
            hc_pitzer_result res;
            if (hc_pitzer_eval(&p, m, &res) == HC_OK)
                acc += res.water_activity;
        }
        double dt = (now_ns() - t0) / N;
        best = dt < best ? dt : best;
        *sink += acc;
    }
    return best;
}

/* ns per carbonate speciation at air pCO2 of `base` scaled by 0.9..1.1. */
static double bench_speciate(const double base[HC_ION_COUNT], double *sink)
{
    enum { N = 20000 };
    hc_pitzer_params p;
    hc_carbonate_params c;
    if (hc_pitzer_params_at(25.0, &p) != HC_OK ||
        hc_carbonate_params_at(25.0, HC_LOG_PCO2_AIR, &c) != HC_OK)
        exit(1);
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0.0;
        for (int i = 0; i < N; i++) {
            double f = 0.9 + 0.2 * (i % 1000) / 1000.0, m[HC_ION_COUNT], fr[HC_ION_COUNT];
            for (int k = 0; k < HC_ION_COUNT; k++)
                m[k] = base[k] * f;
            hc_pitzer_result res;
            hc_carbonate_result cr;
            if (hc_carbonate_speciate(&p, &c, m, fr, &res, &cr) == HC_OK)
                acc += cr.ph;
        }
        double dt = (now_ns() - t0) / N;
        best = dt < best ? dt : best;
        *sink += acc;
    }
    return best;
}

/* ms per path build. */
static double bench_build(hc_path_mode mode, unsigned flags, size_t *steps)
{
    hc_feed f;
    if (hc_feed_seawater(35.0, &f) != HC_OK)
        exit(1);
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        hc_path *p = NULL;
        hc_path_options opt = {.mineral_flags = flags};
        double t0 = now_ns();
        if (hc_path_build_ex(&f, 25.0, mode, &opt, &p) != HC_OK) {
            fprintf(stderr, "bench_thermo: path build failed\n");
            exit(1);
        }
        double dt = (now_ns() - t0) / 1e6;
        best = dt < best ? dt : best;
        *steps = hc_path_step_count(p);
        hc_path_free(p);
    }
    return best;
}

enum lookup { FROM_CF, FROM_DENSITY, FROM_DENSITY_OTHER_T, FROM_CONDUCTIVITY };

/* ns per state lookup on a built path. */
static double bench_lookup(const hc_path *p, enum lookup kind, double *sink)
{
    enum { N = 20000 };
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_ns(), acc = 0.0;
        for (int i = 0; i < N; i++) {
            double u = (i % 997) / 997.0;
            hc_brine_state s;
            hc_status st;
            switch (kind) {
            case FROM_CF:
                st = hc_path_state_from_cf(p, 1.0 + 150.0 * u, 25.0, 15.556, 145.0, &s);
                break;
            case FROM_DENSITY:
                st = hc_path_state_from_density(p, 1025.0 + 300.0 * u, 25.0, 15.556, 145.0, &s);
                break;
            case FROM_DENSITY_OTHER_T:
                st = hc_path_state_from_density(p, 1025.0 + 300.0 * u, 31.0, 15.556, 145.0, &s);
                break;
            default:
                st = hc_path_state_from_conductivity(p, 55.0 + 180.0 * u, 25.0, 15.556, 145.0,
                                                     NULL, &s);
                break;
            }
            if (st == HC_OK)
                acc += s.concentration_factor;
        }
        double dt = (now_ns() - t0) / N;
        best = dt < best ? dt : best;
        *sink += acc;
    }
    return best;
}

/* ms to build the stage-onset table (10 paths, 0..45 degC), and ns per
 * sample to restage a state at its own temperature (stage, next stage and
 * its densities at t and t_ref) or to judge the stage at t_ref by density. */
static void bench_onsets(const hc_feed *f, const hc_path *p, double *sink)
{
    static const double temps[] = {0, 5, 10, 15, 20, 25, 30, 35, 40, 45};
    static hc_onset_table tab;
    double t0 = now_ns();
    if (hc_onset_table_build(f, temps, 10, HC_PATH_FRACTIONAL, NULL, &tab) != HC_OK)
        return;
    printf("onset table build, 10 temps:  %8.2f ms (at start, per feed)\n",
           (now_ns() - t0) / 1e6);
    enum { N = 20000 };
    double best = 1e300, best_ref = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double acc = 0.0;
        t0 = now_ns();
        for (int i = 0; i < N; i++) {
            double u = (i % 997) / 997.0;
            hc_brine_state s;
            hc_state_clear(&s);
            s.concentration_factor = 1.0 + 150.0 * u;
            s.temperature_c = 5.0 + 35.0 * u;
            s.reference_temperature_c = 20.0;
            hc_onset_table_restage(&tab, &s);
            acc += s.stage;
        }
        double dt = (now_ns() - t0) / N;
        best = dt < best ? dt : best;
        t0 = now_ns();
        for (int i = 0; i < N / 10; i++)
            acc += hc_onset_table_stage_ref(&tab, 1025.0 + 0.03 * (i % 9973), 20.0);
        dt = (now_ns() - t0) / (N / 10);
        best_ref = dt < best_ref ? dt : best_ref;
        *sink += acc;
    }
    (void)p;
    printf("stage at pond temperature:    %8.0f ns per sample (table lookup + next-stage densities)\n",
           best);
    printf("stage at t_ref by density:    %8.0f ns per transfer decision\n", best_ref);
}

int main(void)
{
    double sink = 0.0;
    /* Seawater at S_P 35 (DOMAIN sec. 4) and a bittern near epsomite
     * saturation (the fractional path at CF 60, rounded). */
    const double seawater[HC_ION_COUNT] = {0.4861, 0.01058, 0.05474, 0.01075, 0.5691, 0.02927, 0, 0};
    const double bittern[HC_ION_COUNT] = {1.43, 0.635, 3.31, 0.0005, 6.53, 1.08, 0, 0};
    printf("pitzer eval, seawater:        %8.3f us\n", bench_pitzer(seawater, &sink) / 1e3);
    printf("pitzer eval, bittern:         %8.3f us\n", bench_pitzer(bittern, &sink) / 1e3);
    const double seawater_c[HC_ION_COUNT] = {0.4861, 0.01058, 0.05474, 0.01075,
                                             0.5668, 0.02927, 0.00178, 0.00025};
    printf("carbonate speciation, seawater: %6.3f us (air pCO2, Pitzer passes included)\n",
           bench_speciate(seawater_c, &sink) / 1e3);
    size_t steps = 0;
    double ms = bench_build(HC_PATH_FRACTIONAL, 0, &steps);
    printf("path build, fractional:       %8.2f ms (%zu steps)\n", ms, steps);
    ms = bench_build(HC_PATH_EQUILIBRIUM, 0, &steps);
    printf("path build, equilibrium:      %8.2f ms (%zu steps)\n", ms, steps);
    ms = bench_build(HC_PATH_FRACTIONAL, HC_MINERALS_NO_CARBONATE, &steps);
    printf("path build, fractional:       %8.2f ms (%zu steps, --no-carbonate)\n", ms, steps);
    hc_feed f;
    hc_path *p = NULL;
    if (hc_feed_seawater(35.0, &f) != HC_OK ||
        hc_path_build(&f, 25.0, HC_PATH_FRACTIONAL, &p) != HC_OK)
        return 1;
    printf("state lookup, from CF:        %8.0f ns\n", bench_lookup(p, FROM_CF, &sink));
    printf("state lookup, from density:   %8.0f ns (at the path temperature)\n",
           bench_lookup(p, FROM_DENSITY, &sink));
    printf("state lookup, from density:   %8.0f ns (at another temperature)\n",
           bench_lookup(p, FROM_DENSITY_OTHER_T, &sink));
    printf("state lookup, from cond.:     %8.0f ns (built-in brine model)\n",
           bench_lookup(p, FROM_CONDUCTIVITY, &sink));
    bench_onsets(&f, p, &sink);
    hc_path_free(p);
    if (sink == 0.0)
        printf("(no result)\n");
    return 0;
}
