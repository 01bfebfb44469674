/* Feed water of an evaporation path: the major-ion composition that enters
 * the first pond, in mol per kg of water, for the Na-K-Mg-Ca-Cl-SO4 model.
 *
 * Default: reference seawater (Millero et al. 2008, Deep-Sea Res. I 55, 50,
 * Table 4) scaled to a practical salinity. A site can give its own
 * major-ion analysis in g/kg of solution or mg/L.
 * Lumping (the usual one for this model): Br counts as Cl and Sr as Ca, mole
 * for mole. HCO3 and CO3 are kept: their sum HCO3 + 2 CO3 is the carbonate
 * alkalinity that the path conserves (hc_carbonate.h). Electroneutrality
 * is then restored with Cl and the adjustment is reported.
 * Error convention: hc_status (HC_OK = 0). Pure. */
#ifndef HC_FEED_H
#define HC_FEED_H

#include "hc_ion.h"
#include "hc_status.h"

typedef enum {
    HC_FEED_G_PER_KG, /* grams per kg of solution */
    HC_FEED_MG_PER_L, /* milligrams per litre of solution (needs the density) */
} hc_feed_unit;

/* A laboratory's analysis. Unused species are 0. */
typedef struct {
    hc_feed_unit unit;
    double conc[HC_ION_COUNT]; /* Na, K, Mg, Ca, Cl, SO4, HCO3, CO3 in `unit` */
    double br;                 /* bromide, in `unit` */
    double sr;                 /* strontium, in `unit` */
    double density_kg_m3;      /* solution density for mg/L; NaN: computed from the composition */
} hc_feed_analysis;

typedef struct {
    char name[32];
    double molality[HC_ION_COUNT]; /* model composition [mol/kg water] */
    double water_mass_fraction;    /* kg water per kg feed solution [1] */
    double practical_salinity;     /* PSS-78 of a seawater feed; NaN for an analysis */
    double carbonate_alkalinity;   /* HCO3 + 2 CO3 [eq/kg water] */
    double imbalance_eq;           /* charge imbalance of the analysis as given [eq/kg water] */
    double imbalance_percent;      /* 100 * imbalance / (sum of cation equivalents) */
    double chloride_adjustment;    /* Cl added (negative: removed) to balance [mol/kg water] */
} hc_feed;

/* Reference seawater at practical salinity sp (2..42) named "seawater".
 * HC_ERR_NOT_FINITE, HC_ERR_SALINITY_RANGE, else HC_OK. */
hc_status hc_feed_seawater(double sp, hc_feed *out);

/* A site analysis named `name` (truncated to 31 characters).
 * HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_ARGUMENT (no ions, or a unit
 * that does not exist), HC_ERR_DOMAIN (balancing would need negative Cl, or
 * more than 60 % solids), else HC_OK. */
hc_status hc_feed_from_analysis(const char *name, const hc_feed_analysis *a, hc_feed *out);

#endif
