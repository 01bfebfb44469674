/* Speed of the seawater calc: ns per PSS-78 evaluation and ns per full
 * seawater-range state (PSS-78 + EOS-80 twice + SG + Baume + CF).
 * Inputs vary across the valid range so nothing is constant-folded; the
 * best of several rounds is reported (least disturbed by other processes).
 * `bench_calc --pss78-ns` prints only the PSS-78 figure (for the gsw
 * comparison in bench_pss78_vs_gsw.sh). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hc_pss78.h"
#include "hc_seawater.h"

#define N 200000
#define ROUNDS 7

static double now_ns(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec * 1e9 + ts.tv_nsec;
}

static double cond[N], temp[N], pres[N];

static void fill_inputs(void)
{
    /* A fixed linear congruential sequence: reproducible, no libc state. */
    unsigned long x = 12345;
    for (int i = 0; i < N; i++) {
        x = x * 6364136223846793005ul + 1442695040888963407ul;
        double u = (double)(x >> 11) / 9007199254740992.0;
        x = x * 6364136223846793005ul + 1442695040888963407ul;
        double v = (double)(x >> 11) / 9007199254740992.0;
        temp[i] = -2.0 + 42.0 * v;
        pres[i] = (i % 4 == 0) ? 0.0 : 5.0 * u;
        /* S_P uniform in 1..42, as conductivity at that temperature */
        if (hc_pss78_c_from_sp(1.0 + 41.0 * u, temp[i], pres[i], &cond[i]) != HC_OK) {
            fprintf(stderr, "bench_calc: could not set up inputs\n");
            exit(1);
        }
    }
}

static double bench_pss78(double *sink)
{
    double best = 1e300;
    for (int r = 0; r < ROUNDS; r++) {
        double acc = 0.0, t0 = now_ns();
        for (int i = 0; i < N; i++) {
            double sp = 0.0;
            if (hc_pss78_sp_from_c(cond[i], temp[i], pres[i], &sp, NULL) == HC_OK)
                acc += sp;
        }
        double dt = (now_ns() - t0) / N;
        if (dt < best)
            best = dt;
        *sink += acc;
    }
    return best;
}

static double bench_state(double *sink, int *failures)
{
    double best = 1e300;
    hc_seawater_options opt;
    hc_seawater_options_default(&opt);
    for (int r = 0; r < ROUNDS; r++) {
        double acc = 0.0, t0 = now_ns();
        for (int i = 0; i < N; i++) {
            hc_brine_state st;
            if (hc_seawater_state_from_conductivity(cond[i], temp[i], pres[i], &opt, &st) == HC_OK)
                acc += st.baume;
            else
                (*failures)++;
        }
        double dt = (now_ns() - t0) / N;
        if (dt < best)
            best = dt;
        *sink += acc;
    }
    return best;
}

int main(int argc, char **argv)
{
    double sink = 0.0;
    int failures = 0;
    fill_inputs();
    if (argc > 1 && strcmp(argv[1], "--pss78-ns") == 0) {
        printf("%.2f\n", bench_pss78(&sink));
        return sink == 0.0; /* sink used so the loop is kept */
    }
    double pss = bench_pss78(&sink);
    double state = bench_state(&sink, &failures);
    printf("pss78 (conductivity -> S_P):       %8.1f ns per evaluation (%d values, best of %d)\n",
           pss, N, ROUNDS);
    printf("seawater state (S_P, rho, SG, Be):  %8.1f ns per state\n", state);
    if (failures > 0 || sink == 0.0) {
        fprintf(stderr, "bench_calc: %d inputs failed\n", failures);
        return 1;
    }
    return 0;
}
