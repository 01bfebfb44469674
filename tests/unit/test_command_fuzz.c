/* Operator commands against garbage: thousands of random byte strings and
 * random JSON documents (seeded, so a failure repeats) through the
 * validator, and a thousand through the MQTT entry point with random
 * topics. Every one must get a reply that is itself valid JSON with a
 * boolean "ok" and, when refused, a non-empty "error"; every message on the
 * command topic must leave exactly one reply in the outbox. Runs under
 * ASan/UBSan in `make check`. No science here. */
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

#define BYTE_CASES 3000
#define JSON_CASES 5000
#define TOPIC_CASES 1000

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
    snprintf(f.dir, sizeof f.dir, "/tmp/hs-cmdfuzz.XXXXXX");
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

static uint64_t rng_state;
static uint64_t rnd(void)
{
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return rng_state * 2685821657736338717ull;
}
static size_t pick(size_t n) { return n == 0 ? 0 : (size_t)(rnd() % n); }

static const char *const verbs[] = {"ack", "shelve", "unshelve", "reboot", "", "ACK",
                                    "ack/extra", "\xff\xfe", "shelve\x01"};
static const char *const keys[] = {"event_id", "pond", "rule", "duration_s", "operator",
                                   "note", "request_id", "command", "", "Pond",
                                   "\xc3\xa9tang", "x"};
static const char *const strings[] = {
    "crys-1", "bittern", "c1", "", "a", "nobody", "\xc3\xa9", "\xe2\x82\xac\xe2\x82\xac",
    "'; DROP TABLE outbox; --", "%s%s%n%n", "\\u0000", "+/#", "\n\r\t",
    "\xf0\x9f\x8c\x8a\xf0\x9f\x8c\x8a\xf0\x9f\x8c\x8a", "1e999", "-0",
};

/* A random string: one of the above, or random printable/multibyte text of
 * a length around the validator's limits. */
static json_t *random_string(void)
{
    if (pick(3) > 0)
        return json_string(strings[pick(sizeof strings / sizeof *strings)]);
    size_t n = pick(4) == 0 ? 60 + pick(10) : pick(300);
    char *s = malloc(4 * n + 1);
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        if (pick(5) == 0) { /* U+00E9 or U+20AC: splits badly when cut at a byte count */
            if (pick(2)) { s[k++] = (char)0xc3; s[k++] = (char)0xa9; }
            else { s[k++] = (char)0xe2; s[k++] = (char)0x82; s[k++] = (char)0xac; }
        } else {
            s[k++] = (char)(' ' + pick(95));
        }
    }
    s[k] = '\0';
    json_t *j = json_string(s);
    free(s);
    return j;
}

static json_t *random_value(int depth)
{
    switch (pick(depth > 2 ? 7 : 9)) {
    case 0: return json_integer((json_int_t)(rnd() >> pick(64)) * (pick(2) ? 1 : -1));
    case 1: return json_integer((json_int_t)pick(5) - 1);
    case 2: return json_real((double)(int64_t)rnd() / 1e3);
    case 3: return json_null();
    case 4: return json_boolean(pick(2));
    case 5: case 6: return random_string();
    case 7: {
        json_t *a = json_array();
        for (size_t i = pick(4); i > 0; i--)
            json_array_append_new(a, random_value(depth + 1));
        return a;
    }
    default: {
        json_t *o = json_object();
        for (size_t i = pick(4); i > 0; i--)
            json_object_set_new(o, keys[pick(sizeof keys / sizeof *keys)], random_value(depth + 1));
        return o;
    }
    }
}

