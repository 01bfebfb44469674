/* Invented evaporation curve for hydrology tests (see the header). */
#include "hydro_demo_curve.h"

#include <math.h>

#define ROWS 40
static double cf_v[ROWS], rho_v[ROWS], s_v[ROWS], dep_v[ROWS], aw_v[ROWS];
static hc_brine_curve demo = {ROWS, cf_v, rho_v, s_v, dep_v, aw_v};

const hc_brine_curve *hydro_demo_curve(void)
{
    for (int i = 0; i < ROWS; i++) {
        double cf = exp(log(40.0) * i / (ROWS - 1));
        double s = 0.0363 * cf, sat = 0.357;
        double past = s > sat ? log(cf * 0.0363 / sat) / log(40 * 0.0363 / sat) : 0;
        if (s > sat)
            s = sat;
        double w = s / (1 + s);
        cf_v[i] = cf;
        rho_v[i] = 1000 * (1 + 0.75 * w) + 35 * past;
        s_v[i] = s;
        dep_v[i] = i == 0 ? 0 : 0.0363 - s / cf;
        aw_v[i] = (1 - 0.95 * w) - 0.2 * past;
    }
    return &demo;
}
