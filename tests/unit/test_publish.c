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

#include "hs_pond_doc.h"
#include "hs_publish.h"
#include "hs_store.h"

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

/* The pond-state document: unknown is null, units in the names, one shape
 * of the day counts, and numbers with their digits, not binary noise. */
static void pond_doc_shape_and_digits(void **unused)
{
    (void)unused;
    struct hs_pond_doc d;
    hs_pond_doc_init(&d);
    d.pond = "crys-1";
    d.role = "crystalliser";
    d.t_ms = INT64_C(1767225600000);
    d.quality = HS_QUALITY_GOOD;
    d.state.density_kg_m3 = 1212.5;
    d.state.temperature_c = 16.9 + 2e-15; /* 16.900000000000002 in %.17g */
    d.state.stage = HC_STAGE_HALITE;
    d.hydro.depth_m = 0.31;
    d.hydro.days_to_target_low = 3.0;
    d.hydro.days_to_target_high = 7.123456789;
    json_t *o = hs_pond_doc_json(&d);
    assert_non_null(o);
    assert_true(fabs(json_real_value(json_object_get(o, "density_kg_m3")) - 1212.5) < 1e-12);
    assert_true(json_is_null(json_object_get(o, "practical_salinity"))); /* unknown: null */
    assert_true(json_is_null(json_object_get(o, "volume_m3")));
    assert_true(json_is_null(json_object_get(o, "level_quality")));
    assert_true(json_is_null(json_object_get(o, "note")));
    assert_string_equal(json_string_value(json_object_get(o, "stage")), "halite");
    assert_string_equal(json_string_value(json_object_get(o, "quality")), "good");
    assert_string_equal(json_string_value(json_object_get(o, "role")), "crystalliser");
    assert_string_equal(json_string_value(json_object_get(o, "time")), "2026-01-01T00:00:00.000Z");
    json_t *days = json_object_get(o, "days_to_target");
    assert_true(json_is_object(days)); /* one shape: {low, expected, high} */
    assert_true(json_is_null(json_object_get(days, "expected")));
    assert_null(json_object_get(o, "days_to_target_low"));
    char *text = hs_doc_dumps(o);
    assert_non_null(text);
    assert_non_null(strstr(text, "\"temperature_c\":16.9,"));
    assert_non_null(strstr(text, "\"high\":7.123}")); /* a forecast: 4 digits */
    assert_non_null(strstr(text, "\"depth_m\":0.31,"));
    assert_null(strstr(text, "0000000"));
    free(text);
    json_decref(o);
}

/* A stored row gives the same keys, in the same order, as a live one. */
static void pond_doc_from_row_same_keys(void **unused)
{
    (void)unused;
    struct hs_pond_doc live, stored;
    hs_pond_doc_init(&live);
    live.pond = "a";
    hs_state_row row;
    memset(&row, 0, sizeof row);
    hc_state_clear(&row.state);
    hs_pond_extra_clear(&row.extra);
    row.t_ms = 1000;
    row.extra.volume_m3 = 1234567.891;
    row.extra.dissolved_salt_t = 55.5;
    hs_pond_doc_from_row(&stored, &row, "a", NULL);
    json_t *a = hs_pond_doc_json(&live), *b = hs_pond_doc_json(&stored);
    assert_int_equal(json_object_size(a), json_object_size(b));
    void *ia = json_object_iter(a), *ib = json_object_iter(b);
    for (; ia != NULL && ib != NULL; ia = json_object_iter_next(a, ia),
                                     ib = json_object_iter_next(b, ib))
        assert_string_equal(json_object_iter_key(ia), json_object_iter_key(ib));
    char *text = hs_doc_dumps(b);
    assert_non_null(strstr(text, "\"volume_m3\":1234568.0,"));
    assert_non_null(strstr(text, "\"dissolved_salt_t\":55.5,"));
    free(text);
    json_decref(a);
    json_decref(b);
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

/* An acknowledgement deletes its row in the open batch and waits for the
 * next commit: the writer no longer sends the row, a reader of the file still
 * sees it until the commit (a crash before it only repeats the message). */
static int count_row(void *ctx, const hs_outbox_msg *m)
{
    (void)m;
    (*(int *)ctx)++;
    return 0;
}

static int64_t committed_rows(const char *path)
{
    char err[256];
    hs_store *r = hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err);
    assert_non_null(r);
    int64_t n = -1;
    assert_int_equal(hs_store_outbox_count(r, &n), 0);
    hs_store_close(r);
    return n;
}

static void ack_waits_for_the_commit(void **unused)
{
    (void)unused;
    char dir[] = "/tmp/hs-publish-test.XXXXXX", path[64], err[256];
    assert_non_null(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/h.db", dir);
    hs_store *st = hs_store_open(path, HS_STORE_WRITE, NULL, err, sizeof err);
    assert_non_null(st);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/1", "x", 1, 1, 0), 0);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/2", "y", 1, 1, 0), 0);
    assert_int_equal(hs_store_flush(st), 0);
    assert_int_equal(committed_rows(path), 2);
    int64_t first = 1;
    assert_int_equal(hs_store_outbox_done(st, &first, 1), 0);
    int left = 0;
    assert_int_equal(hs_store_outbox_peek(st, 0, 10, count_row, &left), 1);
    assert_int_equal(left, 1);              /* the writer sends only the other one */
    assert_int_equal(committed_rows(path), 2); /* the delete is not on disk yet */
    assert_int_equal(hs_store_commit_due(st, 1), 1);
    assert_int_equal(committed_rows(path), 1);
    hs_store_close(st);
    char rm[96];
    snprintf(rm, sizeof rm, "rm -rf %s", dir);
    assert_int_equal(system(rm), 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(topics_refuse_wildcards),
        cmocka_unit_test(iso_times_are_utc),
        cmocka_unit_test(pond_doc_shape_and_digits),
        cmocka_unit_test(pond_doc_from_row_same_keys),
        cmocka_unit_test(alarm_payload_fields),
        cmocka_unit_test(link_options_checked),
        cmocka_unit_test(ack_waits_for_the_commit),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
