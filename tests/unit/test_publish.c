/* Topics, payloads and link options of the MQTT side, without a broker
 * (the broker tests are tests/integration/test_mqtt_*.sh). No science here. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "hs_publish.h"

static void topics_refuse_wildcards(void **unused)
{
    (void)unused;
    hs_topics t;
    char buf[HS_TOPIC_MAX];
    assert_int_equal(hs_topics_init(&t, "halostage", "demo"), 0);
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "alarm", "crys-1", "bittern"), 0);
    assert_string_equal(buf, "halostage/demo/alarm/crys-1/bittern");
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "gateway", NULL, NULL), 0);
    assert_string_equal(buf, "halostage/demo/gateway");
    assert_int_equal(hs_topic_commands(buf, sizeof buf, &t), 0);
    assert_string_equal(buf, "halostage/demo/command/#");
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "alarm", "a/b", "x"), -1);
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "alarm", "a", "#"), -1);
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "alarm", "+", "x"), -1);
    assert_int_equal(hs_topic(buf, sizeof buf, &t, "alarm", "", "x"), -1);
    assert_int_equal(hs_topic(buf, 20, &t, "alarm", "crys-1", "bittern"), -1); /* too long */
    assert_int_equal(hs_topics_init(&t, "plant/halostage", "demo"), 0);
    assert_int_equal(hs_topics_init(&t, "halostage/", "demo"), -1);
    assert_int_equal(hs_topics_init(&t, "halo#", "demo"), -1);
    assert_int_equal(hs_topics_init(&t, "halostage", "de/mo"), -1);
}

static void iso_times_are_utc(void **unused)
{
    (void)unused;
    char buf[40];
    hs_iso8601_ms(buf, sizeof buf, INT64_C(1767225600123));
    assert_string_equal(buf, "2026-01-01T00:00:00.123Z");
    hs_iso8601_ms(buf, sizeof buf, 0);
    assert_string_equal(buf, "1970-01-01T00:00:00.000Z");
}

static void state_payload_carries_units(void **unused)
{
    (void)unused;
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_kg_m3 = 1212.5;
    s.stage = HC_STAGE_HALITE;
    hs_pond_extra x;
    hs_pond_extra_clear(&x);
    x.depth_m = 0.31;
    json_t *o = hs_state_payload("crys-1", INT64_C(1767225600000), &s, &x, HS_QUALITY_GOOD);
    assert_non_null(o);
    assert_true(fabs(json_real_value(json_object_get(o, "density_kg_m3")) - 1212.5) < 1e-12);
    assert_true(json_is_null(json_object_get(o, "temperature_c"))); /* unknown: null */
    assert_true(fabs(json_real_value(json_object_get(o, "depth_m")) - 0.31) < 1e-12);
    assert_true(json_is_null(json_object_get(o, "volume_m3")));
    assert_string_equal(json_string_value(json_object_get(o, "stage")), "halite");
    assert_string_equal(json_string_value(json_object_get(o, "quality")), "good");
    assert_string_equal(json_string_value(json_object_get(o, "time")), "2026-01-01T00:00:00.000Z");
    json_decref(o);
}

static void alarm_payload_fields(void **unused)
{
    (void)unused;
    hs_alarm_event ev = {
        .event_id = 42, .episode_id = 40, .t_ms = 1000, .pond = "crys-1", .rule = "bittern",
        .kind = HS_RULE_BITTERN_LIMIT, .from = HS_ALARM_UNACKED, .to = HS_ALARM_ACKED,
        .active = 1, .cause = "acknowledged", .quantity = HS_QTY_BAUME, .value = 29.4,
        .limit = 29.0, .priority = HS_PRIORITY_HIGH, .actor = "ana", .note = NULL,
    };
    json_t *o = hs_alarm_payload(&ev);
    assert_int_equal(json_integer_value(json_object_get(o, "event_id")), 42);
    assert_int_equal(json_integer_value(json_object_get(o, "episode_id")), 40);
    assert_string_equal(json_string_value(json_object_get(o, "from")), "unacknowledged");
    assert_string_equal(json_string_value(json_object_get(o, "state")), "acknowledged");
    assert_string_equal(json_string_value(json_object_get(o, "quantity")), "baume");
    assert_string_equal(json_string_value(json_object_get(o, "priority")), "high");
    assert_string_equal(json_string_value(json_object_get(o, "actor")), "ana");
    assert_true(json_is_null(json_object_get(o, "note")));
    assert_null(json_object_get(o, "shelved_until"));
    json_decref(o);
    char *gw = hs_gateway_payload(&(hs_topics){"halostage", "demo"}, 0);
    assert_string_equal(gw, "{\"online\":false,\"site\":\"demo\"}");
    free(gw);
}

static void link_options_checked(void **unused)
{
    (void)unused;
    char err[256];
    hp_mqtt_options o = {.uri = "mqtts://127.0.0.1:8883", .client_id = "t"};
    assert_null(hp_mqtt_new(&o, err, sizeof err));
    assert_non_null(strstr(err, "CA file"));
    o.uri = "http://127.0.0.1:1883";
    assert_null(hp_mqtt_new(&o, err, sizeof err));
    assert_non_null(strstr(err, "mqtt://"));
    o.uri = "mqtt://127.0.0.1:1883";
    o.cert_file = "gw.pem";
    assert_null(hp_mqtt_new(&o, err, sizeof err));
    assert_non_null(strstr(err, "key"));
    o.cert_file = NULL;
    o.client_id = "";
    assert_null(hp_mqtt_new(&o, err, sizeof err));
    o.client_id = "t";
    hp_mqtt *m = hp_mqtt_new(&o, err, sizeof err);
    assert_non_null(m);
    assert_int_equal(hp_mqtt_connected(m), 0);
    assert_int_equal(hp_mqtt_publish(m, "x", "y", 1, 1, 0, 1), -1); /* not connected */
    hp_mqtt_free(m, 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(topics_refuse_wildcards),
        cmocka_unit_test(iso_times_are_utc),
        cmocka_unit_test(state_payload_carries_units),
        cmocka_unit_test(alarm_payload_fields),
        cmocka_unit_test(link_options_checked),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
