/* [signal POND.QUANTITY]: where one pond quantity is read and how it is
 * encoded. The point (register location and encoding) is what the protocol
 * layer reads; the rest ties it to the pond. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_accuracy.h"
#include "hs_conf_keys.h"
#include "hs_plausible.h"

typedef hs_signal G;

static const char *const table_names[] = {"holding", "input", NULL};
static const char *const type_names[] = {
    "int16", "uint16", "int32", "uint32", "float32", "float64", NULL};
static const char *const order_names[] = {"big", "little", NULL};

static int scale_check(const void *obj, char *msg, size_t len)
{
    const G *g = obj;
    if (g->point.scale != 0.0)
        return 0;
    snprintf(msg, len, "a scale of 0 would make every reading 'offset'");
    return -1;
}

static const hs_key signal_keys[] = {
    KEY_NAME("bus", G, bus, HS_KEY_REQUIRED, "the [bus NAME] this signal is read on"),
    KEY_U8("unit_id", G, point.unit_id, 1, 255, HS_NO_DEFAULT, 0,
             "device on the bus; default the bus's first unit id"),
    KEY_ENUM("table", G, point.table, table_names, "holding", 0,
             "holding (function 0x03) or input (function 0x04) registers"),
    KEY_U16("address", G, point.address, 0, 65535, HS_NO_DEFAULT, HS_KEY_REQUIRED,
             "zero-based register address as sent on the wire"),
    KEY_ENUM("type", G, point.type, type_names, HS_NO_DEFAULT, HS_KEY_REQUIRED,
             "int16, uint16, int32, uint32, float32 or float64"),
    KEY_ENUM("byte_order", G, point.byte_order, order_names, "big", 0,
             "bytes within a register: big (Modbus standard) or little"),
    KEY_ENUM("word_order", G, point.word_order, order_names, "big", 0,
             "registers of a 32/64-bit value: big (high word first) or little"),
    {.name = "scale", .type = HS_KT_DOUBLE, .offset = offsetof(G, point.scale), .def = "1",
     .check = scale_check, .help = "value = raw * scale + offset"},
    KEY_DBL("offset", G, point.offset, NULL, 0, 0, "0", 0, "added after scaling"),
    KEY_STR("unit", G, unit, HS_NO_DEFAULT, 0,
            "engineering unit of value (e.g. mS/cm, C, kPa, m, kg/m3, mm, state)"),
    KEY_DBL("valid_min", G, point.valid_min, NULL, 0, 0, HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "values below are out-of-range (in unit)"),
    KEY_DBL("valid_max", G, point.valid_max, NULL, 0, 0, HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "values above are out-of-range (in unit)"),
    {.name = "sentinels", .type = HS_KT_DOUBLE_LIST, .offset = offsetof(G, point.sentinels),
     .size = HP_SENTINEL_MAX, .count_offset = offsetof(G, point.n_sentinels),
     .flags = HS_KEY_RELOADABLE,
     .help = "raw values the device sends for 'no reading', e.g. -32768, 65535"},
    KEY_STR("accuracy", G, accuracy, HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "the instrument's +-limit: N in the signal's unit, or N% of the reading; "
            "default from the quantity's usual instrument class (hs_accuracy.h)"),
    KEY_DUR("flatline_after", G, flatline_after_ms, 0, 30 * 86400 * SEC_MS, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "exactly the same value this long means a stuck sensor "
            "(0 = off); default 4h for conductivity and temperature, else off"),
    KEY_DUR("poll_interval", G, point.interval_ms, 100, 86400 * SEC_MS, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "default: the bus's poll_interval"),
    KEY_DBL("store_deadband", G, store_deadband, NULL, 0, 1e9, HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "raw sample kept when it moved more than this (signal unit); default: [site] "
            "store_deadband percent"),
    {NULL},
};

const hs_section_type hs_section_signal;

static int signal_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int line = hs_cfg_line(cfg);
    const char *dot = strchr(name, '.');
    if (!dot || strchr(dot + 1, '.') || dot == name) {
        hs_cfg_error(cfg, line, "signal name '%s' must be POND.QUANTITY", name);
        return -1;
    }
    int q = hs_quantity_from_name(dot + 1);
    if (q < 0) {
        hs_cfg_error(cfg, line, "unknown quantity '%s' (use conductivity, temperature, "
                     "level-pressure, level-distance, density, pressure-upper, rain, "
                     "pump-run, pump-manual, air-temperature, humidity, wind-speed, "
                     "solar-radiation)", dot + 1);
        return -1;
    }
    int i = hs_cfg_grow((void **)&site->signals, &site->n_signals, sizeof site->signals[0]);
    if (i < 0) {
        hs_cfg_error(cfg, line, "out of memory");
        return -1;
    }
    G *g = &site->signals[i];
    snprintf(g->name, sizeof g->name, "%s", name);
    snprintf(g->pond, sizeof g->pond, "%.*s", (int)(dot - name), name);
    g->line = line;
    g->quantity = (hs_quantity)q;
    g->pond_index = g->bus_index = -1;
    g->point.valid_min = -INFINITY;
    g->point.valid_max = INFINITY;
    g->store_deadband = NAN; /* the [site] percent */
    return i;
}

