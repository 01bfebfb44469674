/* Brine state -> JSON object. */
#include <math.h>
#include <stddef.h>

#include "hp_state_json.h"

/* A number, or null for NaN and infinities (JSON has neither). */
static json_t *number_or_null(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static json_t *stage_or_null(hc_stage stage)
{
    if ((int)stage < 0 || stage >= HC_STAGE_COUNT)
        return json_null();
    return json_string(hc_stage_name(stage));
}

/* json_object_set_new steals the value even when it fails, so a NULL
 * value (allocation failure) only needs reporting. */
static int set(json_t *obj, const char *key, json_t *value)
{
    return value != NULL && json_object_set_new(obj, key, value) == 0;
}

static json_t *saturation_object(const hc_brine_state *state)
{
    json_t *obj = json_object();
    if (obj == NULL)
        return NULL;
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        double si = state->saturation_index[m];
        if (!isfinite(si))
            continue;
        if (!set(obj, hc_mineral_name((hc_mineral)m), json_real(si))) {
            json_decref(obj);
            return NULL;
        }
    }
    return obj;
}

static json_t *warnings_array(unsigned warnings)
{
    json_t *arr = json_array();
    if (arr == NULL)
        return NULL;
    for (unsigned i = 0; i < HC_WARN_COUNT_BITS; i++) {
        unsigned bit = 1u << i;
        const char *name = hc_warning_name(bit);
        if (!(warnings & bit) || name == NULL)
            continue;
        if (json_array_append_new(arr, json_string(name)) != 0) {
            json_decref(arr);
            return NULL;
        }
    }
    return arr;
}

json_t *hp_state_to_json(const hc_brine_state *state)
{
    json_t *o = json_object();
    if (o == NULL)
        return NULL;
    int ok = set(o, "practical_salinity", number_or_null(state->practical_salinity)) &&
             set(o, "salinity_g_kg", number_or_null(state->salinity_g_kg)) &&
             set(o, "density_kg_m3", number_or_null(state->density_kg_m3)) &&
             set(o, "density_ref_kg_m3", number_or_null(state->density_ref_kg_m3)) &&
             set(o, "temperature_c", number_or_null(state->temperature_c)) &&
             set(o, "specific_gravity", number_or_null(state->specific_gravity)) &&
             set(o, "reference_temperature_c", number_or_null(state->reference_temperature_c)) &&
             set(o, "baume", number_or_null(state->baume)) &&
             set(o, "baume_modulus", number_or_null(state->baume_modulus)) &&
             set(o, "concentration_factor", number_or_null(state->concentration_factor)) &&
             set(o, "stage", stage_or_null(state->stage)) &&
             set(o, "next_stage", stage_or_null(state->next_stage)) &&
             set(o, "next_stage_density_kg_m3", number_or_null(state->next_stage_density_kg_m3)) &&
             set(o, "next_stage_density_ref_kg_m3",
                 number_or_null(state->next_stage_density_ref_kg_m3)) &&
             set(o, "saturation_index", saturation_object(state)) &&
             set(o, "water_activity", number_or_null(state->water_activity)) &&
             set(o, "method", json_string(hc_method_name(state->method))) &&
             set(o, "density_uncertainty_kg_m3",
                 number_or_null(state->density_uncertainty_kg_m3)) &&
             set(o, "specific_gravity_uncertainty", number_or_null(state->sg_uncertainty)) &&
             set(o, "baume_uncertainty", number_or_null(state->baume_uncertainty)) &&
             set(o, "concentration_factor_uncertainty", number_or_null(state->cf_uncertainty)) &&
             set(o, "warnings", warnings_array(state->warnings));
    if (!ok) {
        json_decref(o);
        return NULL;
    }
    return o;
}
