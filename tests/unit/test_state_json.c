/* JSON form of a brine state: every brine-state field, null for unknowns,
 * names for stages, methods and warnings. A format contract, no science. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "calc_assert.h"
#include "hc_seawater.h"
#include "hp_state_json.h"

static const char *const design_fields[] = {
    "practical_salinity", "salinity_g_kg", "density_kg_m3", "temperature_c",
    "specific_gravity", "reference_temperature_c", "baume", "concentration_factor",
    "stage", "next_stage", "next_stage_density_kg_m3", "saturation_index",
    "water_activity", "method", "warnings",
};

static void cleared_state_is_all_null(void **unused)
{
    (void)unused;
    hc_brine_state st;
    hc_state_clear(&st);
    json_t *o = hp_state_to_json(&st);
    assert_non_null(o);
    for (size_t i = 0; i < sizeof design_fields / sizeof design_fields[0]; i++)
        assert_non_null(json_object_get(o, design_fields[i]));
    assert_true(json_is_null(json_object_get(o, "practical_salinity")));
    assert_true(json_is_null(json_object_get(o, "stage")));
    assert_true(json_is_null(json_object_get(o, "next_stage")));
    assert_true(json_is_null(json_object_get(o, "baume_modulus")));
    assert_string_equal(json_string_value(json_object_get(o, "method")), "none");
    assert_int_equal(json_object_size(json_object_get(o, "saturation_index")), 0);
    assert_int_equal(json_array_size(json_object_get(o, "warnings")), 0);
    /* 15 brine-state fields plus baume_modulus, the two densities at the
     * reference temperature and four uncertainties, nothing else */
    assert_int_equal(json_object_size(o), 22);
    assert_true(json_is_null(json_object_get(o, "density_ref_kg_m3")));
    assert_true(json_is_null(json_object_get(o, "next_stage_density_ref_kg_m3")));
    assert_true(json_is_null(json_object_get(o, "density_uncertainty_kg_m3")));
    json_decref(o);
}

static void filled_state(void **unused)
{
    (void)unused;
    hc_brine_state st;
    assert_int_equal(hc_seawater_state_from_conductivity(2.0, 20.0, 0.0, NULL, &st), HC_OK);
    st.saturation_index[HC_MIN_GYPSUM] = -0.75;
    st.saturation_index[HC_MIN_HALITE] = INFINITY; /* not finite: left out */
    st.next_stage = HC_STAGE_MAGNESIUM_SULFATE;
    st.next_stage_density_kg_m3 = NAN;
    json_t *o = hp_state_to_json(&st);
    assert_non_null(o);
    assert_near(json_real_value(json_object_get(o, "practical_salinity")),
                st.practical_salinity, 0.0);
    assert_near(json_real_value(json_object_get(o, "density_kg_m3")), st.density_kg_m3, 0.0);
    assert_near(json_real_value(json_object_get(o, "baume_modulus")), 145.0, 0.0);
    assert_string_equal(json_string_value(json_object_get(o, "stage")), "seawater");
    assert_string_equal(json_string_value(json_object_get(o, "next_stage")),
                        "magnesium-sulfate");
    assert_true(json_is_null(json_object_get(o, "next_stage_density_kg_m3")));
    assert_string_equal(json_string_value(json_object_get(o, "method")), "pss78");
    json_t *si = json_object_get(o, "saturation_index");
    assert_int_equal(json_object_size(si), 1);
    assert_near(json_real_value(json_object_get(si, "gypsum")), -0.75, 0.0);
    json_t *w = json_object_get(o, "warnings");
    assert_int_equal(json_array_size(w), 2);
    /* lowest bit first: below-feed (bit 4), then hill-extension (bit 5) */
    assert_string_equal(json_string_value(json_array_get(w, 0)), "below-feed");
    assert_string_equal(json_string_value(json_array_get(w, 1)), "hill-extension");
    /* serialises and parses back to the same object */
    char *text = json_dumps(o, JSON_REAL_PRECISION(17));
    assert_non_null(text);
    json_t *back = json_loads(text, 0, NULL);
    assert_non_null(back);
    assert_true(json_equal(o, back));
    json_decref(back);
    free(text);
    json_decref(o);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(cleared_state_is_all_null),
        cmocka_unit_test(filled_state),
    };
    return cmocka_run_group_tests_name("state_json", tests, NULL, NULL);
}
