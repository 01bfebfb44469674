/* An invented seawater-like evaporation curve for hydrology unit tests
 * (demo numbers, no source): salt per kg water s = 0.0363 CF until s
 * reaches 0.357 (about 6.1 mol/kg NaCl), then constant while halite
 * deposits; rho ~ 1000 (1 + 0.75 w) + up to 35 kg/m3 of bittern rise;
 * a_w = 1 - 0.95 w, falling further to 0.55 at CF 40. CF 1 to 40. */
#ifndef HYDRO_DEMO_CURVE_H
#define HYDRO_DEMO_CURVE_H

#include "hc_brine_curve.h"

/* Fills a static table once and returns it (not thread-safe; tests only). */
const hc_brine_curve *hydro_demo_curve(void);

#endif
