/* The layout of a built evaporation path, shared by its builder (hc_path.c)
 * and its readers (hc_path_lookup.c). Nothing outside calc/hc_path*.c uses it. */
#ifndef HC_PATH_PRIVATE_H
#define HC_PATH_PRIVATE_H

#include "hc_path.h"

struct hc_path {
    hc_feed feed;
    double t_c;
    hc_path_mode mode;
    int complete;                       /* reached bischofite */
    hc_path_point *points;              /* owned; count of them, CF increasing */
    size_t count;
    /* Points whose density at t_c exceeds every earlier one (owned). The
     * density dips slightly while kainite forms (the dissolved salts per kg
     * of brine fall); density lookups search only these, so a density maps
     * to the first CF that reaches it. */
    size_t *rising;
    size_t rising_count;
    hc_path_onset onsets[HC_MINERAL_COUNT]; /* sorted by CF */
    size_t onset_count;
    double stage_cf[HC_STAGE_COUNT];    /* NaN when never reached */
    double max_precipitated[HC_MINERAL_COUNT];
};

#endif
