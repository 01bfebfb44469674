/* Physical plausibility: the values a pond sensor can possibly read. A
 * sample outside them is out-of-range whatever the site file says; a
 * signal's valid_min/valid_max can only narrow them. The limits are wide on
 * purpose: they catch dead loops, unscaled registers and garbage (a
 * densitometer at 0 or 500 kg/m3, 1981 degC, a depth of kilometres), never
 * an unusual but real brine. All are common practice, no source; the
 * README's "Plausibility limits" lists them with the reasoning.
 *
 *   conductivity       0 .. 300 mS/cm  (saturated brines stay below ~250)
 *   temperature      -10 .. 70 degC    (a brine pond in air; sun-heated
 *                                       bittern stays below ~60)
 *   density          990 .. 1400 kg/m3 (warm fresh water .. past bischofite)
 *   level-pressure,  depth above the sensor from 0.2 m below the floor to
 *   pressure-upper   0.5 m above the dike crest (freeboard; else level_max
 *                    + 0.5 m; else 5 m), at 1000..1400 kg/m3 under g_n
 *   level-distance   0 .. distance_height + 0.2 m (the floor, a little below)
 *   rain             0 .. 100 m accumulated (a totaliser)
 *   pump-run, pump-manual  0 .. 1 (states)
 *
 * Pure functions of the site; no allocation. */
#ifndef HS_PLAUSIBLE_H
#define HS_PLAUSIBLE_H

#include "hs_site.h"

/* Built-in limits of quantity q in pond p (NULL: no geometry known) [SI
 * unit of the quantity: mS/cm, degC, kg/m3, Pa, m, m, state]. */
void hs_plausible_limits(hs_quantity q, const hs_pond *p, double *lo_si, double *hi_si);

/* Narrows g->point.valid_min/valid_max (in the signal's unit) to the
 * built-in limits. Returns 0, or -1 when nothing is left between them (the
 * site's own limits lie outside the plausible range). */
int hs_plausible_narrow(hs_signal *g, const hs_pond *p);

#endif
