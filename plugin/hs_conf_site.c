/* [site]: the site as a whole. */
#include <string.h>

#include "hs_conf_keys.h"

typedef hs_site_conf S;

static const hs_key site_keys[] = {
    KEY_STR("name", S, name, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "the site's name, used in MQTT topics (letters, digits, '-', '_')"),
    KEY_PATH("database", S, database, "halostage.db", 0,
             "SQLite history file; a relative path is taken from the config's folder"),
    KEY_DBL("latitude", S, latitude_deg, &hs_unit_angle, -90, 90, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "latitude in degrees north, for local gravity"),
    KEY_DBL("elevation", S, elevation_m, &hs_unit_length, -500, 5000, "0 m", 0,
            "pond floors above sea level"),
    KEY_DBL("reference_temperature", S, reference_temperature_c, &hs_unit_temperature, 0, 40,
            "20 C", HS_KEY_RELOADABLE,
            "specific gravity and degree Baume are given at this temperature"),
    KEY_DBL("baume_modulus", S, baume_modulus, NULL, 100, 200, "145", HS_KEY_RELOADABLE,
            "m in deg Be = m (1 - 1/SG): 145 US, 144.3 rational, 146.78 Gerlach"),
    KEY_NAME("feed", S, feed, 0, "default [feed NAME] of every pond; none = reference seawater"),
    KEY_DUR("stale_after", S, stale_after_ms, 1 * SEC_MS, 86400 * SEC_MS, "60s",
            HS_KEY_RELOADABLE, "a value not read good for this long becomes stale"),
    KEY_DUR("raw_retention", S, raw_retention_ms, 86400 * SEC_MS, 3650.0 * 86400 * SEC_MS, "30d",
            HS_KEY_RELOADABLE, "raw samples and pond states older than this are deleted"),
    KEY_DUR("minute_retention", S, minute_retention_ms, 86400 * SEC_MS, 3650.0 * 86400 * SEC_MS,
            "35d", HS_KEY_RELOADABLE, "1-minute rollups older than this are deleted (35 days: "
            "a month of fine trends; the hourly ones keep the years, and the whole history "
            "of the demo site stays under 1 GB)"),
    KEY_DUR("hour_retention", S, hour_retention_ms, 86400 * SEC_MS, 36500.0 * 86400 * SEC_MS,
            "3650d", HS_KEY_RELOADABLE, "1-hour rollups older than this are deleted"),
    KEY_DUR("commit_interval", S, commit_interval_ms, 1 * SEC_MS, 3600 * SEC_MS, "5min",
            HS_KEY_RELOADABLE, "samples and pond states are written to disk in one batch this "
            "often (alarms, commands and messages at once); a power cut loses at most this"),
    KEY_DBL("store_deadband", S, store_deadband_pct, NULL, 0, 100, "0.5", HS_KEY_RELOADABLE,
            "a raw sample is kept when it moved more than this percent of the last kept value "
            "(each sample still counts in the rollups)"),
    KEY_DUR("store_max_interval", S, store_max_interval_ms, 1 * SEC_MS, 86400 * SEC_MS, "15min",
            HS_KEY_RELOADABLE, "... or when this long has passed since the last kept one"),
    KEY_DUR("full_rate_window", S, full_rate_window_ms, 0, 30 * 86400 * SEC_MS, "0s",
            HS_KEY_RELOADABLE, "every raw sample is kept this long, then only the kept ones "
            "(0: off)"),
    KEY_DBL("state_deadband_sg", S, state_deadband_sg, NULL, 0, 0.1, "0.0005", HS_KEY_RELOADABLE,
            "a pond state row is kept when its specific gravity (at the reference temperature) "
            "moved more than this since the last kept row (every state still counts in the "
            "rollups)"),
    KEY_DBL("state_deadband_level", S, state_deadband_level_m, &hs_unit_length, 0, 1, "5 mm",
            HS_KEY_RELOADABLE, "... or its level moved more than this"),
    KEY_DUR("state_max_interval", S, state_max_interval_ms, 1 * SEC_MS, 86400 * SEC_MS, "3min",
            HS_KEY_RELOADABLE, "... or its stage or quality changed, or this long passed since "
            "the last kept row"),
    {NULL},
};

const hs_section_type hs_section_site;

static int site_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    memset(&site->site, 0, sizeof site->site);
    site->site.feed_index = -1;
    site->site.line = hs_cfg_line(cfg);
    return 0;
}

static void *site_at(hs_site *site, size_t index)
{
    (void)index;
    return &site->site;
}

static bool name_ok(const char *s)
{
    for (; *s; s++)
        if (!((*s >= 'a' && *s <= 'z') || (*s >= 'A' && *s <= 'Z') ||
              (*s >= '0' && *s <= '9') || *s == '-' || *s == '_'))
            return false;
    return true;
}

static void site_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    /* Rollups are what remains of the raw history once it is deleted: a
     * coarser series kept shorter than a finer one would leave a hole. */
    const hs_site_conf *s = &site->site;
    if (s->minute_retention_ms < s->raw_retention_ms)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_site, index, "minute_retention"),
                     "minute_retention: shorter than raw_retention; 1-minute rollups must be "
                     "kept at least as long as the raw samples");
    if (s->hour_retention_ms < s->minute_retention_ms)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_site, index, "hour_retention"),
                     "hour_retention: shorter than minute_retention; 1-hour rollups must be "
                     "kept at least as long as the 1-minute rollups");
    /* The name becomes an MQTT topic level: no '/', '+', '#' or blanks. */
    if (site->site.name[0] && !name_ok(site->site.name))
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_site, index, "name"),
                     "name: '%s' may hold only letters, digits, '-' and '_'",
                     site->site.name);
}

static void site_link(hs_site *site, hs_cfg *cfg)
{
    if (site->site.feed[0]) {
        site->site.feed_index = hs_site_feed(site, site->site.feed);
        char hint[160];
        if (site->site.feed_index < 0)
            hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_site, 0, "feed"),
                         "feed: no [feed %s] in this file%s", site->site.feed,
                         hs_site_feed_hint(site, site->site.feed, hint, sizeof hint));
    }
}

const hs_section_type hs_section_site = {
    .kind = "site", .named = false, .required = true, .keys = site_keys,
    .add = site_add, .at = site_at, .finish = site_finish, .link = site_link,
};
