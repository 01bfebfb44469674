/* Operator command validation and effects, with a real alarm engine and a
 * real store file: garbage, oversize, wrong types, unknown keys and ids,
 * repeated acks, shelving, and the replies queued on the right topics.
 * No science here. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hs_command.h"

struct fixture {
    char dir[64];
    hs_store *st;
    hs_alarm_engine *eng;
    hs_topics topics;
    hs_alarm_sink sink;
    hs_commands cmd;
};

static int64_t fake_now = 1000000;
static int64_t fake_clock(void) { return fake_now; }

static int setup(void **state)
{
    static struct fixture f;
    memset(&f, 0, sizeof f);
    snprintf(f.dir, sizeof f.dir, "/tmp/hs-cmd-test.XXXXXX");
    if (mkdtemp(f.dir) == NULL)
        return -1;
    char path[128], err[256];
    snprintf(path, sizeof path, "%s/h.db", f.dir);
    f.st = hs_store_open(path, HS_STORE_WRITE, NULL, err, sizeof err);
    f.eng = hs_alarm_new(1);
    if (f.st == NULL || f.eng == NULL || hs_topics_init(&f.topics, "halostage", "demo") != 0)
        return -1;
    hs_alarm_rule r;
    hs_alarm_rule_default(&r, HS_RULE_BITTERN_LIMIT);
    snprintf(r.name, sizeof r.name, "bittern");
    r.on_delay_ms = r.off_delay_ms = 0;
    if (hs_alarm_add(f.eng, &r, "crys-1") != HS_ALARM_DONE)
        return -1;
    f.sink = (hs_alarm_sink){.store = f.st, .topics = &f.topics};
    f.cmd = (hs_commands){.engine = f.eng, .sink = &f.sink, .topics = &f.topics,
                          .clock_ms = fake_clock};
    /* Raise the alarm: event 1. */
    hc_brine_state s;
    hc_state_clear(&s);
    s.baume = 29.5;
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &s;
    if (hs_alarm_update(f.eng, "crys-1", &in, fake_now, hs_alarm_sink_emit, &f.sink) !=
        HS_ALARM_DONE)
        return -1;
    *state = &f;
    return 0;
}

static int teardown(void **state)
{
    struct fixture *f = *state;
    hs_store_close(f->st);
    hs_alarm_free(f->eng);
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", f->dir);
    return system(cmd) == 0 ? 0 : -1;
}

/* Applies text as verb; returns the reply's "error" or "result" string in buf. */
static int run(struct fixture *f, const char *verb, const char *text, char *buf, size_t len)
{
    int ok = -1;
    json_t *r = hs_command_apply(&f->cmd, verb, text, strlen(text), 0, &ok);
    assert_non_null(r);
    assert_int_equal(json_is_true(json_object_get(r, "ok")), ok);
    json_t *what = json_object_get(r, ok ? "result" : "error");
    assert_true(json_is_string(what));
    snprintf(buf, len, "%s", json_string_value(what));
    json_decref(r);
    return ok;
}

static void refuses_garbage(void **state)
{
    struct fixture *f = *state;
    char msg[256];
    assert_int_equal(run(f, "ack", "\x01\xff{{", msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "not JSON"));
    assert_int_equal(run(f, "ack", "[1,2]", msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "JSON object"));
    assert_int_equal(run(f, "ack", "", msg, sizeof msg), 0);
    assert_int_equal(run(f, "reboot", "{}", msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "unknown command"));
    assert_int_equal(run(f, NULL, "{}", msg, sizeof msg), 0);
    /* Duplicate keys are ambiguous: refused. */
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"event_id\":2,\"operator\":\"x\"}", msg,
                         sizeof msg), 0);
}

static void refuses_oversize(void **state)
{
    struct fixture *f = *state;
    size_t n = HS_COMMAND_MAX_BYTES + 1;
    char *big = malloc(n + 1);
    assert_non_null(big);
    memset(big, ' ', n);
    big[0] = '{';
    big[n - 1] = '}';
    big[n] = '\0';
    char msg[256];
    assert_int_equal(run(f, "ack", big, msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "4096"));
    free(big);
    int ok = 1;
    json_t *r = hs_command_apply(&f->cmd, "ack", NULL, 100000, 1, &ok);
    assert_int_equal(ok, 0);
    json_decref(r);
}