/* A command-shaped object: mostly known keys with plausible or wrong values. */
static json_t *random_command(void)
{
    json_t *o = json_object();
    size_t extra = pick(7);
    if (pick(2)) { /* a valid command for any verb, then perhaps spoiled */
        json_object_set_new(o, "operator", json_string("brine-master"));
        json_object_set_new(o, "pond", json_string("crys-1"));
        json_object_set_new(o, "rule", json_string("bittern"));
        if (pick(2))
            json_object_set_new(o, "duration_s", json_integer(600));
        extra = pick(3);
    }
    for (size_t i = extra; i > 0; i--) {
        const char *k = keys[pick(sizeof keys / sizeof *keys)];
        json_t *v;
        if (strcmp(k, "event_id") == 0 && pick(2))
            v = json_integer((json_int_t)pick(4));
        else if (strcmp(k, "duration_s") == 0 && pick(2))
            v = json_integer((json_int_t)pick(2) ? 3600 : (json_int_t)366 * 86400 + (json_int_t)pick(3) - 1);
        else if (strcmp(k, "pond") == 0 && pick(2))
            v = json_string(pick(2) ? "crys-1" : "c9");
        else if (strcmp(k, "rule") == 0 && pick(2))
            v = json_string("bittern");
        else if (strcmp(k, "operator") == 0 && pick(2))
            v = json_string("brine-master");
        else
            v = random_value(1);
        json_object_set_new(o, k, v);
    }
    return o;
}

/* The reply contract: valid JSON, boolean ok matching *ok, an error text when refused. */
static void check_reply(json_t *r, int ok, unsigned c)
{
    if (r == NULL)
        fail_msg("case %u: no reply", c);
    json_t *okv = json_object_get(r, "ok");
    if (!json_is_boolean(okv) || json_is_true(okv) != ok)
        fail_msg("case %u: ok missing or disagrees", c);
    if (!ok) {
        json_t *e = json_object_get(r, "error");
        if (!json_is_string(e) || json_string_length(e) == 0)
            fail_msg("case %u: refused without an error text", c);
    } else if (!json_is_string(json_object_get(r, "result"))) {
        fail_msg("case %u: accepted without a result", c);
    }
    char *text = json_dumps(r, JSON_COMPACT);
    if (text == NULL)
        fail_msg("case %u: reply cannot be written as JSON", c);
    free(text);
}

static void random_bytes_are_refused(void **state)
{
    struct fixture *f = *state;
    rng_state = 0x0b5e55ed5a17ull;
    unsigned char buf[512];
    for (unsigned c = 0; c < BYTE_CASES; c++) {
        size_t n = pick(sizeof buf);
        for (size_t i = 0; i < n; i++)
            buf[i] = (unsigned char)rnd();
        if (n > 0 && pick(2))
            buf[0] = '{';
        const char *verb = verbs[pick(sizeof verbs / sizeof *verbs)];
        int ok = -1;
        json_t *r = hs_command_apply(&f->cmd, pick(20) ? verb : NULL, buf, n, (int)(pick(50) == 0), &ok);
        check_reply(r, ok, c);
        /* Random bytes are never a valid command (no operator key). */
        assert_int_equal(ok, 0);
        json_decref(r);
    }
    print_message("command fuzz: %u random byte payloads, all refused with a reason\n", BYTE_CASES);
}

static void random_json_gets_a_reply(void **state)
{
    struct fixture *f = *state;
    rng_state = 0xc0ffee5eed01ull;
    unsigned accepted = 0, refused = 0;
    for (unsigned c = 0; c < JSON_CASES; c++) {
        json_t *doc = pick(4) ? random_command() : random_value(0);
        char *text = json_dumps(doc, JSON_COMPACT | JSON_ENCODE_ANY);
        json_decref(doc);
        assert_non_null(text);
        size_t n = strlen(text);
        if (pick(5) == 0 && n > 0) { /* then mangle it */
            if (pick(2))
                n = pick(n);
            else
                text[pick(n)] ^= (char)(1u << pick(8));
        }
        const char *verb = verbs[pick(4) ? pick(3) : pick(sizeof verbs / sizeof *verbs)];
        int ok = -1;
        json_t *r = hs_command_apply(&f->cmd, verb, text, n, 0, &ok);
        check_reply(r, ok, c);
        ok ? accepted++ : refused++;
        json_decref(r);
        free(text);
    }
    print_message("command fuzz: %u JSON payloads, %u accepted, %u refused\n", JSON_CASES,
                  accepted, refused);
    assert_true(accepted > 0 && refused > JSON_CASES / 2);
}