static void *signal_at(hs_site *site, size_t index)
{
    return &site->signals[index];
}

static int where(hs_cfg *cfg, size_t index, const char *key)
{
    return hs_cfg_where(cfg, &hs_section_signal, index, key);
}

static const hs_unit_kind *kind_of(hs_quantity q)
{
    switch (q) {
    case HS_Q_CONDUCTIVITY: return &hs_unit_conductivity;
    case HS_Q_TEMPERATURE: return &hs_unit_temperature;
    case HS_Q_LEVEL_PRESSURE:
    case HS_Q_PRESSURE_UPPER: return &hs_unit_pressure;
    case HS_Q_LEVEL_DISTANCE: return &hs_unit_length;
    case HS_Q_DENSITY: return &hs_unit_density;
    case HS_Q_RAIN: return &hs_unit_rain;
    case HS_Q_AIR_TEMPERATURE: return &hs_unit_temperature;
    case HS_Q_HUMIDITY: return &hs_unit_humidity;
    case HS_Q_WIND_SPEED: return &hs_unit_speed;
    case HS_Q_SOLAR_RADIATION: return &hs_unit_irradiance;
    default: return &hs_unit_state;
    }
}

static void signal_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    G *g = &site->signals[index];
    const hs_unit_kind *kind = kind_of(g->quantity);
    if (!g->unit[0]) {
        if (g->quantity == HS_Q_PUMP_RUN || g->quantity == HS_Q_PUMP_MANUAL)
            snprintf(g->unit, sizeof g->unit, "state");
        else
            hs_cfg_error(cfg, g->line, "[signal %s]: missing required key 'unit' (%s)",
                         g->name, kind->what);
    }
    if (g->unit[0]) {
        const hs_unit *u = hs_unit_find(kind, g->unit);
        if (!u) {
            char names[160] = "";
            size_t used = 0;
            for (const hs_unit *k = kind->units; k->name; k++) {
                int n = snprintf(names + used, sizeof names - used, "%s%s",
                                 used ? ", " : "", k->name);
                if (n > 0 && (size_t)n < sizeof names - used)
                    used += (size_t)n;
            }
            hs_cfg_error(cfg, where(cfg, index, "unit"),
                         "unit: '%s' is not a unit of %s (use %s)", g->unit, kind->what, names);
        } else {
            g->si_factor = u->factor;
            g->si_offset = u->offset;
        }
    }
    if (g->accuracy[0]) {
        char why[160];
        if (hs_accuracy_parse(g->accuracy, g->si_factor != 0.0 ? g->si_factor : 1.0,
                              &g->accuracy_abs_si, &g->accuracy_rel, why, sizeof why) < 0)
            hs_cfg_error(cfg, where(cfg, index, "accuracy"), "accuracy: %s", why);
        else
            g->accuracy_set = 1;
    }
    /* A live analyser's reading moves in its last digits within hours; a
     * frozen one repeats itself (common practice, no source). */
    if (!hs_cfg_key_line(cfg, &hs_section_signal, index, "flatline_after") &&
        (g->quantity == HS_Q_CONDUCTIVITY || g->quantity == HS_Q_TEMPERATURE))
        g->flatline_after_ms = 4 * 3600 * 1000LL;
    if (g->point.valid_min >= g->point.valid_max)
        hs_cfg_error(cfg, where(cfg, index, "valid_max"),
                     "valid_max (%g) must be above valid_min (%g)",
                     g->point.valid_max, g->point.valid_min);
    unsigned n = hp_type_registers(g->point.type);
    if ((unsigned long)g->point.address + n > 65536u)
        hs_cfg_error(cfg, where(cfg, index, "address"),
                     "address: a %s at %u runs past register 65535",
                     hp_type_name(g->point.type), g->point.address);
}

