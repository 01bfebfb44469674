/* [mqtt] and [alarm NAME] in the site configuration: defaults, the rule
 * handed to the alarm engine, configured rules replacing built-in ones, and
 * each class of mistake reported as FILE:LINE. Limits here are test values;
 * the kinds' default limits are cited in plugin/hs_alarm_rules.c. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hs_conf_alarm.h"
#include "hs_conf_mqtt.h"
#include "conf_file.h"
#include "hs_config.h"

static conf_dir cd;
static char pwpath[128];

#define BASE CONF_BASE_TWO_PONDS /* lines 1..35 */

static void expect_error(const char *text, int line, const char *what)
{
    conf_expect_error(&cd, text, line, what);
}

static int make_dir(void **state)
{
    (void)state;
    if (conf_dir_make(&cd, "confma") != 0)
        return -1;
    snprintf(pwpath, sizeof pwpath, "%s/mqtt.pw", cd.dir);
    return 0;
}

static int remove_dir(void **state)
{
    (void)state;
    return conf_dir_remove(&cd, "mqtt.pw", (const char *)NULL);
}

static void no_mqtt_section_means_off(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE);
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_null(site.mqtt);
    assert_int_equal(site.n_alarms, 0);
    hs_site_free(&site);
}

static void mqtt_defaults(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[mqtt]\nuri = mqtt://127.0.0.1:1883\nusername = gw\n"
                          "password_file = mqtt.pw\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_non_null(site.mqtt);
    assert_string_equal(site.mqtt->topic_prefix, "halostage");
    assert_string_equal(site.mqtt->password_file, pwpath); /* relative to the config */
    assert_string_equal(site.mqtt->client_id, "halostaged-test-works");
    assert_int_equal(site.mqtt->keepalive_s, 30);
    assert_true(site.mqtt->enabled);
    assert_int_equal(site.mqtt->outbox_max, 100000);
    hs_site_free(&site);
}

static void mqtt_mistakes(void **unused)
{
    (void)unused;
    /* [mqtt] header is line 36, its first key line 37. */
    expect_error(BASE "[mqtt]\nuri = mqtts://127.0.0.1:8883\n", 37, "needs ca_file");
    expect_error(BASE "[mqtt]\nuri = http://127.0.0.1:8883\n", 37, "must start with mqtt://");
    expect_error(BASE "[mqtt]\nuri = mqtt://127.0.0.1:1883\ntopic_prefix = a/#\n", 38,
                 "topic_prefix");
    expect_error(BASE "[mqtt]\nuri = mqtt://127.0.0.1:1883\npassword_file = x\n", 38,
                 "needs username");
    expect_error(BASE "[mqtt]\n", 36, "uri");
}

static void alarm_rule_from_section(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[alarm late-bittern]\nkind = bittern-limit\nrole = crystalliser\n"
                          "high = 28.5\non_delay = 2min\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_int_equal(site.n_alarms, 1);
    const hs_alarm_rule *r = &site.alarms[0].rule;
    assert_string_equal(r->name, "late-bittern");
    assert_int_equal(r->kind, HS_RULE_BITTERN_LIMIT);
    assert_int_equal(r->quantity, HS_QTY_BAUME);
    assert_true(fabs(r->high - 28.5) < 1e-12);
    assert_int_equal(r->on_delay_ms, 120000);
    hs_alarm_rule def;
    hs_alarm_rule_default(&def, HS_RULE_BITTERN_LIMIT);
    assert_int_equal(r->off_delay_ms, def.off_delay_ms); /* not given: the kind's */
    assert_int_equal(r->priority, def.priority);
    hs_alarm_engine *eng = hs_alarm_new(1);
    assert_int_equal(hs_conf_alarms_apply(&site, eng), 1);
    assert_true(hs_alarm_has(eng, "b", "late-bittern"));  /* b is the crystalliser */
    assert_false(hs_alarm_has(eng, "a", "late-bittern"));
    hs_alarm_free(eng);
    hs_site_free(&site);
}

static void configured_rule_replaces_builtin(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[alarm level-high]\nkind = level-high\nponds = a, b\nhigh = 1.8 \n"
                          "priority = urgent\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    hs_alarm_engine *eng = hs_alarm_new(1);
    assert_int_equal(hs_conf_alarms_apply(&site, eng), 2);
    /* What the runtime adds next from the pond's own level_max is refused. */
    hs_alarm_rule builtin;
    hs_alarm_rule_default(&builtin, HS_RULE_LEVEL_HIGH);
    snprintf(builtin.name, sizeof builtin.name, "level-high");
    builtin.high = 2.0;
    assert_int_equal(hs_alarm_add(eng, &builtin, "a"), HS_ALARM_REFUSED);
    hs_alarm_info info;
    assert_int_equal(hs_alarm_get(eng, 0, &info), 0);
    assert_int_equal(info.priority, HS_PRIORITY_URGENT);
    hs_alarm_free(eng);
    hs_site_free(&site);
}

static void alarm_mistakes(void **unused)
{
    (void)unused;
    expect_error(BASE "[alarm x]\nkind = density-band\nponds = a, nowhere\nlow = 1100\n", 38,
                 "no [pond nowhere]");
    expect_error(BASE "[alarm x]\nkind = level-high\nponds = a\n", 36, "'high' or 'low'");
    expect_error(BASE "[alarm x]\nkind = level-high\nponds = a\nrole = crystalliser\n"
                      "high = 1\n", 36, "either ponds or role");
    expect_error(BASE "[alarm x]\nkind = level-high\nrole = salt-lake\nhigh = 1\n", 38,
                 "not a pond role");
    expect_error(BASE "[alarm x]\nkind = salt-alert\nponds = a\n", 37, "kind");
    expect_error(BASE "[alarm x]\nkind = density-band\nponds = a\nlow = 1200\nhigh = 1100\n",
                 36, "'low' must be below 'high'");
    expect_error(BASE "[alarm x]\nkind = level-low\nponds = a\nlow = 0.2\npriority = soon\n",
                 40, "priority");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(no_mqtt_section_means_off, make_dir, remove_dir),
        cmocka_unit_test_setup_teardown(mqtt_defaults, make_dir, remove_dir),
        cmocka_unit_test_setup_teardown(mqtt_mistakes, make_dir, remove_dir),
        cmocka_unit_test_setup_teardown(alarm_rule_from_section, make_dir, remove_dir),
        cmocka_unit_test_setup_teardown(configured_rule_replaces_builtin, make_dir, remove_dir),
        cmocka_unit_test_setup_teardown(alarm_mistakes, make_dir, remove_dir),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
