/* The pond-state document (see hs_pond_doc.h). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hp_state_json.h"
#include "hs_hydro_json.h"
#include "hs_pond_doc.h"
#include "hs_publish.h"

/* Measurements and what is computed from them carry 7 significant digits
 * (a 16-bit register or a 0.1 % sensor carries fewer; 7 keeps a density in
 * kg/m3 to 1e-3 and an SG to 1e-6). Fields listed here differ. */
static const struct {
    const char *key;
    int digits;
} digits_table[] = {
    {"saturation_index", 4},           /* log10 of a ratio; 1e-3 is below its model error */
    {"water_activity", 5},
    {"days_to_target", 4},
    {"age_s", 4},
    /* an uncertainty is stated with two significant digits (GUM 7.2.6) */
    {"density_uncertainty_kg_m3", 2},
    {"specific_gravity_uncertainty", 2},
    {"baume_uncertainty", 2},
    {"concentration_factor_uncertainty", 2},             /* forecasts: four digits are more than they know */
    {"days_to_next_stage", 4},
    {"net_evaporation_mm_day", 4},
    {"net_evaporation_range_mm_day", 4},
    {"expected_evaporation_mm_day", 4},
};

static int listed_digits(const char *key)
{
    if (key != NULL)
        for (size_t i = 0; i < sizeof digits_table / sizeof digits_table[0]; i++)
            if (strcmp(digits_table[i].key, key) == 0)
                return digits_table[i].digits;
    return -1;
}

int hs_doc_digits(const char *key)
{
    int d = listed_digits(key);
    return d > 0 ? d : 7;
}

void hs_pond_doc_init(struct hs_pond_doc *d)
{
    memset(d, 0, sizeof *d);
    hc_state_clear(&d->state);
    d->quality = HS_QUALITY_BAD;
    d->level_quality = -1;
    struct hs_hydro_report *r = &d->hydro;
    r->depth_m = r->area_m2 = r->volume_m3 = NAN;
    r->dissolved_salt_t = r->deposited_salt_t = NAN;
    r->net_evaporation_mm_day = r->net_evaporation_low_mm_day = NAN;
    r->net_evaporation_high_mm_day = r->expected_evaporation_mm_day = NAN;
    r->days_to_target_low = r->days_to_target_expected = r->days_to_target_high = NAN;
    r->days_to_next_stage_low = r->days_to_next_stage_expected = NAN;
    r->days_to_next_stage_high = r->balance_density_kg_m3 = NAN;
}

void hs_pond_doc_from_row(struct hs_pond_doc *d, const hs_state_row *row, const char *pond,
                          const char *role)
{
    hs_pond_doc_init(d);
    d->pond = pond;
    d->role = role;
    d->t_ms = row->t_ms;
    d->quality = row->quality;
    d->state = row->state;
    const hs_pond_extra *x = &row->extra;
    struct hs_hydro_report *r = &d->hydro;
    r->depth_m = x->depth_m;
    r->volume_m3 = x->volume_m3;
    r->dissolved_salt_t = x->dissolved_salt_t;
    r->deposited_salt_t = x->deposited_salt_t;
    r->net_evaporation_mm_day = x->net_evaporation_mm_day;
    r->days_to_target_low = x->days_to_target_low;
    r->days_to_target_high = x->days_to_target_high;
    r->days_to_next_stage_expected = x->days_to_next_stage;
}

static int put(json_t *o, const char *key, json_t *v)
{
    return v != NULL && json_object_set_new(o, key, v) == 0 ? 0 : -1;
}

static json_t *text_or_null(const char *s) { return s != NULL ? json_string(s) : json_null(); }

json_t *hs_pond_doc_json(const struct hs_pond_doc *d)
{
    json_t *o = json_object();
    json_t *brine = hp_state_to_json(&d->state); /* the fields of `halostage calc --json` */
    if (o == NULL || brine == NULL) {
        json_decref(o);
        json_decref(brine);
        return NULL;
    }
    char when[40];
    hs_iso8601_ms(when, sizeof when, d->t_ms);
    int rc = 0;
    rc |= put(o, "pond", text_or_null(d->pond));
    rc |= put(o, "role", text_or_null(d->role));
    rc |= put(o, "time", d->t_ms ? json_string(when) : json_null());
    /* age: how old the newest input is when the outlet shows it */
    int aged = d->t_ms && d->now_ms;
    double age_s = aged ? (double)(d->now_ms - d->t_ms) / 1000.0 : NAN;
    rc |= put(o, "age_s", aged ? json_real(age_s) : json_null());
    rc |= put(o, "stale", aged && d->stale_after_ms > 0
                              ? json_boolean(d->now_ms - d->t_ms > d->stale_after_ms)
                              : json_null());
    rc |= put(o, "quality", json_string(hs_quality_name(d->quality)));
    rc |= put(o, "level_quality", d->level_quality >= 0
                                      ? json_string(hs_quality_name((hs_quality)d->level_quality))
                                      : json_null());
    rc |= json_object_update(o, brine);
    json_decref(brine);
    rc |= hs_hydro_report_to_json(&d->hydro, o);
    if (!d->hydro_known) { /* a drift flag of a balance that was not run means nothing */
        rc |= put(o, "net_evaporation_days", json_null());
        rc |= put(o, "calibration_drift", json_null());
    }
    rc |= put(o, "note", text_or_null(d->note));
    json_t *held = d->uncertain_alarms != NULL ? json_array() : json_null();
    for (const char *r = d->uncertain_alarms; held != NULL && r != NULL && *r;) {
        size_t n = strcspn(r, ",");
        json_array_append_new(held, json_stringn(r, n));
        r += n + (r[n] == ',');
    }
    rc |= put(o, "uncertain_alarms", held);
    rc |= put(o, "level_note", text_or_null(d->level_note));
    if (rc != 0) {
        json_decref(o);
        return NULL;
    }
    return o;
}

/* Rounds every real in v to the digits of its field: the members of a
 * listed field's object or array (a range, the saturation indices) take
 * that field's digits, others their own key's. */
static void round_reals(json_t *v, const char *key)
{
    if (json_is_real(v)) {
        double x = json_real_value(v);
        if (isfinite(x)) {
            char buf[40];
            snprintf(buf, sizeof buf, "%.*g", hs_doc_digits(key), x);
            json_real_set(v, strtod(buf, NULL));
        }
    } else if (json_is_object(v)) {
        const char *k;
        json_t *m;
        int inherit = listed_digits(key) > 0;
        json_object_foreach(v, k, m) round_reals(m, inherit ? key : k);
    } else if (json_is_array(v)) {
        size_t i;
        json_t *m;
        json_array_foreach(v, i, m) round_reals(m, key);
    }
}

char *hs_doc_dumps(const json_t *o)
{
    json_t *copy = json_deep_copy(o);
    if (copy == NULL)
        return NULL;
    round_reals(copy, NULL);
    /* 15 digits print a value rounded above back exactly as rounded
     * (DBL_DIG), so 16.9 stays 16.9. */
    char *text = json_dumps(copy, JSON_COMPACT | JSON_REAL_PRECISION(15));
    json_decref(copy);
    return text;
}
