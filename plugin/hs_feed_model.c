/* Feed analyses -> calc feeds and paths; see hs_feed_model.h. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hs_feed_model.h"

hc_status hs_feed_model(const hs_site *site, int feed_index, hc_feed *out)
{
    if (feed_index < 0)
        return hc_feed_seawater(35.0, out);
    if ((size_t)feed_index >= site->n_feeds)
        return HC_ERR_ARGUMENT;
    const hs_feed *f = &site->feeds[feed_index];
    hc_feed_analysis a;
    memset(&a, 0, sizeof a);
    a.unit = f->unit == 1 ? HC_FEED_MG_PER_L : HC_FEED_G_PER_KG;
    a.conc[HC_ION_NA] = f->as_written[HS_ION_NA];
    a.conc[HC_ION_K] = f->as_written[HS_ION_K];
    a.conc[HC_ION_MG] = f->as_written[HS_ION_MG];
    a.conc[HC_ION_CA] = f->as_written[HS_ION_CA];
    a.conc[HC_ION_CL] = f->as_written[HS_ION_CL];
    a.conc[HC_ION_SO4] = f->as_written[HS_ION_SO4];
    a.conc[HC_ION_HCO3] = f->as_written[HS_ION_HCO3];
    a.conc[HC_ION_CO3] = f->as_written[HS_ION_CO3];
    a.br = f->as_written[HS_ION_BR];
    a.sr = f->as_written[HS_ION_SR];
    a.density_kg_m3 = f->density_kg_m3; /* NaN: computed by calc */
    return hc_feed_from_analysis(f->name, &a, out);
}

static hc_path *build(const hs_site *site, int feed_index)
{
    hc_feed feed;
    hc_path *path = NULL;
    if (hs_feed_model(site, feed_index, &feed) != HC_OK)
        return NULL;
    if (hc_path_build(&feed, HS_PATH_TEMPERATURE_C, HC_PATH_FRACTIONAL, &path) != HC_OK)
        return NULL;
    return path;
}

int hs_paths_build(const hs_site *site, hs_paths *paths)
{
    memset(paths, 0, sizeof *paths);
    paths->feeds = calloc(site->n_feeds ? site->n_feeds : 1, sizeof *paths->feeds);
    if (!paths->feeds)
        return -1;
    paths->n_feeds = site->n_feeds;
    for (size_t p = 0; p < site->n_ponds; p++) {
        int fi = site->ponds[p].feed_index;
        if (fi < 0 && !paths->seawater)
            paths->seawater = build(site, -1);
        else if (fi >= 0 && (size_t)fi < site->n_feeds && !paths->feeds[fi])
            paths->feeds[fi] = build(site, fi);
    }
    return 0;
}

const hc_path *hs_paths_for(const hs_paths *paths, int feed_index)
{
    if (feed_index < 0)
        return paths->seawater;
    return (size_t)feed_index < paths->n_feeds ? paths->feeds[feed_index] : NULL;
}

void hs_paths_free(hs_paths *paths)
{
    hc_path_free(paths->seawater);
    for (size_t i = 0; i < paths->n_feeds; i++)
        hc_path_free(paths->feeds[i]);
    free(paths->feeds);
    memset(paths, 0, sizeof *paths);
}
