/* [modbus_server] and [sparkplug]: the two SCADA interfaces, each off unless
 * its section is present (site->modbus_server / site->sparkplug NULL).
 * Read by plugin/hs_conf_modbus_server.c and plugin/hs_conf_sparkplug.c. */
#ifndef HS_CONF_SCADA_H
#define HS_CONF_SCADA_H

#include <stdint.h>

#include "hp_netacl.h"
#include "hs_site.h"

typedef struct hs_modbus_server_conf {
    int line;
    char listen[80];          /* ADDRESS:PORT, numeric */
    uint8_t unit_id;          /* 0: answer any unit id */
    int word_order;           /* 0 big (high word first), 1 little */
    char allow[512];          /* allow-list as written; "" everyone */
    hp_acl acl;               /* parsed from allow */
    unsigned max_clients;
    int64_t idle_timeout_ms;
} hs_modbus_server_conf;

typedef struct hs_sparkplug_conf {
    int line;
    char group_id[64];
    char edge_node_id[64];
    char primary_host_id[64]; /* "": publish without waiting for a host */
    char client_id[64];       /* of the second MQTT connection; default <mqtt client_id>-spb */
} hs_sparkplug_conf;

extern const char *const hs_word_order_names[];

#endif
