/* [modbus_server]: the read-only Modbus TCP map (see hs_conf_scada.h). */
#include <stdio.h>
#include <stdlib.h>

#include "hs_conf_keys.h"
#include "hs_conf_scada.h"
#include "hs_scada_map.h"

typedef hs_modbus_server_conf S;

const char *const hs_word_order_names[] = {"big", "little", NULL};

static const hs_key modbus_server_keys[] = {
    KEY_STR("listen", S, listen, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "ADDRESS:PORT to serve the map on, numeric (127.0.0.1:1502, [::1]:1502, "
            "0.0.0.0:502)"),
    KEY_U8("unit_id", S, unit_id, 0, 247, "1", 0,
           "unit id the server answers to; 0 answers any"),
    KEY_ENUM("word_order", S, word_order, hs_word_order_names, "big", 0,
             "32-bit values: big = high word first, little = low word first (bytes in a "
             "register are always big endian)"),
    KEY_STR("allow", S, allow, HS_NO_DEFAULT, 0,
            "client addresses allowed, comma separated, ADDRESS or ADDRESS/PREFIX; "
            "none = every client"),
    KEY_UINT("max_clients", S, max_clients, 1, 64, "8", 0,
             "connections served at once; one more is accepted and closed"),
    KEY_DUR("idle_timeout", S, idle_timeout_ms, 1000, 86400000, "60s", 0,
            "a connection without a request for this long is closed"),
    {NULL},
};

const hs_section_type hs_section_modbus_server;

static int ms_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    if (site->modbus_server == NULL) {
        site->modbus_server = calloc(1, sizeof *site->modbus_server);
        if (site->modbus_server == NULL) {
            hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
            return -1;
        }
    }
    site->modbus_server->line = hs_cfg_line(cfg);
    return 0;
}

static void *ms_at(hs_site *site, size_t index)
{
    (void)index;
    return site->modbus_server;
}

static void ms_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    S *s = site->modbus_server;
    struct sockaddr_storage addr;
    socklen_t len;
    char why[200];
    if (s->listen[0] && hp_listen_parse(s->listen, &addr, &len, why, sizeof why) != 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_modbus_server, index, "listen"),
                     "listen: %s", why);
    if (hp_acl_parse(s->allow, &s->acl, why, sizeof why) != 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_modbus_server, index, "allow"),
                     "allow: %s", why);
}

static void ms_link(hs_site *site, hs_cfg *cfg)
{
    char why[160];
    if (site->modbus_server != NULL && hs_scada_map_fits(site, why, sizeof why) != 0)
        hs_cfg_error(cfg, site->modbus_server->line, "[modbus_server]: %s", why);
}

static void ms_release(hs_site *site)
{
    free(site->modbus_server);
    site->modbus_server = NULL;
}

const hs_section_type hs_section_modbus_server = {
    .kind = "modbus_server", .named = false, .required = false, .keys = modbus_server_keys,
    .add = ms_add, .at = ms_at, .finish = ms_finish, .link = ms_link, .release = ms_release,
};