static void refuses_wrong_types_and_keys(void **state)
{
    struct fixture *f = *state;
    char msg[256];
    assert_int_equal(run(f, "ack", "{\"event_id\":\"1\",\"operator\":\"ana\"}", msg, sizeof msg),
                     0);
    assert_non_null(strstr(msg, "event_id"));
    assert_int_equal(run(f, "ack", "{\"event_id\":1.5,\"operator\":\"ana\"}", msg, sizeof msg),
                     0);
    assert_int_equal(run(f, "ack", "{\"event_id\":-3,\"operator\":\"ana\"}", msg, sizeof msg),
                     0);
    assert_int_equal(run(f, "ack", "{\"event_id\":1}", msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "operator"));
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"operator\":7}", msg, sizeof msg), 0);
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"operator\":\"ana\",\"force\":true}", msg,
                         sizeof msg), 0);
    assert_non_null(strstr(msg, "force"));
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"pond\":\"crys-1\",\"operator\":\"ana\"}",
                         msg, sizeof msg), 0);
    assert_int_equal(run(f, "shelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                      "\"duration_s\":60.0,\"operator\":\"ana\"}", msg,
                         sizeof msg), 0);
    assert_non_null(strstr(msg, "duration_s"));
    assert_int_equal(run(f, "shelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                      "\"operator\":\"ana\"}", msg, sizeof msg), 0);
    assert_non_null(strstr(msg, "duration_s"));
    /* The alarm is untouched by all of that. */
    hs_alarm_info info;
    assert_int_equal(hs_alarm_get(f->eng, 0, &info), 0);
    assert_int_equal(info.state, HS_ALARM_UNACKED);
}

static void refuses_unknown_ids(void **state)
{
    struct fixture *f = *state;
    char msg[256];
    assert_int_equal(run(f, "ack", "{\"event_id\":999,\"operator\":\"ana\"}", msg, sizeof msg), 0);
    assert_string_equal(msg, "unknown event_id 999");
    assert_int_equal(run(f, "ack", "{\"pond\":\"nowhere\",\"operator\":\"ana\"}", msg,
                         sizeof msg), 0);
    assert_string_equal(msg, "unknown pond 'nowhere'");
    assert_int_equal(run(f, "shelve", "{\"pond\":\"crys-1\",\"rule\":\"nope\","
                                      "\"duration_s\":60,\"operator\":\"ana\"}", msg,
                         sizeof msg), 0);
    assert_string_equal(msg, "pond 'crys-1' has no alarm rule 'nope'");
}

static void ack_twice_says_so(void **state)
{
    struct fixture *f = *state;
    char msg[256];
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"operator\":\"ana\",\"request_id\":\"r1\"}",
                         msg, sizeof msg), 1);
    assert_string_equal(msg, "acknowledged");
    assert_int_equal(run(f, "ack", "{\"event_id\":1,\"operator\":\"ana\"}", msg, sizeof msg), 1);
    assert_string_equal(msg, "already-acknowledged");
    assert_int_equal(run(f, "ack", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                   "\"operator\":\"ana\"}", msg, sizeof msg), 1);
    assert_string_equal(msg, "already-acknowledged");
    /* One journal row for the raise, one for the single real ack. */
    uint64_t last;
    assert_int_equal(hs_store_last_event_id(f->st, &last), 0);
    assert_int_equal(last, 2);
}

static void shelve_then_unshelve(void **state)
{
    struct fixture *f = *state;
    char msg[256];
    assert_int_equal(run(f, "shelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                      "\"duration_s\":3600,\"operator\":\"ana\","
                                      "\"note\":\"hydrometer check\"}", msg, sizeof msg), 1);
    assert_string_equal(msg, "shelved");
    assert_int_equal(run(f, "shelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                      "\"duration_s\":864000,\"operator\":\"ana\"}", msg,
                         sizeof msg), 0); /* beyond the rule's 24 h */
    assert_int_equal(run(f, "unshelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                        "\"operator\":\"ana\"}", msg, sizeof msg), 1);
    assert_string_equal(msg, "unshelved");
    assert_int_equal(run(f, "unshelve", "{\"pond\":\"crys-1\",\"rule\":\"bittern\","
                                        "\"operator\":\"ana\"}", msg, sizeof msg), 1);
    assert_string_equal(msg, "not-shelved");
}

