/* Cost of a pond state with its uncertainty (hs_pond_evaluate: the source's
 * method once, then twice per input for the propagation) against the bare
 * calc call of the same method, in microseconds per state, for a
 * densitometer, a PSS-78 conductivity and a near-halite conductivity through
 * the brine model. Best of several rounds (least disturbed by others). */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <time.h>

#include "hc_path.h"
#include "hc_seawater.h"
#include "hs_brine_eval.h"

#define N 20000
#define ROUNDS 5

static double now_us(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec * 1e6 + ts.tv_nsec / 1e3;
}

static hs_site site;
static hs_pond pond;
static hs_signal sig[HS_QUANTITY_COUNT];
static hs_reading rd[HS_QUANTITY_COUNT];

static void setup(void)
{
    snprintf(site.site.name, sizeof site.site.name, "bench");
    site.site.reference_temperature_c = 20.0;
    site.site.baume_modulus = 145.0;
    pond.feed_index = -1;
    site.ponds = &pond;
    site.n_ponds = 1;
    for (int q = 0; q < HS_QUANTITY_COUNT; q++) {
        sig[q].quantity = (hs_quantity)q;
        sig[q].pond_index = 0;
        sig[q].si_factor = 1.0;
        rd[q] = (hs_reading){.value = NAN, .quality = HS_QUALITY_BAD};
    }
    site.signals = sig;
    site.n_signals = HS_QUANTITY_COUNT;
}

static void put(hs_quantity q, double v)
{
    rd[q] = (hs_reading){.value = v, .t_ms = 1000, .quality = HS_QUALITY_GOOD, .have = 1};
}

/* us per hs_pond_evaluate with input q varying around value by +-0.5 %. */
static double eval_us(const hs_brine_models *m, hs_quantity q, double value, double *sink)
{
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_us(), acc = 0.0;
        for (int i = 0; i < N; i++) {
            hs_pond_view v;
            put(q, value * (1.0 + 0.01 * ((double)(i % 101) / 100.0 - 0.5)));
            hs_pond_evaluate(&site, 0, rd, m, NULL, 9.8, 2000, &v);
            acc += v.state.density_uncertainty_kg_m3;
        }
        double dt = (now_us() - t0) / N;
        best = dt < best ? dt : best;
        *sink += acc;
    }
    return best;
}

/* us per bare calc call of the same method. */
static double bare_us(const hc_path *path, int kind, double value, double *sink)
{
    double best = 1e300;
    hc_seawater_options opt;
    hc_seawater_options_default(&opt);
    opt.reference_temperature_c = 20.0;
    for (int r = 0; r < ROUNDS; r++) {
        double t0 = now_us(), acc = 0.0;
        for (int i = 0; i < N; i++) {
            hc_brine_state s;
            double x = value * (1.0 + 0.01 * ((double)(i % 101) / 100.0 - 0.5));
            if (kind == 0)
                hc_path_state_from_density(path, x, 25.0, 20.0, 145.0, &s);
            else if (kind == 1)
                hc_seawater_state_from_conductivity(x, 25.0, 0.0, &opt, &s);
            else
                hc_path_state_from_conductivity(path, x, 25.0, 20.0, 145.0, NULL, &s);
            acc += s.density_kg_m3;
        }
        double dt = (now_us() - t0) / N;
        best = dt < best ? dt : best;
        *sink += acc;
    }
    return best;
}

int main(void)
{
    setup();
    hs_brine_models *m = NULL;
    if (hs_brine_models_build(&site, &m) != 0) {
        fprintf(stderr, "bench_state_unc: no evaporation path\n");
        return 1;
    }
    const hc_path *path = hs_brine_models_path(m, -1);
    double sink = 0.0;
    put(HS_Q_TEMPERATURE, 25.0);
    double d_eval = eval_us(m, HS_Q_DENSITY, 1200.0, &sink);
    double d_bare = bare_us(path, 0, 1200.0, &sink);
    rd[HS_Q_DENSITY] = (hs_reading){.value = NAN, .quality = HS_QUALITY_BAD};
    double p_eval = eval_us(m, HS_Q_CONDUCTIVITY, 53.0, &sink);
    double p_bare = bare_us(path, 1, 53.0, &sink);
    double b_eval = eval_us(m, HS_Q_CONDUCTIVITY, 240.0, &sink);
    double b_bare = bare_us(path, 2, 240.0, &sink);
    printf("pond state with uncertainty, us per state (bare calc call of the same method):\n");
    printf("  densitometer 1200 kg/m3        %7.2f us  (%.2f us)\n", d_eval, d_bare);
    printf("  PSS-78, 53 mS/cm               %7.2f us  (%.2f us)\n", p_eval, p_bare);
    printf("  brine model, 240 mS/cm         %7.2f us  (%.2f us)\n", b_eval, b_bare);
    printf("  (checksum %g)\n", sink);
    hs_brine_models_free(m);
    return 0;
}
