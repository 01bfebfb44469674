/* The shared state contract: names round-trip and clearing leaves nothing set.
 * No science here, so no source to cite. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "hc_state.h"
#include "hc_status.h"

static void stage_names_round_trip(void **unused)
{
    (void)unused;
    for (int s = 0; s < HC_STAGE_COUNT; s++)
        assert_int_equal(hc_stage_from_name(hc_stage_name((hc_stage)s)), s);
    assert_string_equal(hc_stage_name(HC_STAGE_MAGNESIUM_SULFATE), "magnesium-sulfate");
    assert_int_equal(hc_stage_from_name("none"), HC_STAGE_NONE);
    assert_int_equal(hc_stage_from_name("salt"), -2);
}

static void mineral_names_round_trip(void **unused)
{
    (void)unused;
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        assert_non_null(hc_mineral_name((hc_mineral)m));
        assert_int_equal(hc_mineral_from_name(hc_mineral_name((hc_mineral)m)), m);
    }
    assert_null(hc_mineral_name(HC_MINERAL_COUNT));
    assert_int_equal(hc_mineral_from_name("quartz"), -1);
}

static void clear_sets_unknowns(void **unused)
{
    (void)unused;
    hc_brine_state st;
    st.density_kg_m3 = 1.0;
    st.warnings = 7;
    hc_state_clear(&st);
    assert_true(isnan(st.density_kg_m3));
    assert_true(isnan(st.saturation_index[HC_MIN_HALITE]));
    assert_int_equal(st.stage, HC_STAGE_NONE);
    assert_int_equal(st.warnings, 0);
}

static void every_warning_has_text(void **unused)
{
    (void)unused;
    for (unsigned b = 0; b < HC_WARN_COUNT_BITS; b++) {
        assert_non_null(hc_warning_name(1u << b));
        assert_non_null(hc_warning_text(1u << b));
    }
    assert_null(hc_warning_name(1u << HC_WARN_COUNT_BITS));
    for (int s = 0; s < HC_STATUS_COUNT; s++)
        assert_string_not_equal(hc_status_text((hc_status)s), "unknown error");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(stage_names_round_trip),
        cmocka_unit_test(mineral_names_round_trip),
        cmocka_unit_test(clear_sets_unknowns),
        cmocka_unit_test(every_warning_has_text),
    };
    return cmocka_run_group_tests_name("state", tests, NULL, NULL);
}