struct topics_seen {
    char topic[8][128];
    int n;
};

static int see_topic(void *ctx, const hs_outbox_msg *m)
{
    struct topics_seen *t = ctx;
    if (t->n < 8)
        snprintf(t->topic[t->n++], sizeof t->topic[0], "%s", m->topic);
    return 0;
}

static void replies_go_to_their_topics(void **state)
{
    struct fixture *f = *state;
    hs_command_on_message(&f->cmd, "halostage/demo/command/ack", "{oops", 5, 0, 0);
    const char *ack = "{\"event_id\":1,\"operator\":\"ana\",\"request_id\":\"r1\","
                      "\"time\":\"1970-01-01T00:16:40Z\"}";
    hs_command_on_message(&f->cmd, "halostage/demo/command/ack", ack, strlen(ack), 0, 0);
    struct topics_seen t = {0};
    assert_int_equal(hs_store_outbox_peek(f->st, 0, 8, see_topic, &t), 4);
    assert_string_equal(t.topic[0], "halostage/demo/alarm/crys-1/bittern"); /* the raise */
    assert_string_equal(t.topic[1], "halostage/demo/error");
    assert_string_equal(t.topic[2], "halostage/demo/alarm/crys-1/bittern"); /* the ack */
    assert_string_equal(t.topic[3], "halostage/demo/reply");
    assert_int_equal(f->cmd.accepted, 1);
    assert_int_equal(f->cmd.refused, 1);
    /* The CLI's queued form. */
    char *reply = hs_command_from_queue(&f->cmd, 1,
                                        "{\"command\":\"ack\",\"event_id\":1,\"operator\":\"b\"}");
    assert_non_null(reply);
    assert_non_null(strstr(reply, "already-acknowledged"));
    free(reply);
    reply = hs_command_from_queue(&f->cmd, 2, "{\"event_id\":1}");
    assert_non_null(strstr(reply, "\"ok\":false"));
    free(reply);
}

/* Reads the outbox rows after id *after into topic/payload pairs. */
struct rows_seen {
    char topic[16][128];
    char payload[16][512];
    int n;
};

static int see_row(void *ctx, const hs_outbox_msg *m)
{
    struct rows_seen *t = ctx;
    if (t->n < 16) {
        snprintf(t->topic[t->n], sizeof t->topic[0], "%s", m->topic);
        snprintf(t->payload[t->n], sizeof t->payload[0], "%.*s", (int)m->payload_len,
                 (const char *)m->payload);
        t->n++;
    }
    return 0;
}

static int64_t journal_rows(struct fixture *f)
{
    uint64_t last = 0;
    hs_store_flush(f->st);
    hs_store_last_event_id(f->st, &last);
    return (int64_t)last;
}

/* A retained command is never applied and is answered once, however often
 * the broker delivers it (a restart included: the answer is in the store). */
static void retained_refused_once(void **state)
{
    struct fixture *f = *state;
    const char *shelve = "{\"pond\":\"crys-1\",\"rule\":\"bittern\",\"duration_s\":3600,"
                         "\"operator\":\"ana\",\"request_id\":\"s1\","
                         "\"time\":\"1970-01-01T00:16:40Z\"}";
    int64_t before = journal_rows(f);
    for (int i = 0; i < 3; i++)
        hs_command_on_message(&f->cmd, "halostage/demo/command/shelve", shelve, strlen(shelve),
                              0, 1);
    assert_int_equal(journal_rows(f), before); /* nothing shelved */
    struct rows_seen t = {0};
    hs_store_outbox_peek(f->st, 0, 16, see_row, &t);
    int errors = 0;
    for (int i = 0; i < t.n; i++)
        if (strcmp(t.topic[i], "halostage/demo/error") == 0) {
            errors++;
            assert_non_null(strstr(t.payload[i], "retained command is never executed"));
        }
    assert_int_equal(errors, 1);
}

/* Over MQTT a command carries an id and a time: without them, or stale, it
 * is refused; a repeat gets its first answer again and is not re-applied. */
