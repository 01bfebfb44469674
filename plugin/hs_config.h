/* The configuration reader: one INI file (libinih) into an hs_site.
 *
 * It is table-driven. Each section type ([site], [bus NAME], [pond NAME],
 * [signal POND.QUANTITY], [feed NAME], ...) is one file plugin/hs_conf_*.c
 * holding a table of its keys (hs_key) and a descriptor (hs_section_type);
 * registering a new type is one line in plugin/hs_config_types.c. A key
 * states its name, type, where it is stored, bounds, unit, default, whether
 * it is required and whether a reload may change it, and an optional
 * validator. Cross-references run after the whole file is read, with the
 * line of the referring key.
 *
 * Every problem is reported as "FILE:LINE: what is wrong" (LINE is the line
 * of the key, or of the section header for a missing key). Reading goes on
 * after an error so that one run shows all of them (up to HS_DIAG_MAX).
 *
 * Error convention of this file: functions return 0 on success, -1 on
 * failure with the reasons in an hs_diag. */
#ifndef HS_CONFIG_H
#define HS_CONFIG_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "hs_site.h"

#define HS_DIAG_MAX 40
#define HS_DIAG_LEN 320

/* Collected error messages, each "FILE:LINE: text". Plain data. */
typedef struct {
    unsigned n;           /* messages stored */
    unsigned dropped;     /* further messages not stored */
    char msg[HS_DIAG_MAX][HS_DIAG_LEN];
} hs_diag;

/* Exit status for a bad configuration (sysexits.h EX_CONFIG). */
#define HS_EXIT_CONFIG 78

/* Reads and checks PATH into *site (zeroed first). On success the caller
 * owns *site and frees it with hs_site_free(). On failure *site holds nothing
 * to free and diag says why. Returns 0 or -1. */
int hs_site_load(const char *path, hs_site *site, hs_diag *diag);
void hs_site_free(hs_site *site);

/* Scale of a reference-density value as written. */
typedef enum { HS_DREF_KG_M3, HS_DREF_SG, HS_DREF_BAUME } hs_dref_scale;
/* Parses a hs_unit_density_ref value: *v in kg/m3 for HS_DREF_KG_M3, else
 * the SG or degree Baume as written. 0, or -1 with a reason. */
int hs_parse_density_ref(const char *text, double *v, hs_dref_scale *scale, char *msg,
                         size_t len);
/* SG or degree Baume -> kg/m3 at t_ref: rho = SG rho_w(t_ref), SG = m / (m -
 * Be). 0, or -1 with a reason. */
int hs_density_ref_to_kg_m3(double v, hs_dref_scale scale, double t_ref_c, double modulus,
                            double *kg_m3, char *msg, size_t len);

/* ---- For section types (plugin/hs_conf_*.c) ---- */

typedef struct hs_cfg hs_cfg; /* the reader's state during one load */

/* A unit a quantity may be written in: SI = value * factor + offset. */
typedef struct {
    const char *name;
    double factor;
    double offset;
} hs_unit;

/* A physical kind: its accepted units (the first is the SI unit that the
 * stored value uses) and whether a bare number (in the first unit) is
 * allowed. */
typedef struct {
    const char *what;       /* "length", for messages */
    const hs_unit *units;   /* terminated by {NULL} */
    bool bare_ok;
} hs_unit_kind;

/* hs_unit_density_ref: a density at the site's reference temperature, the
 * way brine masters write bands and triggers: kg/m3 (g/cm3, g/mL), SG
 * ("1.210 SG", t_ref/t_ref) or degree Baume ("25.5 Be", the site's
 * baume_modulus). SG and Be are converted to kg/m3 once [site] is known;
 * a bare number is refused as ambiguous. */
extern const hs_unit_kind hs_unit_density_ref;
extern const hs_unit_kind hs_unit_length, hs_unit_area, hs_unit_density,
    hs_unit_temperature, hs_unit_angle, hs_unit_pressure, hs_unit_conductivity,
    hs_unit_rain, hs_unit_state, hs_unit_humidity, hs_unit_speed, hs_unit_irradiance;

