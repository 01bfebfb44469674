/* The SCADA point table and the printed register map (hs_scada_map.h). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hc_state.h"
#include "hs_alarm.h"
#include "hs_conf_transfer.h"
#include "hs_pond_doc.h"
#include "hs_scada_map.h"
#include "hs_store.h"

/* Deadbands are a tenth of what a brine master reads off a hydrometer or a
 * level staff (common practice, no source). Order = register order: never
 * reorder, only append (the map version says so otherwise). */
const hs_scada_number hs_scada_pond_points[] = {
    {"density_ref_kg_m3", "density_ref_kg_m3", "kg/m3", 10, 0.05},
    {"specific_gravity", "specific_gravity", "1", 10000, 0.00005},
    {"baume", "baume", "degBe", 100, 0.01},
    {"temperature_c", "temperature_c", "degC", 100, 0.05},
    {"density_kg_m3", "density_kg_m3", "kg/m3", 10, 0.05},
    {"concentration_factor", "concentration_factor", "1", 100, 0.01},
    {"next_stage_density_ref_kg_m3", "next_stage_density_ref_kg_m3", "kg/m3", 10, 0.05},
    {"depth_m", "depth_m", "m", 1000, 0.001},
    {"volume_m3", "volume_m3", "m3", 0.1, 1.0},
    {"days_to_target_low", "days_to_target.low", "d", 10, 0.05},
    {"days_to_target_high", "days_to_target.high", "d", 10, 0.05},
    {"days_to_next_stage", "days_to_next_stage.expected", "d", 10, 0.05},
    {"salinity_g_kg", "salinity_g_kg", "g/kg", 10, 0.05},
    {"density_uncertainty_kg_m3", "density_uncertainty_kg_m3", "kg/m3", 100, 0.01},
    {"days_to_target_expected", "days_to_target.expected", "d", 10, 0.05},
};
const size_t hs_scada_pond_n_points = sizeof hs_scada_pond_points / sizeof hs_scada_pond_points[0];

_Static_assert(sizeof hs_scada_pond_points / sizeof hs_scada_pond_points[0] <= 16,
               "hs_scada_pond.number holds 16; floats must end below the codes at 40");

static const char *const code_names[HS_CODE_COUNT] = {
    "stage_code", "next_stage_code", "quality_code", "alarm_bits", "method_code",
    "level_quality_code", "state_time_s", "state_time_s",
};

const char *hs_scada_code_name(hs_scada_code c)
{
    return c < HS_CODE_COUNT ? code_names[c] : "?";
}

uint16_t hs_scada_stage_code(const char *name)
{
    int s = name ? hc_stage_from_name(name) : -2;
    return s >= 0 && s < HC_STAGE_COUNT ? (uint16_t)(s + 1) : 0;
}

uint16_t hs_scada_quality_code(const char *name)
{
    for (int q = 0; name != NULL && q < HS_QUALITY_COUNT; q++)
        if (strcmp(name, hs_quality_name((hs_quality)q)) == 0)
            return (uint16_t)q;
    return HS_QUALITY_BAD;
}

uint16_t hs_scada_method_code(const char *name)
{
    for (int m = 0; name != NULL && m < HC_METHOD_COUNT; m++)
        if (strcmp(name, hc_method_name((hc_method)m)) == 0)
            return (uint16_t)m;
    return 0;
}

int16_t hs_scada_scaled(double value, double scale)
{
    if (!isfinite(value))
        return HS_MAP_INT16_UNKNOWN;
    double raw = nearbyint(value * scale);
    if (raw > 32767.0)
        return 32767;
    if (raw < -32767.0)
        return -32767; /* -32768 is kept for unknown */
    return (int16_t)raw;
}

void hs_scada_pond_clear(hs_scada_pond *p)
{
    memset(p, 0, sizeof *p);
    for (size_t k = 0; k < sizeof p->number / sizeof p->number[0]; k++)
        p->number[k] = NAN;
    p->code[HS_CODE_QUALITY] = HS_QUALITY_BAD;
    p->code[HS_CODE_LEVEL_QUALITY] = HS_QUALITY_BAD;
}

static const char *text_of(const json_t *doc, const char *key)
{
    return json_string_value(json_object_get(doc, key));
}

/* The number at "a" or "a.b" with the digits the document prints it with;
 * NaN when absent or null. */
static double doc_number(const json_t *doc, const char *key)
{
    char top[64];
    const char *dot = strchr(key, '.');
    size_t n = dot ? (size_t)(dot - key) : strlen(key);
    if (n >= sizeof top)
        return NAN;
    memcpy(top, key, n);
    top[n] = '\0';
    const json_t *v = json_object_get(doc, top);
    if (dot != NULL)
        v = json_object_get(v, dot + 1);
    if (!json_is_number(v))
        return NAN;
    double x = json_number_value(v);
    if (!isfinite(x))
        return NAN;
    char buf[40];
    snprintf(buf, sizeof buf, "%.*g", hs_doc_digits(top), x);
    return strtod(buf, NULL);
}