static void id_time_stale_and_repeat(void **state)
{
    struct fixture *f = *state;
    const char *topic = "halostage/demo/command/shelve";
    const char *no_id = "{\"pond\":\"crys-1\",\"rule\":\"bittern\",\"duration_s\":3600,"
                        "\"operator\":\"ana\"}";
    const char *stale = "{\"pond\":\"crys-1\",\"rule\":\"bittern\",\"duration_s\":3600,"
                        "\"operator\":\"ana\",\"request_id\":\"old\","
                        "\"time\":\"1970-01-01T00:05:00Z\"}"; /* 11 min 40 s before now */
    const char *fresh = "{\"pond\":\"crys-1\",\"rule\":\"bittern\",\"duration_s\":3600,"
                        "\"operator\":\"ana\",\"request_id\":\"new\","
                        "\"time\":\"1970-01-01T00:16:30.500Z\"}";
    int64_t before = journal_rows(f);
    hs_command_on_message(&f->cmd, topic, no_id, strlen(no_id), 0, 0);
    hs_command_on_message(&f->cmd, topic, stale, strlen(stale), 0, 0);
    assert_int_equal(journal_rows(f), before);
    hs_command_on_message(&f->cmd, topic, fresh, strlen(fresh), 0, 0);
    int64_t applied = journal_rows(f);
    assert_int_equal(applied, before + 1); /* shelved once */
    fake_now += 60000;
    hs_command_on_message(&f->cmd, topic, fresh, strlen(fresh), 0, 0);
    fake_now -= 60000;
    assert_int_equal(journal_rows(f), applied); /* the repeat changed nothing */
    struct rows_seen t = {0};
    hs_store_outbox_peek(f->st, 0, 16, see_row, &t);
    int missing = 0, stale_seen = 0, shelved = 0, repeat = 0;
    for (int i = 0; i < t.n; i++) {
        missing += strstr(t.payload[i], "missing key 'request_id'") != NULL;
        stale_seen += strstr(t.payload[i], "stale: sent at 1970-01-01T00:05:00Z, 700 s ago") != NULL;
        shelved += strstr(t.payload[i], "\"result\":\"shelved\"") != NULL &&
                   strstr(t.payload[i], "\"repeat\"") == NULL;
        repeat += strstr(t.payload[i], "\"repeat\":true") != NULL &&
                  strstr(t.payload[i], "\"result\":\"shelved\"") != NULL;
    }
    assert_int_equal(missing, 1);
    assert_int_equal(stale_seen, 1);
    assert_int_equal(shelved, 1);
    assert_int_equal(repeat, 1);
}

static void command_times_parse(void **unused)
{
    (void)unused;
    int64_t t;
    assert_int_equal(hs_command_parse_time("2026-01-01T00:00:00Z", &t), 0);
    assert_int_equal(t, INT64_C(1767225600000));
    assert_int_equal(hs_command_parse_time("2026-01-01T00:00:00.25Z", &t), 0);
    assert_int_equal(t, INT64_C(1767225600250));
    assert_int_equal(hs_command_parse_time("2026-01-01T00:00:00", &t), -1); /* no zone */
    assert_int_equal(hs_command_parse_time("2026-01-01T00:00:00+01:00", &t), -1);
    assert_int_equal(hs_command_parse_time("yesterday", &t), -1);
    assert_int_equal(hs_command_parse_time("2026-01-01T00:00:00.Z", &t), -1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(refuses_garbage, setup, teardown),
        cmocka_unit_test_setup_teardown(refuses_oversize, setup, teardown),
        cmocka_unit_test_setup_teardown(refuses_wrong_types_and_keys, setup, teardown),
        cmocka_unit_test_setup_teardown(refuses_unknown_ids, setup, teardown),
        cmocka_unit_test_setup_teardown(ack_twice_says_so, setup, teardown),
        cmocka_unit_test_setup_teardown(shelve_then_unshelve, setup, teardown),
        cmocka_unit_test_setup_teardown(replies_go_to_their_topics, setup, teardown),
        cmocka_unit_test_setup_teardown(retained_refused_once, setup, teardown),
        cmocka_unit_test_setup_teardown(id_time_stale_and_repeat, setup, teardown),
        cmocka_unit_test(command_times_parse),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