typedef enum {
    HS_KT_STRING,     /* char[size] */
    HS_KT_PATH,       /* char[size], resolved against the config's folder */
    HS_KT_NAME,       /* char[size]: a name of another section (checked by link) */
    HS_KT_INT,        /* long, bounds min..max */
    HS_KT_INT32,      /* int, bounds min..max */
    HS_KT_UINT,       /* unsigned, bounds min..max */
    HS_KT_UINT8,      /* uint8_t, bounds min..max within 0..255 */
    HS_KT_UINT16,     /* uint16_t, bounds min..max within 0..65535 */
    HS_KT_DOUBLE,     /* double, with unit kind (or none), bounds in SI */
    HS_KT_DURATION,   /* int64_t milliseconds: 500ms, 10s, 5min, 6h, 2d */
    HS_KT_BOOL,       /* bool: yes/no, true/false, on/off, 1/0 */
    HS_KT_ENUM,       /* int index into names[] */
    HS_KT_UNIT_LIST,  /* uint8_t[size] + unsigned count: "1,2,5-7" */
    HS_KT_DOUBLE_LIST /* double[size] + unsigned count */
} hs_key_type;

enum {
    HS_KEY_REQUIRED   = 1u << 0,
    HS_KEY_RELOADABLE = 1u << 1, /* a reload may change it without restart */
};

typedef struct hs_key {
    const char *name;
    hs_key_type type;
    size_t offset;              /* of the value in the section's object */
    size_t size;                /* strings: buffer size; lists: capacity */
    size_t count_offset;        /* lists: offset of the unsigned count */
    double min, max;            /* bounds (SI, ms or integer), when min < max */
    const hs_unit_kind *unit;   /* HS_KT_DOUBLE: NULL = plain number */
    const char *const *names;   /* HS_KT_ENUM: NULL-terminated */
    const char *def;            /* default as it would be written, or NULL */
    unsigned flags;             /* HS_KEY_* */
    /* Extra check of the parsed value; writes a message and returns -1 when
     * the value is wrong. obj is the section's object. */
    int (*check)(const void *obj, char *msg, size_t len);
    const char *help;           /* one line, for the reference file */
} hs_key;

typedef struct hs_section_type {
    const char *kind;           /* "bus" for [bus NAME] */
    bool named;                 /* [bus NAME] (true) or [site] (false) */
    bool required;              /* the file must have at least one */
    const hs_key *keys;         /* terminated by {NULL} */
    /* Adds a zeroed object for a new section and returns its index, or -1
     * after reporting with hs_cfg_error(). name is NULL for unnamed types. */
    int (*add)(hs_site *site, hs_cfg *cfg, const char *name);
    void *(*at)(hs_site *site, size_t index);
    /* After the whole file: checks of one object that involve several keys
     * (may be NULL). */
    void (*finish)(hs_site *site, hs_cfg *cfg, size_t index);
    /* After every finish: references to other sections (may be NULL). */
    void (*link)(hs_site *site, hs_cfg *cfg);
    /* Frees this type's part of the site (may be NULL). */
    void (*release)(hs_site *site);
} hs_section_type;

/* The registered section types, NULL-terminated (hs_config_types.c). */
extern const hs_section_type *const hs_section_types[];

/* Reports "FILE:LINE: text". line 0 means the file as a whole. */
void hs_cfg_error(hs_cfg *cfg, int line, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
/* Line of the section header being read (for add()). */
int hs_cfg_line(const hs_cfg *cfg);
/* Line where KEY of object INDEX of TYPE was set, or 0 if it was not set. */
int hs_cfg_key_line(const hs_cfg *cfg, const hs_section_type *type, size_t index,
                    const char *key);
/* Like hs_cfg_key_line, falling back to the section header's line. */
int hs_cfg_where(const hs_cfg *cfg, const hs_section_type *type, size_t index,
                 const char *key);

/* Grows *array (of elem bytes, *count used) by one zeroed element; returns
 * its index or -1 when out of memory. */
int hs_cfg_grow(void **array, size_t *count, size_t elem);

/* Value parsers shared with the CLI (hs_config_value.c). Return 0 or -1 with
 * a reason in msg. */
int hs_parse_double(const char *text, double *out, char *msg, size_t len);
int hs_parse_quantity(const char *text, const hs_unit_kind *kind, double *si,
                      char *msg, size_t len);
int hs_parse_duration_ms(const char *text, int64_t *ms, char *msg, size_t len);
int hs_parse_long(const char *text, long *out, char *msg, size_t len);
int hs_parse_bool(const char *text, bool *out, char *msg, size_t len);
/* Finds unit NAME in KIND; NULL when KIND does not have it. */
const hs_unit *hs_unit_find(const hs_unit_kind *kind, const char *name);

#endif
