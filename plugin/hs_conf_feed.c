/* [feed NAME]: a site's own feed water as a major-ion analysis, for the
 * thermodynamics module (ponds default to reference seawater without one). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"

typedef hs_feed F;

static const char *const unit_names[] = {"g/kg", "mg/L", NULL};

#define ION(nm, i, req) \
    KEY_DBL(nm, F, as_written[i], NULL, 0, 400000, HS_NO_DEFAULT, req, \
            "concentration in the section's unit")

static const hs_key feed_keys[] = {
    KEY_ENUM("unit", F, unit, unit_names, "g/kg", 0,
             "g/kg (per kg of water sample) or mg/L (then density is needed)"),
    KEY_DBL("density", F, density_kg_m3, &hs_unit_density, 990, 1400, HS_NO_DEFAULT, 0,
            "density of the analysed water, to convert mg/L"),
    KEY_STR("description", F, description, HS_NO_DEFAULT, 0, "free text"),
    ION("na", HS_ION_NA, HS_KEY_REQUIRED), ION("k", HS_ION_K, 0), ION("mg", HS_ION_MG, 0),
    ION("ca", HS_ION_CA, 0), ION("sr", HS_ION_SR, 0), ION("cl", HS_ION_CL, HS_KEY_REQUIRED),
    ION("so4", HS_ION_SO4, 0), ION("hco3", HS_ION_HCO3, 0), ION("co3", HS_ION_CO3, 0),
    ION("br", HS_ION_BR, 0),
    {NULL},
};

const hs_section_type hs_section_feed;

static int feed_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int line = hs_cfg_line(cfg);
    if (strlen(name) >= HS_NAME_MAX || strchr(name, '.')) {
        hs_cfg_error(cfg, line, "feed name '%s' must be shorter than %d characters and "
                     "hold no '.'", name, HS_NAME_MAX);
        return -1;
    }
    int i = hs_cfg_grow((void **)&site->feeds, &site->n_feeds, sizeof site->feeds[0]);
    if (i < 0) {
        hs_cfg_error(cfg, line, "out of memory");
        return -1;
    }
    F *f = &site->feeds[i];
    snprintf(f->name, sizeof f->name, "%s", name);
    f->line = line;
    f->density_kg_m3 = NAN;
    return i;
}

static void *feed_at(hs_site *site, size_t index)
{
    return &site->feeds[index];
}

static void feed_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    F *f = &site->feeds[index];
    double total = 0.0;
    if (f->unit == 1 && isnan(f->density_kg_m3)) {
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_feed, index, "unit"),
                     "[feed %s]: unit mg/L needs the water's density", f->name);
        return;
    }
    for (int i = 0; i < HS_ION_COUNT; i++) {
        /* mg/L / (kg/m3) = (mg/L) / (g/L) = g per kg of water sample. */
        f->g_kg[i] = f->unit == 1 ? f->as_written[i] / f->density_kg_m3 : f->as_written[i];
        total += f->g_kg[i];
    }
    /* Halite saturation is near 360 g/kg dissolved salts; anything above a
     * saturated brine is a typing error (common practice, no source). */
    if (total > 400.0)
        hs_cfg_error(cfg, f->line, "[feed %s]: %.0f g/kg of dissolved ions is more than "
                     "any brine holds; check the unit", f->name, total);
}

static void feed_release(hs_site *site)
{
    free(site->feeds);
    site->feeds = NULL;
    site->n_feeds = 0;
}

const hs_section_type hs_section_feed = {
    .kind = "feed", .named = true, .required = false, .keys = feed_keys,
    .add = feed_add, .at = feed_at, .finish = feed_finish, .release = feed_release,
};
