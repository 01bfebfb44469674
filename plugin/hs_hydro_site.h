/* Hydrology of one configured pond, for the daemon's pipeline: its shape
 * (the stage-storage table loaded, or the floor area and dike slope), local
 * gravity from the site's latitude and elevation, the level from whichever
 * level signal the pond has, and its hydrology tracker (hs_hydro.h).
 *
 * Level signals ([signal POND.QUANTITY], SI units):
 *  - level-pressure [Pa, gauge] at pressure_height above the floor: depth
 *    = p / (rho g) + height, with the pond's own brine density;
 *  - with pressure-upper [Pa] pressure_spacing above it as well: the brine
 *    density rho = dp / (g dz), which may serve as the state's density
 *    source (method "hydrostatic");
 *  - level-distance [m] from distance_height above the floor: depth =
 *    height - distance, no compensation needed.
 *
 * Error convention: 0 on success; -1 with a message in err (or a status)
 * on failure. Memory: an hs_hydro_pond owns its table; close it with
 * hs_hydro_pond_close (safe on a zeroed or closed one). */
#ifndef HS_HYDRO_SITE_H
#define HS_HYDRO_SITE_H

#include <stddef.h>

#include "hs_hydro.h"
#include "hs_site.h"
#include "hs_stage_table.h"

struct hs_hydro_pond {
    struct hs_stage_table table; /* when the pond has stage_storage */
    struct hs_hydro tracker;     /* its shape points into table */
    double g_m_s2;               /* local gravity */
    double pressure_height_m;    /* level-pressure sensor above the floor */
    double pressure_spacing_m;   /* pressure-upper above level-pressure (NaN: none) */
    double distance_height_m;    /* level-distance sensor above the floor (NaN: none) */
};

/* Prepares pond `index` of the site. cfg_extra may be NULL for the
 * defaults of hs_hydro_config_default (its shape is ignored). */
int hs_hydro_pond_open(const hs_site *site, size_t index, const struct hs_hydro_config *cfg_extra,
                       struct hs_hydro_pond *hp, char *err, size_t errlen);
void hs_hydro_pond_close(struct hs_hydro_pond *hp);

/* Readings of one cycle; NaN for a signal the pond lacks or that is bad. */
struct hs_level_inputs {
    double level_pressure_pa;
    double upper_pressure_pa;
    double distance_m;
    double density_kg_m3;    /* the brine's density from the state (for compensation) */
};

struct hs_level_result {
    double depth_m;          /* NaN when no level could be had */
    double pair_density_kg_m3; /* from the two pressures; NaN without them */
    const char *why;         /* when depth is NaN: the reason, for logs */
};

/* Depth and (if the pond has two pressure sensors) density. A pressure
 * level without any density (neither from the pair nor from inputs) gives
 * no depth: reading brine as water would overstate it (by 25 % at SG 1.25). */
void hs_hydro_pond_level(const struct hs_hydro_pond *hp, const struct hs_level_inputs *in,
                         struct hs_level_result *out);

#endif