/* Keys cut at the reply's length limit must still give a valid error text. */
static void long_multibyte_key_is_refused_cleanly(void **state)
{
    struct fixture *f = *state;
    char text[400] = "{\"a";
    size_t k = 3; /* one ASCII byte first: a cut at 60 bytes splits a character */
    for (int i = 0; i < 100; i++) {
        text[k++] = (char)0xe2; text[k++] = (char)0x82; text[k++] = (char)0xac;
    }
    memcpy(text + k, "\":1}", 5);
    int ok = -1;
    json_t *r = hs_command_apply(&f->cmd, "ack", text, strlen(text), 0, &ok);
    check_reply(r, ok, 0);
    assert_int_equal(ok, 0);
    assert_non_null(strstr(json_string_value(json_object_get(r, "error")), "is not part of"));
    json_decref(r);
}

struct reply_count {
    unsigned replies;
    int64_t last_id;
};

/* Counts outbox rows that are command replies; each must be valid JSON. */
static int count_reply(void *ctx, const hs_outbox_msg *m)
{
    struct reply_count *rc = ctx;
    rc->last_id = m->id;
    if (m->kind != HS_MSG_REPLY)
        return 0;
    json_t *j = json_loadb(m->payload, m->payload_len, 0, NULL);
    if (j != NULL && json_is_boolean(json_object_get(j, "ok")))
        rc->replies++;
    json_decref(j);
    return 0;
}

static void every_message_gets_one_reply(void **state)
{
    struct fixture *f = *state;
    rng_state = 0x70b1c5ull;
    struct reply_count before = {0, 0}, after = {0, 0};
    while (hs_store_outbox_peek(f->st, before.last_id, 1000, count_reply, &before) > 0)
        ;
    int64_t seen = f->cmd.accepted + f->cmd.refused;
    unsigned expect = 0;
    char topic[200];
    for (unsigned c = 0; c < TOPIC_CASES; c++) {
        const char *verb = verbs[pick(sizeof verbs / sizeof *verbs)];
        switch (pick(4)) {
        case 0: snprintf(topic, sizeof topic, "halostage/demo/command/%s", verb); break;
        case 1: snprintf(topic, sizeof topic, "halostage/demo/command"); break;
        case 2: snprintf(topic, sizeof topic, "halostage/other/command/%s", verb); break;
        default: snprintf(topic, sizeof topic, "halostage/demo/command/%s/%s", verb, verb); break;
        }
        json_t *doc = random_command();
        char *text = json_dumps(doc, JSON_COMPACT);
        json_decref(doc);
        hs_command_on_message(&f->cmd, topic, text, strlen(text), 0, 0);
        free(text);
        expect++;
    }
    hs_command_on_message(&f->cmd, NULL, NULL, 0, 0, 0);
    expect++;
    assert_int_equal(f->cmd.accepted + f->cmd.refused - seen, expect);
    after.last_id = before.last_id;
    while (hs_store_outbox_peek(f->st, after.last_id, 1000, count_reply, &after) > 0)
        ;
    assert_int_equal(after.replies, expect);
    print_message("command fuzz: %u messages on random topics, %u replies queued\n", expect,
                  after.replies);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(random_bytes_are_refused, setup, teardown),
        cmocka_unit_test_setup_teardown(random_json_gets_a_reply, setup, teardown),
        cmocka_unit_test_setup_teardown(long_multibyte_key_is_refused_cleanly, setup, teardown),
        cmocka_unit_test_setup_teardown(every_message_gets_one_reply, setup, teardown),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
