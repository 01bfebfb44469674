/* The evaporation paths of a site's feeds, for pond states beyond the
 * seawater range: the [feed NAME] analyses (or reference seawater) turned
 * into calc's hc_feed and built into hc_path once. Owned by the caller of
 * hs_paths_build; hs_paths_free releases them. */
#ifndef HS_FEED_MODEL_H
#define HS_FEED_MODEL_H

#include "hc_feed.h"
#include "hc_path.h"
#include "hs_site.h"

/* Temperature of the path models: HMW84's Pitzer parameters are for 25 C. */
#define HS_PATH_TEMPERATURE_C 25.0

typedef struct {
    hc_path *seawater;   /* reference seawater, S_P 35; NULL if it failed */
    hc_path **feeds;     /* per site feed; NULL entries failed */
    size_t n_feeds;
} hs_paths;

/* The feed of site feed index i (-1: reference seawater at S_P 35). */
hc_status hs_feed_model(const hs_site *site, int feed_index, hc_feed *out);
/* Builds the paths of the feeds that ponds use. Returns 0, or -1 when out of
 * memory; a feed whose path fails is left NULL (states then stay within the
 * seawater range). */
int hs_paths_build(const hs_site *site, hs_paths *paths);
/* The path for a feed index (-1 = seawater), or NULL. */
const hc_path *hs_paths_for(const hs_paths *paths, int feed_index);
void hs_paths_free(hs_paths *paths);

#endif
