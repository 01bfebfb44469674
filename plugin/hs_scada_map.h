/* The points a SCADA sees of a site: one table that both outward SCADA
 * interfaces map from, the Modbus register map (hs_mb_image.h, printed by
 * `halostage map`) and the Sparkplug B metrics (hs_sparkplug.h). Values come
 * from the pond-state document by key, so a field the document gains reaches
 * both once it has a row here.
 *
 * Register layout (map version HS_MAP_VERSION; holding and input registers
 * hold the same map, addresses 0-based as on the wire):
 *   site block       0 ..  99
 *   transfer j     100 + 8 j   (j < 112), 8 registers each
 *   pond i        1000 + 100 i (i < 640, in the order of the configuration)
 * Inside a pond block, for the k-th number of hs_scada_pond_points:
 *   float32 at offset 2 k (two registers, word order as configured, bytes
 *   big endian in each register), and a scaled int16 copy at 50 + k:
 *   raw = round(value x scale), saturated, -32768 when unknown. An unknown
 *   float32 is NaN. Codes (uint16) from offset 40 (hs_scada_codes below).
 *
 * Codes: stage 0 unknown, 1 seawater, 2 carbonate, 3 gypsum, 4 halite,
 * 5 magnesium-sulfate, 6 potash, 7 bischofite; quality 0 good, 1 uncertain,
 * 2 stale, 3 bad; advice 0 idle, 1 run, 2 blocked, 3 wait, 65535 none yet.
 * Alarm bits: bit k set while an alarm of rule kind k (hs_rule_kind) is
 * active. All tables here are constant; nothing is allocated. */
#ifndef HS_SCADA_MAP_H
#define HS_SCADA_MAP_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <jansson.h>

#include "hs_site.h"

#define HS_MAP_VERSION 1
#define HS_MAP_SITE_BASE 0
#define HS_MAP_TRANSFER_BASE 100
#define HS_MAP_TRANSFER_SIZE 8
#define HS_MAP_TRANSFER_MAX 112
#define HS_MAP_POND_BASE 1000
#define HS_MAP_POND_SIZE 100
#define HS_MAP_POND_MAX 640
#define HS_MAP_INT16_OFFSET 50
#define HS_MAP_CODE_OFFSET 40
#define HS_MAP_INT16_UNKNOWN (-32768)

/* A number of the pond-state document. */
typedef struct {
    const char *name;     /* register and metric name */
    const char *key;      /* where the document has it: "baume", "days_to_target.low" */
    const char *unit;     /* "kg/m3", "degBe", "degC", "m", "m3", "d", "g/kg", "1" */
    double scale;         /* int16 copy: raw = value x scale */
    double deadband;      /* Sparkplug: a change smaller than this is no change */
} hs_scada_number;

extern const hs_scada_number hs_scada_pond_points[];
extern const size_t hs_scada_pond_n_points;

/* Codes of a pond block, in register order from HS_MAP_CODE_OFFSET. */
typedef enum {
    HS_CODE_STAGE,        /* document "stage" */
    HS_CODE_NEXT_STAGE,   /* document "next_stage" */
    HS_CODE_QUALITY,      /* document "quality" */
    HS_CODE_ALARM_BITS,   /* from the alarm engine */
    HS_CODE_METHOD,       /* document "method", hc_method order, 0 none */
    HS_CODE_LEVEL_QUALITY,/* document "level_quality" */
    HS_CODE_TIME_HI,      /* state time, uint32 seconds since the epoch, 2 registers */
    HS_CODE_TIME_LO,
    HS_CODE_COUNT
} hs_scada_code;

/* One pond's values taken from its document (plain data). */
typedef struct {
    double number[16];    /* per hs_scada_pond_points; NaN unknown */
    uint16_t code[HS_CODE_COUNT - 2];
    uint32_t time_s;      /* of the state, 0 unknown */
    int have;             /* a document has arrived */
} hs_scada_pond;

/* One transfer's advice. */
typedef struct {
    uint16_t advice;      /* 0 idle 1 run 2 blocked 3 wait; 65535 none yet */
    uint16_t pump_on;     /* 0 / 1 */
    uint32_t reasons;     /* HS_XR_* bits */
} hs_scada_transfer;

/* Fills p from a pond-state document (borrowed); alarm bits are set apart.
 * Numbers are taken with the digits the document publishes them with
 * (hs_doc_digits), so every outlet shows the same value. */
void hs_scada_pond_from_doc(hs_scada_pond *p, const json_t *doc);
void hs_scada_pond_clear(hs_scada_pond *p);

/* Code of a stage name (0 unknown), of a quality name (3 bad when unknown),
 * of a method name (0 none). */
uint16_t hs_scada_stage_code(const char *name);
uint16_t hs_scada_quality_code(const char *name);
uint16_t hs_scada_method_code(const char *name);
const char *hs_scada_code_name(hs_scada_code c);

/* int16 copy of a number. */
int16_t hs_scada_scaled(double value, double scale);

/* Prints the site's map: "address,name,type,unit,scale" lines (csv) or an
 * aligned table. Returns 0, -1 when the site has more ponds or transfers
 * than the layout holds (err says which). */
int hs_scada_map_print(FILE *out, const hs_site *site, const char *word_order, int csv,
                       char *err, size_t errlen);
/* -1 when the site does not fit the layout, with the reason in err. */
int hs_scada_map_fits(const hs_site *site, char *err, size_t errlen);

#endif
