/* Mineral-brine equilibrium at fixed temperature: given what is dissolved
 * before precipitation (moles of each ion and kg of water), find the amount
 * of each mineral that must precipitate (or redissolve) so that every mineral
 * present is saturated (SI = 0) and every other one is undersaturated.
 *
 * Method: damped Newton on SI_m(n) = 0 for the minerals present, with a
 * finite-difference Jacobian, a step limit that keeps every dissolved amount
 * and the water positive, and a backtracking line search on |SI|^2; an outer
 * loop adds the most supersaturated mineral and drops any whose amount turns
 * negative (the phase assemblage). Converged when every |SI| < 1e-10.
 * Error convention: hc_status (HC_OK = 0). Pure, no allocation. */
#ifndef HC_EQUILIBRIUM_H
#define HC_EQUILIBRIUM_H

#include "hc_ion.h"
#include "hc_mineral.h"
#include "hc_minerals.h"
#include "hc_pitzer.h"
#include "hc_status.h"

typedef struct {
    double molality[HC_ION_COUNT];   /* free ions [mol/kg water] */
    double total[HC_ION_COUNT];      /* totals (hc_carbonate.h convention) [mol/kg water] */
    hc_carbonate_result carbonate;   /* pH and carbonate species; pH NaN without alkalinity */
    double water_kg;                 /* liquid water left [kg] */
    double saturation_index[HC_MINERAL_COUNT];
    hc_pitzer_result pitzer;
    int iterations;                  /* Newton iterations used, all assemblages */
} hc_equilibrium;

/* base_mol[]: moles of each ion available [mol]; base_water_kg: water
 * available [kg]. present[] (in: a guess, out: the assemblage) and n[] (in:
 * a guess, out: amounts precipitated [mol], 0 for minerals not present).
 * Only minerals enabled in `set` can be present; n >= 0 always.
 * Carbonate: when `set` is open to CO2 and the base carries alkalinity
 * (HCO3 + 2 CO3), HCO3 and CO3 count together as alkalinity (the split
 * given does not matter), the brine is speciated at the set's pCO2 for
 * every evaluation, and CaCO3 takes 2 eq of alkalinity per mole.
 * HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_NO_CONVERGENCE, HC_ERR_DOMAIN
 * (the water would be used up), else HC_OK. */
hc_status hc_equilibrate(const hc_pitzer_params *pitzer, const hc_mineral_set *set,
                         const double base_mol[HC_ION_COUNT], double base_water_kg,
                         unsigned char present[HC_MINERAL_COUNT], double n[HC_MINERAL_COUNT],
                         hc_equilibrium *out);

#endif
