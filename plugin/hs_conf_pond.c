/* [pond NAME]: one pond of the chain, its role, band, limits and geometry. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"
#include "hs_stage_table.h"

typedef hs_pond P;

static const char *const role_names[] = {
    "intake", "concentrator", "brine-store", "crystalliser", "bittern", NULL};

static const hs_key pond_keys[] = {
    KEY_ENUM("role", P, role, role_names, HS_NO_DEFAULT, HS_KEY_REQUIRED,
             "intake, concentrator, brine-store, crystalliser or bittern"),
    KEY_NAME("next", P, next, 0, "the pond its brine moves on to (none for the last)"),
    KEY_NAME("feed", P, feed, 0, "[feed NAME] this pond's brine derives from; default [site] feed"),
    KEY_DBL("density_in", P, density_in_kg_m3, &hs_unit_density_ref, 990, 1450, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "band: brine should arrive at least this dense (at ref. temp.)"),
    KEY_DBL("density_out", P, density_out_kg_m3, &hs_unit_density_ref, 990, 1450, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "band: brine is ready to move on at this density"),
    KEY_DBL("level_min", P, level_min_m, &hs_unit_length, 0, 20, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "lowest operating depth above the floor"),
    KEY_DBL("level_max", P, level_max_m, &hs_unit_length, 0, 20, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "highest operating depth above the floor"),
    KEY_DBL("freeboard", P, freeboard_m, &hs_unit_length, 0, 20, HS_NO_DEFAULT, 0,
            "dike crest above the floor: brine spills over at this depth"),
    KEY_DBL("area", P, floor_area_m2, &hs_unit_area, 1, 1e8, HS_NO_DEFAULT, 0,
            "geometry: floor area (with side_slope), or use stage_storage"),
    KEY_DBL("side_slope", P, side_slope, NULL, 0, 20, "0", 0,
            "dike slope, horizontal run per unit rise (0 = vertical walls)"),
    KEY_PATH("stage_storage", P, stage_storage, HS_NO_DEFAULT, 0,
             "geometry: CSV of depth_m,volume_m3 rows instead of area"),
    KEY_DBL("pressure_spacing", P, pressure_spacing_m, &hs_unit_length, 0.01, 10, HS_NO_DEFAULT,
            0, "vertical distance between level-pressure and pressure-upper sensors"),
    KEY_DBL("pressure_height", P, pressure_height_m, &hs_unit_length, 0, 10, "0 m", 0,
            "level-pressure sensor above the floor"),
    KEY_DBL("distance_height", P, distance_height_m, &hs_unit_length, 0.1, 30, HS_NO_DEFAULT, 0,
            "level-distance sensor above the floor, looking down"),
    KEY_DUR("manual_reading_max_age", P, manual_reading_max_age_ms, 60 * SEC_MS,
            30 * 24 * 3600 * SEC_MS, "12h", HS_KEY_RELOADABLE,
            "an operator's hydrometer reading stands in for weak conductivity this long"),
    {NULL},
};

const hs_section_type hs_section_pond;

static int pond_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int i = hs_cfg_grow((void **)&site->ponds, &site->n_ponds, sizeof site->ponds[0]);
    if (i < 0) {
        hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
        return -1;
    }
    P *p = &site->ponds[i];
    p->line = hs_cfg_line(cfg);
    if (strlen(name) >= sizeof p->name || strchr(name, '.')) {
        hs_cfg_error(cfg, p->line, "pond name '%s' must be shorter than %zu characters "
                     "and hold no '.'", name, sizeof p->name);
        site->n_ponds--;
        return -1;
    }
    snprintf(p->name, sizeof p->name, "%s", name);
    p->next_index = -1;
    p->feed_index = -1;
    p->density_in_kg_m3 = p->density_out_kg_m3 = NAN;
    p->level_min_m = p->level_max_m = p->freeboard_m = NAN;
    p->floor_area_m2 = NAN;
    p->pressure_spacing_m = p->distance_height_m = NAN;
    return i;
}

static void *pond_at(hs_site *site, size_t index)
{
    return &site->ponds[index];
}

static int where(hs_cfg *cfg, size_t index, const char *key)
{
    return hs_cfg_where(cfg, &hs_section_pond, index, key);
}

static void pond_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    P *p = &site->ponds[index];
    if (p->density_in_kg_m3 >= p->density_out_kg_m3)
        hs_cfg_error(cfg, where(cfg, index, "density_out"),
                     "density_out (%g kg/m3) must be above density_in (%g kg/m3)",
                     p->density_out_kg_m3, p->density_in_kg_m3);
    if (p->level_min_m >= p->level_max_m)
        hs_cfg_error(cfg, where(cfg, index, "level_max"),
                     "level_max (%g m) must be above level_min (%g m)",
                     p->level_max_m, p->level_min_m);
    if (p->level_max_m >= p->freeboard_m)
        hs_cfg_error(cfg, where(cfg, index, "level_max"),
                     "level_max (%g m) must be below the freeboard (%g m)",
                     p->level_max_m, p->freeboard_m);
    bool has_area = !isnan(p->floor_area_m2), has_table = p->stage_storage[0] != '\0';
    if (has_area && has_table)
        hs_cfg_error(cfg, where(cfg, index, "stage_storage"),
                     "give either area or stage_storage, not both");
    else if (!has_area && !has_table)
        hs_cfg_error(cfg, p->line, "[pond %s]: needs its geometry: area (with side_slope) "
                     "or stage_storage", p->name);
    if (has_table) {
        FILE *f = fopen(p->stage_storage, "r");
        if (!f) {
            hs_cfg_error(cfg, where(cfg, index, "stage_storage"),
                         "stage_storage: cannot open %s", p->stage_storage);
        } else {
            fclose(f);
            /* The table itself: every defect named by its own file and line
             * (a non-monotone table above all). */
            struct hs_stage_table t;
            char why[HS_DIAG_LEN - 64];
            if (hs_stage_table_load(p->stage_storage, &t, why, sizeof why) != 0)
                hs_cfg_error(cfg, where(cfg, index, "stage_storage"), "stage_storage: %s", why);
            else
                hs_stage_table_free(&t);
        }
    }
    if (hs_cfg_key_line(cfg, &hs_section_pond, index, "side_slope") && !has_area)
        hs_cfg_error(cfg, where(cfg, index, "side_slope"), "side_slope needs area");
}

