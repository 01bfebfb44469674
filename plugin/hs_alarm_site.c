/* Built-in alarm rules of a site (see hs_alarm_site.h). */
#include "hs_alarm_site.h"

#include <math.h>
#include <stdio.h>

void hs_alarm_site_add_rule(hs_alarm_engine *eng, const char *pond, hs_rule_kind kind,
                            const char *name, double low, double high)
{
    hs_alarm_rule r;
    hs_alarm_rule_default(&r, kind);
    snprintf(r.name, sizeof r.name, "%s", name);
    if (!isnan(low))
        r.low = low;
    if (!isnan(high))
        r.high = high;
    if (hs_alarm_rule_check(&r) != NULL)
        return; /* a limit the pond does not have */
    hs_alarm_add(eng, &r, pond);
}

static void add_rule(hs_alarm_engine *eng, const char *pond, hs_rule_kind kind,
                     const char *name, double low, double high)
{
    hs_alarm_site_add_rule(eng, pond, kind, name, low, high);
}

void hs_alarm_site_rules(const hs_site *site, hs_alarm_engine *eng)
{
    for (size_t i = 0; i < site->n_ponds; i++) {
        const hs_pond *p = &site->ponds[i];
        add_rule(eng, p->name, HS_RULE_LEVEL_HIGH, "level-high", NAN, p->level_max_m);
        add_rule(eng, p->name, HS_RULE_LEVEL_LOW, "level-low", p->level_min_m, NAN);
        if (isfinite(p->freeboard_m))
            /* 5 cm below the dike crest: spill is imminent (common practice,
             * no source) */
            add_rule(eng, p->name, HS_RULE_LEVEL_HIGH_HIGH, "level-high-high", NAN,
                     p->freeboard_m - 0.05);
        add_rule(eng, p->name, HS_RULE_DENSITY_BAND, "density-band", p->density_in_kg_m3, NAN);
        add_rule(eng, p->name, HS_RULE_SENSOR_STALE, "sensor-stale", NAN, NAN);
        add_rule(eng, p->name, HS_RULE_BUS_DOWN, "bus-down", NAN, NAN);
        add_rule(eng, p->name, HS_RULE_SENSOR_STUCK, "sensor-stuck", NAN, NAN);
        add_rule(eng, p->name, HS_RULE_DENSITY_FALL, "density-fall", NAN, NAN);
        if (p->role == HS_ROLE_INTAKE || p->role == HS_ROLE_CONCENTRATOR)
            add_rule(eng, p->name, HS_RULE_NEAR_SATURATION, "near-saturation", NAN, NAN);
        if (p->role == HS_ROLE_CRYSTALLISER) {
            add_rule(eng, p->name, HS_RULE_GYPSUM_IN_FEED, "gypsum-in-feed", NAN, NAN);
            add_rule(eng, p->name, HS_RULE_BITTERN_LIMIT, "bittern-limit", NAN, NAN);
        }
    }
}

