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
#include "hs_config.h"

static char dir[64];
static char path[128];
static char pwpath[128];

static int make_dir(void **state)
{
    (void)state;
    snprintf(dir, sizeof dir, "/tmp/hs-confma-XXXXXX");
    if (!mkdtemp(dir))
        return -1;
    snprintf(path, sizeof path, "%s/site.ini", dir);
    snprintf(pwpath, sizeof pwpath, "%s/mqtt.pw", dir);
    return 0;
}

static int remove_dir(void **state)
{
    (void)state;
    unlink(path);
    unlink(pwpath);
    return rmdir(dir);
}

static void write_file(const char *file, const char *text)
{
    FILE *f = fopen(file, "w");
    assert_non_null(f);
    assert_true(fputs(text, f) >= 0);
    assert_int_equal(fclose(f), 0);
}

/* Lines 1..35; a [transfer] header appended is line 36. */
#define BASE \
    "[site]\n"                          /* 1 */ \
    "name = test-works\n"               /* 2 */ \
    "latitude = 10\n"                   /* 3 */ \
    "[bus plc]\n"                       /* 4 */ \
    "type = tcp\n"                      /* 5 */ \
    "host = 127.0.0.1\n"                /* 6 */ \
    "port = 1502\n"                     /* 7 */ \
    "[pond a]\n"                        /* 8 */ \
    "role = brine-store\n"              /* 9 */ \
    "area = 2 ha\n"                     /* 10 */ \
    "next = b\n"                        /* 11 */ \
    "density_in = 1190 kg/m3\n"         /* 12 */ \
    "density_out = 1215 kg/m3\n"        /* 13 */ \
    "level_min = 0.5 m\n"               /* 14 */ \
    "level_max = 2 m\n"                 /* 15 */ \
    "[pond b]\n"                        /* 16 */ \
    "role = crystalliser\n"             /* 17 */ \
    "area = 5000 m2\n"                  /* 18 */ \
    "density_in = 1210 kg/m3\n"         /* 19 */ \
    "density_out = 1250 kg/m3\n"        /* 20 */ \
    "level_min = 0.1 m\n"               /* 21 */ \
    "level_max = 0.35 m\n"              /* 22 */ \
    "[signal a.temperature]\n"          /* 23 */ \
    "bus = plc\n"                       /* 24 */ \
    "address = 10\n"                    /* 25 */ \
    "type = int16\n"                    /* 26 */ \
    "unit = C\n"                        /* 27 */ \
    "[signal a.pump-run]\n"             /* 28 */ \
    "bus = plc\n"                       /* 29 */ \
    "address = 11\n"                    /* 30 */ \
    "type = uint16\n"                   /* 31 */ \
    "[signal a.pump-manual]\n"          /* 32 */ \
    "bus = plc\n"                       /* 33 */ \
    "address = 12\n"                    /* 34 */ \
    "type = uint16\n"                   /* 35 */

static void expect_error(const char *text, int line, const char *what)
{
    hs_site site;
    hs_diag diag;
    char prefix[200];
    write_file(path, text);
    assert_int_equal(hs_site_load(path, &site, &diag), -1);
    snprintf(prefix, sizeof prefix, "%s:%d: ", path, line);
    for (unsigned i = 0; i < diag.n; i++)
        if (strncmp(diag.msg[i], prefix, strlen(prefix)) == 0 && strstr(diag.msg[i], what))
            return;
    for (unsigned i = 0; i < diag.n; i++)
        print_message("got: %s\n", diag.msg[i]);
    fail_msg("no error '%s...%s'", prefix, what);
}

static void no_mqtt_section_means_off(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    write_file(path, BASE);
    assert_int_equal(hs_site_load(path, &site, &diag), 0);
    assert_null(site.mqtt);
    assert_int_equal(site.n_alarms, 0);
    hs_site_free(&site);
}

static void mqtt_defaults(void **unused)
{
    (void)unused;
    hs_site site;
    hs_diag diag;
    write_file(path, BASE "[mqtt]\nuri = mqtt://127.0.0.1:1883\nusername = gw\n"
                          "password_file = mqtt.pw\n");
    assert_int_equal(hs_site_load(path, &site, &diag), 0);
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
    write_file(path, BASE "[alarm late-bittern]\nkind = bittern-limit\nrole = crystalliser\n"
                          "high = 28.5\non_delay = 2min\n");
    assert_int_equal(hs_site_load(path, &site, &diag), 0);
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
    write_file(path, BASE "[alarm level-high]\nkind = level-high\nponds = a, b\nhigh = 1.8 \n"
                          "priority = urgent\n");
    assert_int_equal(hs_site_load(path, &site, &diag), 0);
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
