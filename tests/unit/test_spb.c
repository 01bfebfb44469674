/* Sparkplug B payloads and metrics: encoding read back with protobuf-c's
 * own unpacker (the wire decoding the integration test repeats with
 * Python's protobuf), commands other than a rebirth refused, garbage
 * survived, STATE documents, and report by exception with deadbands
 * (Eclipse Sparkplug 3.0.0, chapter 6). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "hp_spb.h"
#include "hs_spb_metrics.h"
#include "protocol/sparkplug_b.pb-c.h"

static void birth_round_trip(void **state)
{
    (void)state;
    hs_scada_pond p;
    hs_scada_pond_clear(&p);
    p.have = 1;
    p.number[2] = 25.5; /* baume */
    p.code[HS_CODE_STAGE] = 4;
    p.code[HS_CODE_QUALITY] = 0;
    hp_spb_metric m[HS_SPB_POND_METRICS_MAX];
    size_t n = hs_spb_pond_birth(1, &p, m);
    assert_int_equal(n, hs_scada_pond_n_points + 6);
    uint8_t *buf;
    size_t len;
    assert_int_equal(hp_spb_encode(1700000000123ull, 7, m, n, &buf, &len), 0);
    Halostage__Spb__Payload *d = halostage__spb__payload__unpack(NULL, len, buf);
    free(buf);
    assert_non_null(d);
    assert_true(d->has_seq);
    assert_int_equal(d->seq, 7);
    assert_int_equal(d->timestamp, 1700000000123ull);
    assert_int_equal(d->n_metrics, n);
    const Halostage__Spb__Payload__Metric *be = d->metrics[2];
    assert_string_equal(be->name, "baume");
    assert_int_equal(be->alias, 2002);
    assert_int_equal(be->datatype, 9);
    assert_float_equal(be->float_value, 25.5, 0);
    assert_string_equal(be->properties->keys[0], "unit");
    assert_string_equal(be->properties->values[0]->string_value, "degBe");
    const Halostage__Spb__Payload__Metric *rho = d->metrics[0]; /* unknown: null */
    assert_true(rho->has_is_null && rho->is_null);
    const Halostage__Spb__Payload__Metric *stage = d->metrics[hs_scada_pond_n_points];
    assert_string_equal(stage->name, "stage");
    assert_string_equal(stage->string_value, "halite");
    halostage__spb__payload__free_unpacked(d, NULL);
}

static void exceptions_respect_deadbands(void **state)
{
    (void)state;
    hs_scada_pond sent, now;
    hs_scada_pond_clear(&sent);
    sent.have = 1;
    sent.number[0] = 1200.00; /* density_ref, deadband 0.05 */
    sent.number[2] = 24.00;   /* baume, deadband 0.01 */
    now = sent;
    hp_spb_metric m[HS_SPB_POND_METRICS_MAX];
    now.number[0] = 1200.04;
    assert_int_equal(hs_spb_pond_changes(0, &sent, &now, m), 0);
    now.number[0] = 1200.06; /* past the deadband from what was sent */
    now.number[2] = 24.005;
    assert_int_equal(hs_spb_pond_changes(0, &sent, &now, m), 1);
    assert_int_equal(m[0].alias, 1000);
    assert_null(m[0].name);
    assert_float_equal(sent.number[0], 1200.06, 0);
    assert_float_equal(sent.number[2], 24.00, 0); /* not sent, not moved */
    now.number[2] = NAN; /* becoming unknown is a change */
    now.code[HS_CODE_STAGE] = 5;
    assert_int_equal(hs_spb_pond_changes(0, &sent, &now, m), 2);
    assert_true(m[0].is_null);
    assert_int_equal(hs_spb_pond_changes(0, &sent, &now, m), 0);
    now.have = 0;
    assert_true(hs_spb_pond_dead(&now));
    now.have = 1;
    now.code[HS_CODE_QUALITY] = 3;
    assert_true(hs_spb_pond_dead(&now));
}

