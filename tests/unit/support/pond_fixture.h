/* A one-pond site for unit tests of the pond state (hs_brine_eval.h): the
 * pond has one signal of every quantity (signal q carries quantity q, SI
 * units), no reading yet (all BAD), built-in seawater as its feed, a
 * reference temperature of 20 degC, Baume modulus 145, latitude 40, a
 * hydrostatic pair 0.5 m apart with its lower sensor 0.1 m above the floor
 * and a level-distance sensor 2 m above it. The caller owns the four
 * objects; the site points into pond and sig. */
#ifndef POND_FIXTURE_H
#define POND_FIXTURE_H

#include "hs_brine_eval.h"

void pond_fixture(hs_site *site, hs_pond *pond, hs_signal sig[HS_QUANTITY_COUNT],
                  hs_reading rd[HS_QUANTITY_COUNT]);

#endif
