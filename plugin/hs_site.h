/* The site model: everything one configuration file describes. Filled by
 * hs_site_load() (hs_config.h) and owned by whoever called it; hs_site_free()
 * releases it. Each section type of the configuration owns its own part of
 * this struct (its arrays and their counts) and releases it in its own file
 * (plugin/hs_conf_*.c). Values are in SI units unless a field says otherwise;
 * durations are milliseconds. Indexes (bus_index, pond_index, ...) are filled
 * by the cross-reference pass and are always valid in a loaded site. */
#ifndef HS_SITE_H
#define HS_SITE_H

#include <limits.h>
#include <stddef.h>
#include <stdint.h>

#include "hp_bus_conf.h"
#include "hp_point.h"

#define HS_NAME_MAX 48
#define HS_PATH_MAX 512
#define HS_UNIT_IDS_MAX 32
#define HS_UNIT_NAME_MAX 16

/* [site] */
typedef struct {
    char name[HS_NAME_MAX];
    char database[HS_PATH_MAX];     /* resolved against the config's folder */
    double latitude_deg;            /* for local gravity */
    double elevation_m;             /* of the pond floors above sea level */
    double reference_temperature_c; /* for specific gravity and degree Baume */
    double baume_modulus;           /* m in deg Be = m (1 - 1/SG) */
    char feed[HS_NAME_MAX];         /* default feed; "" = built-in seawater */
    int feed_index;                 /* into feeds, -1 = built-in seawater */
    int64_t stale_after_ms;         /* default for every bus */
    int64_t raw_retention_ms;       /* raw samples and pond states kept this long */
    int64_t minute_retention_ms;    /* 1-minute rollups kept this long */
    int64_t hour_retention_ms;      /* 1-hour rollups kept this long */
    int64_t commit_interval_ms;     /* samples and states reach the disk this often */
    double store_deadband_pct;      /* raw kept when it moves more than this % ... */
    int64_t store_max_interval_ms;  /* ... or this long after the last kept */
    int64_t full_rate_window_ms;    /* every raw sample kept this long; 0 off */
    double state_deadband_sg;       /* a pond state row kept when SG moved more than this, */
    double state_deadband_level_m;  /* ... or its level more than this, */
    int64_t state_max_interval_ms;  /* ... or this long after the last kept (or stage/quality) */
    int line;                       /* of the [site] header, 0 if absent */
} hs_site_conf;

/* [bus NAME] */
typedef struct {
    char name[HS_NAME_MAX];
    int line;
    hp_bus_conf conf;
    uint8_t unit_ids[HS_UNIT_IDS_MAX]; /* devices on this bus */
    unsigned n_unit_ids;
    int64_t poll_interval_ms;          /* default for its signals */
} hs_bus;

typedef enum {
    HS_ROLE_INTAKE,
    HS_ROLE_CONCENTRATOR,
    HS_ROLE_BRINE_STORE,
    HS_ROLE_CRYSTALLISER,
    HS_ROLE_BITTERN,
    HS_ROLE_COUNT
} hs_role;

/* [pond NAME] */
typedef struct {
    char name[HS_NAME_MAX];
    int line;
    hs_role role;
    char next[HS_NAME_MAX];        /* next pond down the chain, "" = none */
    int next_index;                /* -1 = none */
    char feed[HS_NAME_MAX];        /* "" = the site's feed */
    int feed_index;                /* -1 = built-in seawater */
    double density_in_kg_m3;       /* band: brine should arrive at least this dense */
    double density_out_kg_m3;      /* band: brine leaves when it reaches this */
    double level_min_m;            /* operating depth limits above the floor */
    double level_max_m;
    double freeboard_m;            /* dike crest above the floor (overflow) */
    double floor_area_m2;          /* geometry: floor area ... */
    double side_slope;             /* ... and dike slope, horizontal per vertical */
    char stage_storage[HS_PATH_MAX]; /* or a depth -> volume table (CSV) */
    double pressure_spacing_m;     /* vertical distance of the two pressure sensors */
    double pressure_height_m;      /* level pressure sensor above the floor */
    double distance_height_m;      /* level distance sensor above the floor */
    int64_t manual_reading_max_age_ms; /* a manual reading counts this long */
} hs_pond;

/* Quantities a signal may carry ([signal POND.QUANTITY]). */
typedef enum {
    HS_Q_CONDUCTIVITY,
    HS_Q_TEMPERATURE,
    HS_Q_LEVEL_PRESSURE,   /* hydrostatic pressure at the pond floor (gauge) */
    HS_Q_LEVEL_DISTANCE,   /* sensor-to-surface distance, looking down */
    HS_Q_DENSITY,          /* inline densitometer */
    HS_Q_PRESSURE_UPPER,   /* second pressure, pressure_spacing above the first */
    HS_Q_RAIN,             /* rain gauge, accumulated */
    HS_Q_PUMP_RUN,         /* feedback of the pond's outlet pump, 0/1 */
    HS_Q_PUMP_MANUAL,      /* the outlet pump is in local (manual) control, 0/1 */
    /* Weather at the pond (a site's station may sit at any one pond): the
     * open-water evaporation estimate of `halostage chain` (hc_penman.h). */
    HS_Q_AIR_TEMPERATURE,  /* air temperature [degC] */
    HS_Q_HUMIDITY,         /* relative humidity of the air, fraction [1] */
    HS_Q_WIND_SPEED,       /* wind speed at 2 m [m/s] */
    HS_Q_SOLAR_RADIATION,  /* incoming solar irradiance [W/m2] */
    HS_QUANTITY_COUNT
} hs_quantity;