void hs_scada_pond_from_doc(hs_scada_pond *p, const json_t *doc)
{
    uint16_t alarms = p->code[HS_CODE_ALARM_BITS];
    hs_scada_pond_clear(p);
    p->code[HS_CODE_ALARM_BITS] = alarms;
    if (!json_is_object(doc))
        return;
    p->have = 1;
    for (size_t k = 0; k < hs_scada_pond_n_points; k++)
        p->number[k] = doc_number(doc, hs_scada_pond_points[k].key);
    p->code[HS_CODE_STAGE] = hs_scada_stage_code(text_of(doc, "stage"));
    p->code[HS_CODE_NEXT_STAGE] = hs_scada_stage_code(text_of(doc, "next_stage"));
    p->code[HS_CODE_QUALITY] = hs_scada_quality_code(text_of(doc, "quality"));
    p->code[HS_CODE_METHOD] = hs_scada_method_code(text_of(doc, "method"));
    p->code[HS_CODE_LEVEL_QUALITY] = hs_scada_quality_code(text_of(doc, "level_quality"));
    /* "time" is ISO 8601 UTC with milliseconds, as the document writes it */
    const char *t = text_of(doc, "time");
    struct tm tm;
    memset(&tm, 0, sizeof tm);
    if (t != NULL) {
        const char *end = strptime(t, "%Y-%m-%dT%H:%M:%S", &tm);
        if (end != NULL) {
            time_t s = timegm(&tm);
            if (s > 0 && s < (time_t)UINT32_MAX)
                p->time_s = (uint32_t)s;
        }
    }
}

int hs_scada_map_fits(const hs_site *site, char *err, size_t errlen)
{
    if (site->n_ponds > HS_MAP_POND_MAX) {
        snprintf(err, errlen, "the Modbus map holds %d ponds; this site has %zu",
                 HS_MAP_POND_MAX, site->n_ponds);
        return -1;
    }
    if (site->n_transfers > HS_MAP_TRANSFER_MAX) {
        snprintf(err, errlen, "the Modbus map holds %d transfers; this site has %zu",
                 HS_MAP_TRANSFER_MAX, site->n_transfers);
        return -1;
    }
    return 0;
}

static void row(FILE *out, int csv, unsigned addr, const char *obj, const char *name,
                const char *type, const char *unit, double scale)
{
    char full[160], sc[32] = "";
    snprintf(full, sizeof full, "%s%s%s", obj ? obj : "", obj ? "." : "", name);
    if (scale != 0)
        snprintf(sc, sizeof sc, "%g", scale);
    if (csv)
        fprintf(out, "%u,%s,%s,%s,%s\n", addr, full, type, unit, sc);
    else
        fprintf(out, "%-7u %-48s %-13s %-6s %s\n", addr, full, type, unit, sc);
}

int hs_scada_map_print(FILE *out, const hs_site *site, const char *word_order, int csv,
                       char *err, size_t errlen)
{
    if (hs_scada_map_fits(site, err, errlen) != 0)
        return -1;
    char f32[32];
    snprintf(f32, sizeof f32, "float32-%s", word_order);
    const char *u32 = strcmp(word_order, "little") == 0 ? "uint32-little" : "uint32-big";
    if (csv)
        fprintf(out, "address,name,type,unit,scale\n");
    else
        fprintf(out, "%-7s %-48s %-13s %-6s %s\n", "address", "name", "type", "unit", "scale");
    row(out, csv, 0, "site", "map_version", "uint16", "", 0);
    row(out, csv, 1, "site", "abi_version", "uint16", "", 0);
    row(out, csv, 2, "site", "pond_count", "uint16", "", 0);
    row(out, csv, 3, "site", "transfer_count", "uint16", "", 0);
    row(out, csv, 4, "site", "heartbeat", u32, "", 0);
    row(out, csv, 6, "site", "last_update_s", u32, "s", 0);
    row(out, csv, 8, "site", "word_order", "uint16", "", 0);
    row(out, csv, 10, "site", "check_value_1234.5", f32, "", 0);
    for (size_t j = 0; j < site->n_transfers; j++) {
        unsigned b = HS_MAP_TRANSFER_BASE + HS_MAP_TRANSFER_SIZE * (unsigned)j;
        char obj[HS_NAME_MAX + 16];
        snprintf(obj, sizeof obj, "transfer.%s", site->transfers[j].name);
        row(out, csv, b, obj, "advice_code", "uint16", "", 0);
        row(out, csv, b + 1, obj, "pump_on", "uint16", "", 0);
        row(out, csv, b + 2, obj, "reason_bits", u32, "", 0);
    }
    for (size_t i = 0; i < site->n_ponds; i++) {
        unsigned b = HS_MAP_POND_BASE + HS_MAP_POND_SIZE * (unsigned)i;
        char obj[HS_NAME_MAX + 16];
        snprintf(obj, sizeof obj, "pond.%s", site->ponds[i].name);
        for (size_t k = 0; k < hs_scada_pond_n_points; k++)
            row(out, csv, b + 2 * (unsigned)k, obj, hs_scada_pond_points[k].name, f32,
                hs_scada_pond_points[k].unit, 0);
        for (unsigned c = 0; c < HS_CODE_TIME_HI; c++)
            row(out, csv, b + HS_MAP_CODE_OFFSET + c, obj, code_names[c], "uint16", "", 0);
        row(out, csv, b + HS_MAP_CODE_OFFSET + HS_CODE_TIME_HI, obj, "state_time_s", u32, "s",
            0);
        for (size_t k = 0; k < hs_scada_pond_n_points; k++) {
            char nm[80];
            snprintf(nm, sizeof nm, "%s_int16", hs_scada_pond_points[k].name);
            row(out, csv, b + HS_MAP_INT16_OFFSET + (unsigned)k, obj, nm, "int16",
                hs_scada_pond_points[k].unit, hs_scada_pond_points[k].scale);
        }
    }
    return 0;
}