/* Checks that no two signals share a register of the same device table. */
static void check_overlaps(hs_site *site, hs_cfg *cfg)
{
    for (size_t i = 0; i < site->n_signals; i++) {
        const G *a = &site->signals[i];
        unsigned a0 = a->point.address, a1 = a0 + hp_type_registers(a->point.type) - 1;
        for (size_t j = 0; j < i; j++) {
            const G *b = &site->signals[j];
            if (b->bus_index != a->bus_index || a->bus_index < 0 ||
                b->point.unit_id != a->point.unit_id || b->point.table != a->point.table)
                continue;
            unsigned b0 = b->point.address, b1 = b0 + hp_type_registers(b->point.type) - 1;
            if (a0 <= b1 && b0 <= a1) {
                hs_cfg_error(cfg, where(cfg, i, "address"),
                             "address: registers %u-%u of [signal %s] overlap registers "
                             "%u-%u of [signal %s] (line %d) on bus %s unit %u %s",
                             a0, a1, a->name, b0, b1, b->name, b->line, a->bus,
                             a->point.unit_id, hp_table_name(a->point.table));
                break;
            }
        }
    }
}

static void signal_link(hs_site *site, hs_cfg *cfg)
{
    for (size_t i = 0; i < site->n_signals; i++) {
        G *g = &site->signals[i];
        char hint[160];
        g->pond_index = hs_site_pond(site, g->pond);
        if (g->pond_index < 0)
            hs_cfg_error(cfg, g->line, "[signal %s]: no [pond %s] in this file%s",
                         g->name, g->pond, hs_site_pond_hint(site, g->pond, hint, sizeof hint));
        g->bus_index = hs_site_bus(site, g->bus);
        if (g->bus_index < 0) {
            if (g->bus[0])
                hs_cfg_error(cfg, where(cfg, i, "bus"), "bus: no [bus %s] in this file%s",
                             g->bus, hs_site_bus_hint(site, g->bus, hint, sizeof hint));
            continue;
        }
        const hs_bus *b = &site->buses[g->bus_index];
        if (!hs_cfg_key_line(cfg, &hs_section_signal, i, "unit_id")) {
            g->point.unit_id = b->n_unit_ids ? b->unit_ids[0] : 1;
        } else {
            bool listed = false;
            for (unsigned u = 0; u < b->n_unit_ids; u++)
                listed = listed || b->unit_ids[u] == g->point.unit_id;
            if (!listed)
                hs_cfg_error(cfg, where(cfg, i, "unit_id"),
                             "unit_id: %u is not in unit_ids of [bus %s]",
                             g->point.unit_id, b->name);
        }
        if (g->point.interval_ms == 0)
            g->point.interval_ms = b->poll_interval_ms;
        if (g->pond_index < 0)
            continue;
        const hs_pond *p = &site->ponds[g->pond_index];
        if (g->quantity == HS_Q_PRESSURE_UPPER) {
            if (isnan(p->pressure_spacing_m))
                hs_cfg_error(cfg, g->line, "[signal %s]: [pond %s] needs pressure_spacing "
                             "for a pressure-upper signal", g->name, p->name);
            if (!hs_site_signal(site, g->pond_index, HS_Q_LEVEL_PRESSURE))
                hs_cfg_error(cfg, g->line, "[signal %s]: needs [signal %s.level-pressure] "
                             "as the lower sensor", g->name, p->name);
        }
        if (g->quantity == HS_Q_LEVEL_DISTANCE && isnan(p->distance_height_m))
            hs_cfg_error(cfg, g->line, "[signal %s]: [pond %s] needs distance_height for "
                         "a level-distance signal", g->name, p->name);
        double lo_user = g->point.valid_min, hi_user = g->point.valid_max;
        if (hs_plausible_narrow(g, p) != 0) {
            double lo, hi;
            hs_plausible_limits(g->quantity, p, &lo, &hi);
            hs_cfg_error(cfg, where(cfg, i, isfinite(lo_user) ? "valid_min" : "valid_max"),
                         "[signal %s]: valid_min %g .. valid_max %g %s lies outside what the "
                         "sensor can plausibly read (%g .. %g in SI units)", g->name, lo_user,
                         hi_user, g->unit, lo, hi);
        }
    }
    check_overlaps(site, cfg);
}

static void signal_release(hs_site *site)
{
    free(site->signals);
    site->signals = NULL;
    site->n_signals = 0;
}

const hs_section_type hs_section_signal = {
    .kind = "signal", .named = true, .required = false, .keys = signal_keys,
    .add = signal_add, .at = signal_at, .finish = signal_finish, .link = signal_link,
    .release = signal_release,
};
