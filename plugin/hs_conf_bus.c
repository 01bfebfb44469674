/* [bus NAME]: one field bus, a Modbus TCP device (or serial gateway) or an
 * RTU line. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"

typedef hs_bus B;

static const char *const kind_names[] = {"tcp", "rtu", NULL};
static const char *const parity_names[] = {"none", "even", "odd", NULL};

static int baud_check(const void *obj, char *msg, size_t len)
{
    const B *b = obj;
    if (hp_baud_valid(b->conf.baud))
        return 0;
    snprintf(msg, len, "%d is not a supported baud rate (1200, 2400, 4800, 9600, 19200, "
             "38400, 57600, 115200, 230400)", b->conf.baud);
    return -1;
}

static const hs_key bus_keys[] = {
    KEY_ENUM("type", B, conf.kind, kind_names, HS_NO_DEFAULT, HS_KEY_REQUIRED,
             "tcp (a device or a serial gateway) or rtu (a local serial line)"),
    KEY_STR("host", B, conf.host, HS_NO_DEFAULT, 0, "tcp: address of the device or gateway"),
    /* Port 502 is Modbus TCP's registered port (Modbus Messaging on TCP/IP
     * Implementation Guide v1.0b §4.1). */
    KEY_INT32("port", B, conf.port, 1, 65535, "502", 0, "tcp: port"),
    KEY_STR("device", B, conf.device, HS_NO_DEFAULT, 0, "rtu: serial device, e.g. /dev/ttyUSB0"),
    {.name = "baud", .type = HS_KT_INT32, .offset = offsetof(B, conf.baud), .def = "19200",
     .check = baud_check, .help = "rtu: line speed"},
    /* Even parity is the Modbus serial default (Modbus over Serial Line v1.02 §2.5.1). */
    KEY_ENUM("parity", B, conf.parity, parity_names, "even", 0, "rtu: none, even or odd"),
    KEY_INT32("data_bits", B, conf.data_bits, 7, 8, "8", 0, "rtu: 8 for RTU framing"),
    KEY_INT32("stop_bits", B, conf.stop_bits, 1, 2, "1", 0, "rtu: 1, or 2 without parity"),
    KEY_BOOL("rs485", B, conf.rs485, "no", 0, "rtu: ask the driver for RS-485 mode"),
    {.name = "unit_ids", .type = HS_KT_UNIT_LIST, .offset = offsetof(B, unit_ids),
     .size = HS_UNIT_IDS_MAX, .count_offset = offsetof(B, n_unit_ids), .min = 1, .max = 255,
     .def = "1", .help = "devices on this bus, e.g. 1,2,5-7 (first is the signals' default)"},
    KEY_DUR("response_timeout", B, conf.response_timeout_ms, 10, 30 * SEC_MS, "500ms", 0,
            "wait this long for a reply (also the TCP connect timeout)"),
    KEY_DUR("byte_timeout", B, conf.byte_timeout_ms, 1, 10 * SEC_MS, "500ms", 0,
            "gap allowed between the bytes of one reply"),
    KEY_UINT("retries", B, conf.retries, 0, 10, "1", 0, "extra attempts before comm-fail"),
    KEY_DUR("backoff_min", B, conf.backoff_min_ms, 10, 3600 * SEC_MS, "1s", 0,
            "first reconnect delay after a failure (then doubling, with jitter)"),
    KEY_DUR("backoff_max", B, conf.backoff_max_ms, 10, 3600 * SEC_MS, "60s", 0,
            "longest reconnect delay"),
    KEY_UINT("max_gap", B, conf.max_gap, 0, 124, "8", 0,
             "unused registers one read may span to save a transaction"),
    /* Modbus Application Protocol v1.1b §6.3/§6.4: 125 registers per read. */
    KEY_UINT("max_registers", B, conf.max_registers, 1, HP_MAX_READ_REGISTERS, "125", 0,
             "registers per read (some devices take fewer than the protocol's 125)"),
    KEY_DUR("poll_interval", B, poll_interval_ms, 100, 86400 * SEC_MS, "10s", HS_KEY_RELOADABLE,
            "default poll interval of this bus's signals"),
    KEY_DUR("probe_interval", B, conf.probe_interval_ms, 1 * SEC_MS, 3600 * SEC_MS, "30s", 0,
            "a device (unit id) that stopped answering is asked only this often"),
    KEY_DUR("stale_after", B, conf.stale_after_ms, 1 * SEC_MS, 86400 * SEC_MS, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "overrides [site] stale_after for this bus"),
    {NULL},
};

const hs_section_type hs_section_bus;

static int bus_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int i = hs_cfg_grow((void **)&site->buses, &site->n_buses, sizeof site->buses[0]);
    if (i < 0) {
        hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
        return -1;
    }
    B *b = &site->buses[i];
    snprintf(b->name, sizeof b->name, "%s", name);
    b->line = hs_cfg_line(cfg);
    if (strlen(name) >= sizeof b->name) {
        hs_cfg_error(cfg, b->line, "bus name longer than %zu characters", sizeof b->name - 1);
        site->n_buses--;
        return -1;
    }
    return i;
}

static void *bus_at(hs_site *site, size_t index)
{
    return &site->buses[index];
}

static void misplaced(hs_cfg *cfg, size_t index, const char *const *keys, const char *kind)
{
    for (size_t k = 0; keys[k]; k++) {
        int line = hs_cfg_key_line(cfg, &hs_section_bus, index, keys[k]);
        if (line)
            hs_cfg_error(cfg, line, "%s: applies only to %s buses", keys[k], kind);
    }
}

static void bus_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    static const char *const tcp_only[] = {"host", "port", NULL};
    static const char *const rtu_only[] = {"device", "baud", "parity", "data_bits",
                                           "stop_bits", "rs485", NULL};
    B *b = &site->buses[index];
    if (b->conf.kind == HP_BUS_TCP) {
        misplaced(cfg, index, rtu_only, "rtu");
        if (!b->conf.host[0])
            hs_cfg_error(cfg, b->line, "[bus %s]: a tcp bus needs 'host'", b->name);
    } else {
        misplaced(cfg, index, tcp_only, "tcp");
        if (!b->conf.device[0])
            hs_cfg_error(cfg, b->line, "[bus %s]: an rtu bus needs 'device'", b->name);
        for (unsigned i = 0; i < b->n_unit_ids; i++)
            if (b->unit_ids[i] > 247)
                hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_bus, index, "unit_ids"),
                             "unit_ids: %u is above 247, the last serial address "
                             "(Modbus over Serial Line v1.02 §2.2)", b->unit_ids[i]);
    }
    if (b->conf.backoff_min_ms > b->conf.backoff_max_ms)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_bus, index, "backoff_min"),
                     "backoff_min is longer than backoff_max");
    if (b->conf.stale_after_ms == 0)
        b->conf.stale_after_ms = site->site.stale_after_ms;
}

static void bus_release(hs_site *site)
{
    free(site->buses);
    site->buses = NULL;
    site->n_buses = 0;
}

const hs_section_type hs_section_bus = {
    .kind = "bus", .named = true, .required = true, .keys = bus_keys,
    .add = bus_add, .at = bus_at, .finish = bus_finish, .release = bus_release,
};
