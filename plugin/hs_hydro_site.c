/* Hydrology of a configured pond (see hs_hydro_site.h). */
#include "hs_hydro_site.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hc_level.h"

/* A prism's crest when the pond states neither freeboard nor level_max [m]:
 * it only bounds levels, so generous (common practice, no source). */
#define DEFAULT_CREST_M 5.0

/* Error convention: 0 / -1 with err (see header). */
int hs_hydro_pond_open(const hs_site *site, size_t index, const struct hs_hydro_config *cfg_extra,
                       struct hs_hydro_pond *hp, char *err, size_t errlen)
{
    memset(hp, 0, sizeof *hp);
    if (site == NULL || index >= site->n_ponds) {
        snprintf(err, errlen, "no such pond");
        return -1;
    }
    const hs_pond *p = &site->ponds[index];
    struct hs_hydro_config cfg;
    if (cfg_extra != NULL)
        cfg = *cfg_extra;
    else
        hs_hydro_config_default(&cfg);
    cfg.crystalliser = p->role == HS_ROLE_CRYSTALLISER;
    if (p->stage_storage[0] != '\0') {
        if (hs_stage_table_load(p->stage_storage, &hp->table, err, errlen) != 0)
            return -1;
        cfg.shape.is_table = 1;
        cfg.shape.table = hp->table.view;
    } else if (isfinite(p->floor_area_m2)) {
        double crest = isfinite(p->freeboard_m)   ? p->freeboard_m
                       : isfinite(p->level_max_m) ? p->level_max_m
                                                  : DEFAULT_CREST_M;
        cfg.shape.is_table = 0;
        cfg.shape.prism = (hc_prism){p->floor_area_m2, 0, p->side_slope, crest};
    } else {
        snprintf(err, errlen, "%s:%d: [pond %s]: no geometry (area or stage_storage)", site->path,
                 p->line, p->name);
        return -1;
    }
    if (hs_hydro_init(&hp->tracker, &cfg) != 0) {
        snprintf(err, errlen, "%s:%d: [pond %s]: unusable geometry or hydrology settings",
                 site->path, p->line, p->name);
        hs_hydro_pond_close(hp);
        return -1;
    }
    double lat = isfinite(site->site.latitude_deg) ? site->site.latitude_deg : 45.0;
    double elev = isfinite(site->site.elevation_m) ? site->site.elevation_m : 0.0;
    if (hc_gravity(lat, elev, &hp->g_m_s2) != HC_OK)
        hp->g_m_s2 = HC_STANDARD_GRAVITY;
    hp->pressure_height_m = isfinite(p->pressure_height_m) ? p->pressure_height_m : 0;
    hp->pressure_spacing_m = p->pressure_spacing_m;
    hp->distance_height_m = p->distance_height_m;
    return 0;
}

void hs_hydro_pond_close(struct hs_hydro_pond *hp)
{
    if (hp != NULL)
        hs_stage_table_free(&hp->table);
}

void hs_hydro_pond_level(const struct hs_hydro_pond *hp, const struct hs_level_inputs *in,
                         struct hs_level_result *out)
{
    out->depth_m = NAN;
    out->pair_density_kg_m3 = NAN;
    out->why = NULL;
    double rho_pair;
    if (isfinite(hp->pressure_spacing_m) && isfinite(in->level_pressure_pa) &&
        isfinite(in->upper_pressure_pa) &&
        hc_density_from_pressure_pair(in->level_pressure_pa, in->upper_pressure_pa,
                                      hp->pressure_spacing_m, hp->g_m_s2, &rho_pair) == HC_OK)
        out->pair_density_kg_m3 = rho_pair;
    if (isfinite(in->level_pressure_pa)) {
        double rho = isfinite(out->pair_density_kg_m3) ? out->pair_density_kg_m3
                                                       : in->density_kg_m3;
        if (!isfinite(rho)) {
            out->why = "pressure level needs the brine density, which is unknown";
            return;
        }
        double d;
        hc_status st = hc_depth_from_pressure(in->level_pressure_pa, rho, hp->g_m_s2,
                                              hp->pressure_height_m, &d);
        if (st == HC_OK)
            out->depth_m = d;
        else
            out->why = st == HC_ERR_DOMAIN ? "level pressure sensor is out of the water"
                                           : "level pressure unusable";
        return;
    }
    if (isfinite(in->distance_m) && isfinite(hp->distance_height_m)) {
        double d;
        hc_status st = hc_depth_from_distance(in->distance_m, hp->distance_height_m, &d);
        if (st == HC_OK)
            out->depth_m = d;
        else
            out->why = "distance to the surface is beyond the pond floor";
        return;
    }
    out->why = "no level signal";
}
