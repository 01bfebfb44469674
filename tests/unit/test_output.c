/* Unit tests of the pump-output command/feedback pair (plugin/hs_output.h):
 * a fake device answers each request; every case drives the state machine
 * with a fake clock. Logic only: no bus, no time. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "hs_output.h"

/* A fake device: applies or ignores writes and answers when asked. */
struct fake {
    int coil;          /* the device's output */
    int apply;         /* writes change coil */
    int answer;        /* requests are answered */
    uint32_t next_seq;
    struct hs_out_answer last;
    int have_last;
    int sends, reads;
};

static hs_out_action run_step(struct fake *f, struct hs_output *o, const struct hs_out_timing *t,
                              int want, int hands_off, int64_t now, struct hs_out_events *ev)
{
    hs_out_action a = hs_output_step(o, t, want, hands_off, now, f->have_last ? &f->last : NULL, ev);
    if (a == HS_OUT_NONE)
        return a;
    uint32_t seq = ++f->next_seq;
    hs_output_asked(o, seq, now);
    if (a == HS_OUT_SEND) {
        f->sends++;
        if (f->apply)
            f->coil = want;
    } else {
        f->reads++;
    }
    if (f->answer) {
        f->last = (struct hs_out_answer){seq, 1, 1, f->coil};
        f->have_last = 1;
    }
    return a;
}

static void timing(struct hs_out_timing *t)
{
    hs_output_timing_default(t);
    t->answer_ms = 500;
    t->confirm_ms = 2000;
    t->backoff_min_ms = 100;
    t->backoff_max_ms = 800;
    t->verify_ms = 1000;
}

/* Read back first: a device that already matches is not written at all. */
static void read_back_first(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct fake f = {.coil = 0, .apply = 1, .answer = 1};
    struct hs_out_events ev;
    assert_int_equal(run_step(&f, &o, &t, 0, 0, 0, &ev), HS_OUT_READ);
    assert_int_equal(run_step(&f, &o, &t, 0, 0, 100, &ev), HS_OUT_NONE);
    assert_int_equal(ev.confirmed, 1);
    assert_int_equal(f.sends, 0);
    assert_int_equal(o.state, HS_OUT_CONFIRMED);
    /* a new decision is sent at once and confirmed by its read-back */
    assert_int_equal(run_step(&f, &o, &t, 1, 0, 200, &ev), HS_OUT_SEND);
    assert_int_equal(ev.sent, 1);
    run_step(&f, &o, &t, 1, 0, 300, &ev);
    assert_int_equal(ev.confirmed, 1);
    assert_int_equal(f.coil, 1);
}

/* Point 1: a STOP the device does not carry out is re-sent at once, then
 * with back-off, and FAILED after confirm_ms; a late success recovers. */
static void resend_until_confirmed(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct fake f = {.coil = 1, .apply = 1, .answer = 1};
    struct hs_out_events ev;
    run_step(&f, &o, &t, 1, 0, 0, &ev);
    run_step(&f, &o, &t, 1, 0, 10, &ev);
    assert_int_equal(o.state, HS_OUT_CONFIRMED);
    f.apply = 0; /* the device acknowledges but does not apply (or drops) */
    int64_t now = 1000;
    int sends = f.sends, failed = 0, first_resend_at = -1;
    assert_int_equal(run_step(&f, &o, &t, 0, 0, now, &ev), HS_OUT_SEND);
    for (now = 1010; now < 5000; now += 10) {
        hs_out_action a = run_step(&f, &o, &t, 0, 0, now, &ev);
        if (a == HS_OUT_SEND && first_resend_at < 0)
            first_resend_at = (int)(now - 1000);
        failed += ev.failed;
        assert_int_equal(ev.confirmed, 0);
    }
    assert_int_equal(first_resend_at, 10); /* at once: the next step */
    assert_int_equal(failed, 1);           /* one alarm */
    assert_int_equal(o.state, HS_OUT_FAILED);
    int n = f.sends - sends;
    assert_true(n >= 6 && n <= 16);        /* re-sent, bounded by the back-off */
    f.apply = 1;
    int recovered = 0;
    for (; now < 7000 && !recovered; now += 10) {
        run_step(&f, &o, &t, 0, 0, now, &ev);
        recovered = ev.recovered;
    }
    assert_int_equal(recovered, 1);
    assert_int_equal(o.state, HS_OUT_CONFIRMED);
    assert_int_equal(f.coil, 0);
}

