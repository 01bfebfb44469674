/* [transfer NAME] in the site configuration: defaults taken from the ponds,
 * the rule handed to the decision engine, and each class of mistake
 * reported as FILE:LINE. No science here, so no source to cite. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hc_state.h"
#include "hs_conf_transfer.h"
#include "conf_file.h"
#include "hs_config.h"

static conf_dir cd;

#define BASE CONF_BASE_TWO_PONDS /* lines 1..35 */

static void expect_error(const char *text, int line, const char *what)
{
    conf_expect_error(&cd, text, line, what);
}

static int make_dir(void **state)
{
    (void)state;
    if (conf_dir_make(&cd, "xfer") != 0)
        return -1;
    return 0;
}

static int remove_dir(void **state)
{
    (void)state;
    return conf_dir_remove(&cd, (const char *)NULL);
}

static void defaults_from_ponds(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[transfer feed]\nsource = a\ndestination = b\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_int_equal(site.n_transfers, 1);
    const hs_transfer_conf *t = &site.transfers[0];
    assert_string_equal(t->name, "feed");
    assert_false(t->actuate); /* advisory unless the site opts in */
    struct hs_transfer_rule r;
    hs_conf_transfer_rule(&site, t, &r);
    assert_int_equal(r.trigger, HS_TRIGGER_DENSITY);
    assert_true(fabs(r.start_density_kg_m3 - 1215) < 1e-9);  /* a's density_out */
    assert_true(fabs(r.source_level_min_m - 0.5) < 1e-9);    /* a's level_min */
    assert_true(fabs(r.dest_level_max_m - 0.35) < 1e-9);     /* b's level_max */
    assert_true(isnan(r.dest_density_min_kg_m3));            /* no rated_flow: no prediction */
    assert_int_equal(r.min_off_ms, 600000);
    assert_int_equal(r.max_run_ms, 6 * 3600000);
    assert_int_equal(r.actuate, 0);
    assert_int_equal(r.has_rain, 0);
    hs_site_free(&site);
}

static void stage_trigger_and_signals(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[transfer feed]\nsource = a\ndestination = b\ntrigger = stage\n"
                    "start_stage = halite\nrated_flow = 250\nfeedback = a.pump-run\n"
                    "manual = a.pump-manual\nactuate = yes\nbus = plc\noutput = register\n"
                    "output_address = 100\non_value = 2\nheartbeat_address = 101\n"
                    "min_on = 2min\nmax_run = 3h\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    const hs_transfer_conf *t = &site.transfers[0];
    struct hs_transfer_rule r;
    hs_conf_transfer_rule(&site, t, &r);
    assert_int_equal(r.trigger, HS_TRIGGER_STAGE);
    assert_int_equal(r.start_stage, HC_STAGE_HALITE);
    assert_true(fabs(r.dest_density_min_kg_m3 - 1210) < 1e-9); /* b's density_in */
    assert_true(r.has_feedback && r.has_manual && r.actuate);
    assert_int_equal(t->output, HS_OUTPUT_REGISTER);
    assert_int_equal(t->output_address, 100);
    assert_int_equal(t->on_value, 2);
    assert_int_equal(t->heartbeat_address, 101);
    assert_int_equal(r.min_on_ms, 120000);
    assert_int_equal(r.max_run_ms, 3 * 3600000);
    hs_site_free(&site);
}

static void unknown_pond(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = zz\ndestination = b\n", 37, "no [pond zz]");
}

static void into_itself(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = a\n", 38, "into itself");
}

static void unknown_signal(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nrain = a.rain\n", 39,
                 "no [signal a.rain]");
}

static void actuate_needs_bus(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nactuate = yes\n", 39,
                 "needs bus");
}

static void band_needs_flow(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\n"
                      "destination_density_max = 1260 kg/m3\n", 36, "rated_flow");
}

static void no_start_density(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = b\ndestination = a\n"
                      "start_density = 1300 kg/m3\nhysteresis = 60 kg/m3\n", 40, "hysteresis");
}

static void bad_values(void **u)
{
    (void)u;
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nstart_stage = salt\n", 39,
                 "start_stage");
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nmin_on = soon\n", 39,
                 "min_on");
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nmin_on = 2h\nmax_run = 1h\n",
                 36, "minimum on time exceeds");
    expect_error(BASE "[transfer feed]\nsource = a\ndestination = b\nspeed = 3\n", 39, "speed");
}

static void two_writers_one_output(void **u)
{
    (void)u;
    expect_error(BASE "[transfer f1]\nsource = a\ndestination = b\nactuate = yes\nbus = plc\n"
                      "output_address = 7\n"
                      "[transfer f2]\nsource = a\ndestination = b\nactuate = yes\nbus = plc\n"
                      "output_address = 7\n", 47, "already writes");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(defaults_from_ponds),
        cmocka_unit_test(stage_trigger_and_signals),
        cmocka_unit_test(unknown_pond),
        cmocka_unit_test(into_itself),
        cmocka_unit_test(unknown_signal),
        cmocka_unit_test(actuate_needs_bus),
        cmocka_unit_test(band_needs_flow),
        cmocka_unit_test(no_start_density),
        cmocka_unit_test(bad_values),
        cmocka_unit_test(two_writers_one_output),
    };
    return cmocka_run_group_tests(tests, make_dir, remove_dir);
}