static void transfer_changes_only(void **state)
{
    (void)state;
    hs_scada_transfer sent = {.advice = 0xFFFF}, now = {.advice = 0, .pump_on = 0};
    hp_spb_metric m[3];
    assert_int_equal(hs_spb_transfer_changes(0, &sent, &now, m), 3); /* null -> known */
    now.advice = 1;
    now.pump_on = 1;
    assert_int_equal(hs_spb_transfer_changes(0, &sent, &now, m), 2);
    assert_string_equal(m[0].text, "run");
    now.reasons = 1u << 9;
    assert_int_equal(hs_spb_transfer_changes(0, &sent, &now, m), 1);
    assert_int_equal(m[0].alias, 102);
}

static size_t command(const char *name, int boolean, int value, uint8_t *out)
{
    Halostage__Spb__Payload p = HALOSTAGE__SPB__PAYLOAD__INIT;
    Halostage__Spb__Payload__Metric m = HALOSTAGE__SPB__PAYLOAD__METRIC__INIT;
    Halostage__Spb__Payload__Metric *list[1] = {&m};
    m.name = (char *)(uintptr_t)name;
    if (boolean) {
        m.value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_BOOLEAN_VALUE;
        m.boolean_value = value;
    } else {
        m.value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_INT_VALUE;
        m.int_value = (uint32_t)value;
    }
    p.n_metrics = 1;
    p.metrics = list;
    return halostage__spb__payload__pack(&p, out);
}

static void only_rebirth_is_accepted(void **state)
{
    (void)state;
    uint8_t buf[256];
    char why[160];
    size_t n = command("Node Control/Rebirth", 1, 1, buf);
    assert_int_equal(hp_spb_command_is(buf, n, "Node Control/Rebirth", why, sizeof why), 1);
    n = command("Node Control/Rebirth", 1, 0, buf);
    assert_int_equal(hp_spb_command_is(buf, n, "Node Control/Rebirth", why, sizeof why), 0);
    n = command("Node Control/Rebirth", 0, 1, buf);
    assert_int_equal(hp_spb_command_is(buf, n, "Node Control/Rebirth", why, sizeof why), 0);
    assert_non_null(strstr(why, "Boolean"));
    n = command("transfer/t1/pump_on", 1, 1, buf);
    assert_int_equal(hp_spb_command_is(buf, n, "Node Control/Rebirth", why, sizeof why), 0);
    assert_non_null(strstr(why, "refused"));
    /* garbage: never accepted, never a crash (fixed seed, reproducible) */
    unsigned seed = 14;
    int accepted = 0;
    for (int round = 0; round < 20000; round++) {
        size_t len = (size_t)(rand_r(&seed) % 64);
        for (size_t i = 0; i < len; i++)
            buf[i] = (uint8_t)rand_r(&seed);
        accepted += hp_spb_command_is(buf, len, "Node Control/Rebirth", why, sizeof why) == 1;
    }
    assert_int_equal(accepted, 0);
}

static void state_documents(void **state)
{
    (void)state;
    int online = -1;
    uint64_t ts = 0;
    const char *on = "{\"online\": true, \"timestamp\": 1700000000000}";
    assert_int_equal(hp_spb_state_parse(on, strlen(on), &online, &ts), 0);
    assert_int_equal(online, 1);
    assert_int_equal(ts, 1700000000000ull);
    const char *bad[] = {"ONLINE", "{\"online\": 1, \"timestamp\": 5}", "{\"online\": true}",
                         "{\"online\": false, \"timestamp\": -3}", ""};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
        assert_int_equal(hp_spb_state_parse(bad[i], strlen(bad[i]), &online, &ts), -1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(birth_round_trip),
        cmocka_unit_test(exceptions_respect_deadbands),
        cmocka_unit_test(transfer_changes_only),
        cmocka_unit_test(only_rebirth_is_accepted),
        cmocka_unit_test(state_documents),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