static void pond_link(hs_site *site, hs_cfg *cfg)
{
    for (size_t i = 0; i < site->n_ponds; i++) {
        P *p = &site->ponds[i];
        if (p->next[0]) {
            p->next_index = hs_site_pond(site, p->next);
            char hint[160];
            if (p->next_index < 0)
                hs_cfg_error(cfg, where(cfg, i, "next"), "next: no [pond %s] in this file%s",
                             p->next, hs_site_pond_hint(site, p->next, hint, sizeof hint));
            else if (p->next_index == (int)i)
                hs_cfg_error(cfg, where(cfg, i, "next"), "next: a pond cannot feed itself");
        }
        if (p->feed[0]) {
            p->feed_index = hs_site_feed(site, p->feed);
            char hint[160];
            if (p->feed_index < 0)
                hs_cfg_error(cfg, where(cfg, i, "feed"), "feed: no [feed %s] in this file%s",
                             p->feed, hs_site_feed_hint(site, p->feed, hint, sizeof hint));
        } else {
            p->feed_index = site->site.feed_index;
        }
    }
    /* The chain runs one way: following next from any pond must end. */
    for (size_t i = 0; i < site->n_ponds; i++) {
        int at = (int)i;
        size_t steps = 0;
        while (at >= 0 && steps <= site->n_ponds) {
            at = site->ponds[at].next_index;
            steps++;
        }
        if (at >= 0) {
            hs_cfg_error(cfg, where(cfg, i, "next"),
                         "next: the chain from [pond %s] loops back on itself",
                         site->ponds[i].name);
            break;
        }
    }
}

static void pond_release(hs_site *site)
{
    free(site->ponds);
    site->ponds = NULL;
    site->n_ponds = 0;
}

const hs_section_type hs_section_pond = {
    .kind = "pond", .named = true, .required = true, .keys = pond_keys,
    .add = pond_add, .at = pond_at, .finish = pond_finish, .link = pond_link,
    .release = pond_release,
};
