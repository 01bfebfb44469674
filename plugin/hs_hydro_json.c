/* Hydrology fields of the pond state as JSON (see hs_hydro_json.h). */
#include "hs_hydro_json.h"

#include <math.h>

static json_t *number_or_null(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static int put(json_t *obj, const char *key, json_t *value)
{
    return value != NULL && json_object_set_new(obj, key, value) == 0 ? 0 : -1;
}

static json_t *range3(double low, double expected, double high)
{
    json_t *o = json_object();
    if (o == NULL)
        return NULL;
    if (put(o, "low", number_or_null(low)) != 0 ||
        put(o, "expected", number_or_null(expected)) != 0 ||
        put(o, "high", number_or_null(high)) != 0) {
        json_decref(o);
        return NULL;
    }
    return o;
}

/* Error convention: 0 / -1 (see header). */
int hs_hydro_report_to_json(const struct hs_hydro_report *r, json_t *obj)
{
    if (r == NULL || obj == NULL || !json_is_object(obj))
        return -1;
    int rc = 0;
    rc |= put(obj, "depth_m", number_or_null(r->depth_m));
    rc |= put(obj, "area_m2", number_or_null(r->area_m2));
    rc |= put(obj, "volume_m3", number_or_null(r->volume_m3));
    rc |= put(obj, "dissolved_salt_t", number_or_null(r->dissolved_salt_t));
    rc |= put(obj, "deposited_salt_t", number_or_null(r->deposited_salt_t));
    rc |= put(obj, "net_evaporation_mm_day", number_or_null(r->net_evaporation_mm_day));
    rc |= put(obj, "net_evaporation_range_mm_day",
              range3(r->net_evaporation_low_mm_day, r->net_evaporation_mm_day,
                     r->net_evaporation_high_mm_day));
    rc |= put(obj, "net_evaporation_days", json_integer(r->rate_days));
    rc |= put(obj, "expected_evaporation_mm_day", number_or_null(r->expected_evaporation_mm_day));
    rc |= put(obj, "days_to_target",
              range3(r->days_to_target_low, r->days_to_target_expected, r->days_to_target_high));
    rc |= put(obj, "days_to_next_stage",
              range3(r->days_to_next_stage_low, r->days_to_next_stage_expected,
                     r->days_to_next_stage_high));
    rc |= put(obj, "balance_density_kg_m3", number_or_null(r->balance_density_kg_m3));
    rc |= put(obj, "calibration_drift", json_boolean(r->density_drift));
    return rc ? -1 : 0;
}

void hs_hydro_report_to_extra(const struct hs_hydro_report *r, hs_pond_extra *x)
{
    hs_pond_extra_clear(x);
    if (r == NULL)
        return;
    x->depth_m = r->depth_m;
    x->volume_m3 = r->volume_m3;
    x->dissolved_salt_t = r->dissolved_salt_t;
    x->deposited_salt_t = r->deposited_salt_t;
    x->net_evaporation_mm_day = r->net_evaporation_mm_day;
    x->days_to_target_low = r->days_to_target_low;
    x->days_to_target_high = r->days_to_target_high;
    x->days_to_next_stage = r->days_to_next_stage_expected;
}