/* [signal POND.QUANTITY]. The point's index equals the signal's index. */
typedef struct {
    char name[2 * HS_NAME_MAX];
    int line;
    char pond[HS_NAME_MAX];
    int pond_index;
    hs_quantity quantity;
    char bus[HS_NAME_MAX];
    int bus_index;
    hp_point point;                /* register location, encoding, limits */
    char unit[HS_UNIT_NAME_MAX];   /* engineering unit of the decoded value */
    double si_factor;              /* SI value = value * si_factor + si_offset */
    double si_offset;
    double store_deadband;         /* raw kept on a change beyond this (signal unit); NaN: site */
    char accuracy[24];             /* `accuracy` as written; "" = the quantity's default */
    int accuracy_set;              /* parsed into the two below (hs_accuracy.h) */
    double accuracy_abs_si;        /* +- [SI unit] */
    double accuracy_rel;           /* +- fraction of the reading */
    int64_t flatline_after_ms;     /* the same value this long: stuck; 0 = off */
} hs_signal;

/* Major ions of a feed analysis, as the thermodynamics module takes them. */
typedef enum {
    HS_ION_NA, HS_ION_K, HS_ION_MG, HS_ION_CA, HS_ION_SR,
    HS_ION_CL, HS_ION_SO4, HS_ION_HCO3, HS_ION_CO3, HS_ION_BR,
    HS_ION_COUNT
} hs_ion;

/* [feed NAME] */
typedef struct {
    char name[HS_NAME_MAX];
    int line;
    int unit;                      /* 0 = g/kg, 1 = mg/L as written */
    double density_kg_m3;          /* needed to convert mg/L */
    double as_written[HS_ION_COUNT];
    double g_kg[HS_ION_COUNT];     /* grams per kg of feed water (converted) */
    char description[96];
} hs_feed;

struct hs_transfer_conf;
struct hs_mqtt_conf;
struct hs_web_conf;
struct hs_modbus_server_conf;
struct hs_sparkplug_conf;

typedef struct hs_site {
    char path[HS_PATH_MAX];        /* the configuration file as given */
    char dir[HS_PATH_MAX];         /* its folder, for relative paths */
    hs_site_conf site;
    hs_bus *buses;     size_t n_buses;
    hs_pond *ponds;    size_t n_ponds;
    hs_signal *signals; size_t n_signals;
    hs_feed *feeds;    size_t n_feeds;
    struct hs_transfer_conf *transfers; size_t n_transfers; /* hs_conf_transfer.h */
    struct hs_mqtt_conf *mqtt;     /* hs_conf_mqtt.h; NULL without [mqtt] */
    struct hs_alarm_conf *alarms; size_t n_alarms; /* hs_conf_alarm.h */
    struct hs_web_conf *web;       /* hs_conf_web.h; NULL without [web] */
    struct hs_modbus_server_conf *modbus_server; /* hs_conf_scada.h; NULL: off */
    struct hs_sparkplug_conf *sparkplug;         /* hs_conf_scada.h; NULL: off */
    /* Other section types ([mqtt], [alarm NAME], [transfer NAME], ...) add
     * their arrays below, each owned and released by its own file. */
} hs_site;

const char *hs_role_name(hs_role role);
const char *hs_quantity_name(hs_quantity quantity);
int hs_quantity_from_name(const char *name); /* -1 when unknown */
const char *hs_ion_name(hs_ion ion);

/* Index of the named object, or -1. */
int hs_site_bus(const hs_site *site, const char *name);
int hs_site_pond(const hs_site *site, const char *name);
int hs_site_feed(const hs_site *site, const char *name);
/* For messages about a name the file does not have: " (did you mean 'x'?)"
 * when a known name is close enough to be a slip, else " (ponds: a, b, ...)"
 * (or " (the file has no ponds)"). Returns buf. */
const char *hs_site_pond_hint(const hs_site *site, const char *name, char *buf, size_t len);
const char *hs_site_bus_hint(const hs_site *site, const char *name, char *buf, size_t len);
const char *hs_site_feed_hint(const hs_site *site, const char *name, char *buf, size_t len);
const char *hs_site_signal_hint(const hs_site *site, const char *name, char *buf, size_t len);
/* The signal of POND with QUANTITY, or NULL. */
const hs_signal *hs_site_signal(const hs_site *site, int pond_index, hs_quantity quantity);

#endif
