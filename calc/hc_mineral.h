/* Minerals of the Na-K-Mg-Ca-Cl-SO4(-CO3)-H2O system that the brine model
 * knows (names as mineralogy uses them; equilibria after Harvie, Moller &
 * Weare 1984). The chemistry (formulas, log K) lives in the thermodynamics
 * module; this header is only the shared list, so that states can carry one
 * saturation index per mineral without allocation. */
#ifndef HC_MINERAL_H
#define HC_MINERAL_H

typedef enum {
    HC_MIN_CALCITE,
    HC_MIN_ARAGONITE,
    HC_MIN_GYPSUM,
    HC_MIN_ANHYDRITE,
    HC_MIN_HALITE,
    HC_MIN_GLAUBERITE,
    HC_MIN_POLYHALITE,
    HC_MIN_MIRABILITE,
    HC_MIN_THENARDITE,
    HC_MIN_EPSOMITE,
    HC_MIN_HEXAHYDRITE,
    HC_MIN_KIESERITE,
    HC_MIN_BLOEDITE,
    HC_MIN_SYLVITE,
    HC_MIN_CARNALLITE,
    HC_MIN_KAINITE,
    HC_MIN_LEONITE,
    HC_MIN_SCHOENITE,
    HC_MIN_SYNGENITE,
    HC_MIN_ARCANITE,
    HC_MIN_GLASERITE,
    HC_MIN_BISCHOFITE,
    HC_MINERAL_COUNT
} hc_mineral;

/* Lower-case mineral name ("halite"), or NULL for an invalid value. */
const char *hc_mineral_name(hc_mineral mineral);
/* Inverse of hc_mineral_name; -1 when the name is unknown. */
int hc_mineral_from_name(const char *name);

#endif