/* No answer at all (a hung device): re-asked after answer_ms. */
static void no_answer(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct fake f = {.coil = 0, .apply = 1, .answer = 0};
    struct hs_out_events ev;
    int failed = 0;
    for (int64_t now = 0; now < 3000; now += 10) {
        run_step(&f, &o, &t, 1, 0, now, &ev);
        failed += ev.failed;
    }
    assert_int_equal(failed, 1);
    assert_true(f.sends >= 2);
    assert_int_equal(o.state, HS_OUT_FAILED);
}

/* Point 8: re-assert means check. A panel's STOP of our RUN is reported,
 * never overwritten; a RUN against our STOP gets STOP again. */
static void reassert_policy(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct fake f = {.coil = 0, .apply = 1, .answer = 1};
    struct hs_out_events ev;
    int64_t now = 0;
    for (; now < 500; now += 10)
        run_step(&f, &o, &t, 1, 0, now, &ev);
    assert_int_equal(f.coil, 1);
    int sends = f.sends, dropped = 0;
    f.coil = 0; /* a panel stops it */
    for (; now < 5000; now += 10) {
        run_step(&f, &o, &t, 1, 0, now, &ev);
        dropped += ev.dropped;
    }
    assert_int_equal(dropped, 1);
    assert_int_equal(f.sends, sends); /* never written over */
    assert_int_equal(f.coil, 0);
    /* the engine now decides STOP: read back, matches, no write */
    for (; now < 6000; now += 10)
        run_step(&f, &o, &t, 0, 0, now, &ev);
    assert_int_equal(f.sends, sends);
    assert_int_equal(o.state, HS_OUT_CONFIRMED);
    f.coil = 1; /* something runs the pump against our STOP */
    int overridden = 0;
    for (; now < 8000; now += 10) {
        run_step(&f, &o, &t, 0, 0, now, &ev);
        overridden += ev.overridden;
    }
    assert_int_equal(overridden, 1);
    assert_int_equal(f.coil, 0);
    assert_int_equal(f.sends, sends + 1);
}

/* Point 3: hands off means no write, ever; afterwards read back first. */
static void hands_off_never_writes(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct fake f = {.coil = 1, .apply = 1, .answer = 1};
    struct hs_out_events ev;
    int64_t now = 0;
    for (; now < 5000; now += 10)
        assert_int_not_equal(run_step(&f, &o, &t, 0, 1, now, &ev), HS_OUT_SEND);
    assert_int_equal(f.sends, 0);
    assert_true(f.reads >= 4);
    assert_int_equal(o.state, HS_OUT_HANDS_OFF);
    /* back in our hands: read first, then STOP */
    assert_int_equal(run_step(&f, &o, &t, 0, 0, now, &ev), HS_OUT_READ);
    assert_int_equal(run_step(&f, &o, &t, 0, 0, now + 10, &ev), HS_OUT_SEND);
    run_step(&f, &o, &t, 0, 0, now + 20, &ev);
    assert_int_equal(ev.confirmed, 1);
    assert_int_equal(f.coil, 0);
}

/* A request that could not be posted (bus table full) is retried. */
static void post_failure(void **u)
{
    (void)u;
    struct hs_out_timing t;
    timing(&t);
    struct hs_output o;
    hs_output_init(&o);
    struct hs_out_events ev;
    assert_int_equal(hs_output_step(&o, &t, 1, 0, 0, NULL, &ev), HS_OUT_READ);
    hs_output_asked(&o, 0, 0);
    int asked = 0;
    for (int64_t now = 10; now < 3000; now += 10) {
        hs_out_action a = hs_output_step(&o, &t, 1, 0, now, NULL, &ev);
        if (a != HS_OUT_NONE) {
            asked++;
            hs_output_asked(&o, 0, now);
        }
    }
    assert_true(asked >= 2);
    assert_string_equal(hs_output_state_name(o.state), "failed");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(read_back_first),
        cmocka_unit_test(resend_until_confirmed),
        cmocka_unit_test(no_answer),
        cmocka_unit_test(reassert_policy),
        cmocka_unit_test(hands_off_never_writes),
        cmocka_unit_test(post_failure),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
