/* [sparkplug]: the Sparkplug B edge node on the [mqtt] broker (see
 * hs_conf_scada.h). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"
#include "hs_conf_mqtt.h"
#include "hs_conf_scada.h"

typedef hs_sparkplug_conf P;

static const hs_key sparkplug_keys[] = {
    KEY_STR("group_id", P, group_id, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "Sparkplug group: spBv1.0/GROUP/..."),
    KEY_STR("edge_node_id", P, edge_node_id, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "this gateway's edge node id; each pond is a device under it"),
    KEY_STR("primary_host_id", P, primary_host_id, HS_NO_DEFAULT, 0,
            "publish only while this host's spBv1.0/STATE/HOST says online; none = always"),
    KEY_STR("client_id", P, client_id, HS_NO_DEFAULT, 0,
            "MQTT client id of the edge node's own connection; default the [mqtt] client_id "
            "with -spb"),
    {NULL},
};

const hs_section_type hs_section_sparkplug;

static int sp_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    if (site->sparkplug == NULL) {
        site->sparkplug = calloc(1, sizeof *site->sparkplug);
        if (site->sparkplug == NULL) {
            hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
            return -1;
        }
    }
    site->sparkplug->line = hs_cfg_line(cfg);
    return 0;
}

static void *sp_at(hs_site *site, size_t index)
{
    (void)index;
    return site->sparkplug;
}

/* A Sparkplug id is one topic level: no '/', '+', '#' (Sparkplug 3.0 §4.1). */
static void check_id(hs_cfg *cfg, size_t index, const char *key, const char *v)
{
    if (v[0] && strpbrk(v, "/+# ") != NULL)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_sparkplug, index, key),
                     "%s: '%s' must be one topic level (no '/', '+', '#', blanks)", key, v);
}

static void sp_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    P *p = site->sparkplug;
    check_id(cfg, index, "group_id", p->group_id);
    check_id(cfg, index, "edge_node_id", p->edge_node_id);
    check_id(cfg, index, "primary_host_id", p->primary_host_id);
}

static void sp_link(hs_site *site, hs_cfg *cfg)
{
    P *p = site->sparkplug;
    if (p == NULL)
        return;
    if (site->mqtt == NULL) {
        hs_cfg_error(cfg, p->line, "[sparkplug] needs the [mqtt] section (its broker link)");
        return;
    }
    if (!p->client_id[0])
        snprintf(p->client_id, sizeof p->client_id, "%.59s-spb", site->mqtt->client_id);
    if (strcmp(p->client_id, site->mqtt->client_id) == 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_sparkplug, 0, "client_id"),
                     "client_id: must differ from [mqtt] client_id (the broker would drop "
                     "one of the two connections)");
}

static void sp_release(hs_site *site)
{
    free(site->sparkplug);
    site->sparkplug = NULL;
}

const hs_section_type hs_section_sparkplug = {
    .kind = "sparkplug", .named = false, .required = false, .keys = sparkplug_keys,
    .add = sp_add, .at = sp_at, .finish = sp_finish, .link = sp_link, .release = sp_release,
};
