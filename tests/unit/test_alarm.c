/* The alarm state machine with a fake clock: every ISA-18.2 state change,
 * deadband, on/off delays, shelve expiry, repeated acks, ack by event id,
 * density fall. Limits here are test values, not science; the defaults'
 * sources are cited in plugin/hs_alarm_rules.c and checked by name below. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#include "hs_alarm.h"

struct log {
    hs_alarm_event ev[64];
    char cause[64][32];
    char actor[64][16];
    int n;
};

static void record(void *ctx, const hs_alarm_event *ev)
{
    struct log *l = ctx;
    assert_true(l->n < 64);
    l->ev[l->n] = *ev;
    snprintf(l->cause[l->n], sizeof l->cause[0], "%s", ev->cause);
    snprintf(l->actor[l->n], sizeof l->actor[0], "%s", ev->actor ? ev->actor : "");
    l->ev[l->n].cause = l->cause[l->n];
    l->ev[l->n].pond = l->ev[l->n].rule = l->ev[l->n].actor = l->ev[l->n].note = NULL;
    l->n++;
}

/* Every event follows from the one before it for the same alarm, and ids
 * increase by one. */
static void assert_chain(const struct log *l, uint64_t first_id)
{
    hs_alarm_state at = HS_ALARM_NORMAL;
    for (int i = 0; i < l->n; i++) {
        assert_int_equal(l->ev[i].event_id, first_id + (uint64_t)i);
        assert_int_equal(l->ev[i].from, at);
        at = l->ev[i].to;
    }
}

static hs_alarm_engine *engine_with(hs_alarm_rule *r, uint64_t first)
{
    hs_alarm_engine *eng = hs_alarm_new(first);
    assert_non_null(eng);
    assert_int_equal(hs_alarm_add(eng, r, "east-2"), HS_ALARM_DONE);
    return eng;
}

static hs_alarm_rule band_rule(void)
{
    hs_alarm_rule r;
    hs_alarm_rule_default(&r, HS_RULE_DENSITY_BAND);
    snprintf(r.name, sizeof r.name, "band");
    r.low = 1100.0;
    r.high = 1200.0;
    r.deadband = 2.0;
    r.on_delay_ms = 10000;
    r.off_delay_ms = 5000;
    return r;
}

/* rho is the density at the reference temperature, the one rules compare;
 * the in-situ density is set apart from it so that a rule reading the
 * wrong one fails these tests. */
static void feed_both(hs_alarm_engine *eng, double rho_ref, double rho_insitu, int64_t t,
                      struct log *l)
{
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_ref_kg_m3 = rho_ref;
    s.density_kg_m3 = rho_insitu;
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &s;
    assert_int_equal(hs_alarm_update(eng, "east-2", &in, t, record, l), HS_ALARM_DONE);
}

static void feed(hs_alarm_engine *eng, double rho, int64_t t, struct log *l)
{
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_ref_kg_m3 = rho;
    s.density_kg_m3 = rho - 40.0;
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &s;
    assert_int_equal(hs_alarm_update(eng, "east-2", &in, t, record, l), HS_ALARM_DONE);
}

/* One state with its density at the reference temperature and the
 * standard uncertainty u of it (SG 1.2, so u(SG) = u / 1000 here). */
static void feed_u(hs_alarm_engine *eng, double rho, double u, int64_t t, struct log *l)
{
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_ref_kg_m3 = rho;
    s.density_kg_m3 = rho - 5.0;
    s.specific_gravity = rho / 1000.0;
    s.sg_uncertainty = u / 1000.0;
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.state = &s;
    assert_int_equal(hs_alarm_update(eng, "east-2", &in, t, record, l), HS_ALARM_DONE);
}

/* A band limit crossed by less than k u = 2u (hs_margin.h) does not raise
 * and says so (uncertain); crossed by more it raises; it clears only
 * max(deadband, 2u) back inside. Round numbers for the logic. */
static void margin_of_the_uncertainty(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = r.off_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&r, 1);
    struct log l = {0};
    hs_alarm_info info;
    feed_u(eng, 1203.0, 2.5, 1000, &l);   /* 3 past 1200, 2u = 5 */
    assert_int_equal(l.n, 0);
    assert_int_equal(hs_alarm_get(eng, 0, &info), 0);
    assert_true(info.uncertain);
    feed_u(eng, 1206.0, 2.5, 2000, &l);   /* 6 past: beyond 2u */
    assert_int_equal(l.n, 1);
    assert_int_equal(hs_alarm_get(eng, 0, &info), 0);
    assert_false(info.uncertain);
    feed_u(eng, 1197.0, 2.5, 3000, &l);   /* 3 back inside: within 2u, held */
    assert_int_equal(l.n, 1);
    feed_u(eng, 1194.0, 2.5, 4000, &l);   /* 6 back inside: cleared */
    assert_int_equal(l.n, 2);
    /* without an uncertainty the limit itself counts, as before */
    feed_u(eng, 1201.0, NAN, 5000, &l);
    assert_int_equal(l.n, 3);
    hs_alarm_free(eng);
}

/* density-fall on noisy samples (invented, sigma 4 kg/m3, a fixed
 * pseudo-random sequence): the median filter and its noise margin keep a
 * steady pond quiet; a 10 kg/m3 step down raises. */
static void density_fall_on_noise(void **unused)
{
    (void)unused;
    hs_alarm_rule fall;
    hs_alarm_rule_default(&fall, HS_RULE_DENSITY_FALL);
    snprintf(fall.name, sizeof fall.name, "rain");
    hs_alarm_engine *eng = engine_with(&fall, 1);
    struct log l = {0};
    unsigned x = 12345u;
    int64_t t = 0;
    for (int i = 0; i < 20000; i++, t += 10000) { /* 2.3 days at 10 s */
        double g = 0.0;
        for (int k = 0; k < 12; k++) { /* Irwin-Hall: sum of 12 uniforms - 6 ~ N(0, 1) */
            x = x * 1103515245u + 12345u;
            g += (double)(x >> 8) / 16777216.0;
        }
        feed(eng, 1230.0 + 4.0 * (g - 6.0), t, &l);
    }
    assert_int_equal(l.n, 0);
    for (int i = 0; i < 200; i++, t += 10000) {
        double g = 0.0;
        for (int k = 0; k < 12; k++) {
            x = x * 1103515245u + 12345u;
            g += (double)(x >> 8) / 16777216.0;
        }
        feed(eng, 1220.0 + 4.0 * (g - 6.0), t, &l);
    }
    assert_true(l.n >= 1);
    assert_int_equal(l.ev[0].kind, HS_RULE_DENSITY_FALL);
    hs_alarm_free(eng);
}

static void raise_ack_clear(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    hs_alarm_engine *eng = engine_with(&r, 100);
    struct log l = {0};
    feed(eng, 1150, 0, &l);
    feed(eng, 1201, 1000, &l);  /* above high: on-delay starts */
    feed(eng, 1205, 10999, &l); /* 9.999 s: not yet */
    assert_int_equal(l.n, 0);
    hs_alarm_tick(eng, 11000, record, &l); /* delay runs out on the clock alone */
    assert_int_equal(l.n, 1);
    assert_int_equal(l.ev[0].to, HS_ALARM_UNACKED);
    assert_int_equal(l.ev[0].episode_id, 100);
    assert_string_equal(l.cause[0], "condition-raised");
    assert_true(fabs(l.ev[0].limit - 1200.0) < 1e-12);
    assert_true(fabs(l.ev[0].value - 1205.0) < 1e-12);
    /* Ack, then a repeated ack is a no-op that says so and emits nothing. */
    assert_int_equal(hs_alarm_ack(eng, "east-2", "band", "shift-a", NULL, 12000, record, &l),
                     HS_ALARM_DONE);
    assert_int_equal(hs_alarm_ack(eng, "east-2", "band", "shift-a", NULL, 12500, record, &l),
                     HS_ALARM_ALREADY);
    assert_int_equal(l.n, 2);
    assert_int_equal(l.ev[1].to, HS_ALARM_ACKED);
    assert_string_equal(l.actor[1], "shift-a");
    /* Inside the deadband (1198.5 > 1200 - 2) it stays active. */
    feed(eng, 1198.5, 13000, &l);
    hs_alarm_tick(eng, 30000, record, &l);
    assert_int_equal(l.n, 2);
    /* Below the deadband: clears after the off delay, to normal (acked). */
    feed(eng, 1197.0, 31000, &l);
    hs_alarm_tick(eng, 35999, record, &l);
    assert_int_equal(l.n, 2);
    hs_alarm_tick(eng, 36000, record, &l);
    assert_int_equal(l.n, 3);
    assert_int_equal(l.ev[2].to, HS_ALARM_NORMAL);
    assert_chain(&l, 100);
    hs_alarm_free(eng);
}

static void return_unacked_then_reraise(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = 0;
    r.off_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&r, 1);
    struct log l = {0};
    feed(eng, 1090, 0, &l);    /* below low */
    feed(eng, 1105, 1000, &l); /* back above low + deadband */
    assert_int_equal(l.n, 2);
    assert_int_equal(l.ev[1].to, HS_ALARM_RTN_UNACKED);
    assert_true(fabs(l.ev[0].limit - 1100.0) < 1e-12);
    feed(eng, 1099, 2000, &l); /* again, before anyone acked */
    assert_int_equal(l.n, 3);
    assert_int_equal(l.ev[2].to, HS_ALARM_UNACKED);
    assert_int_equal(l.ev[2].episode_id, 3); /* a new episode */
    feed(eng, 1110, 3000, &l);
    assert_int_equal(hs_alarm_ack(eng, "east-2", "band", "op", NULL, 4000, record, &l),
                     HS_ALARM_DONE);
    assert_int_equal(l.ev[4].from, HS_ALARM_RTN_UNACKED);
    assert_int_equal(l.ev[4].to, HS_ALARM_NORMAL);
    assert_int_equal(hs_alarm_ack(eng, "east-2", "band", "op", NULL, 4000, record, &l),
                     HS_ALARM_ALREADY);
    assert_chain(&l, 1);
    hs_alarm_free(eng);
}

static void chatter_restarts_delay(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    hs_alarm_engine *eng = engine_with(&r, 1);
    struct log l = {0};
    for (int i = 0; i < 20; i++) /* flips every 6 s: never 10 s in a row */
        feed(eng, i % 2 ? 1150 : 1210, i * 6000, &l);
    hs_alarm_tick(eng, 20 * 6000, record, &l);
    assert_int_equal(l.n, 0);
    /* Unknown values hold the condition as it was. */
    feed(eng, 1210, 200000, &l);
    feed(eng, NAN, 205000, &l);
    hs_alarm_tick(eng, 210000, record, &l);
    assert_int_equal(l.n, 1);
    feed(eng, NAN, 300000, &l);
    hs_alarm_tick(eng, 400000, record, &l);
    assert_int_equal(l.n, 1);
    hs_alarm_free(eng);
}

static void shelve_and_expiry(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = r.off_delay_ms = 0;
    r.max_shelve_ms = 3600000;
    hs_alarm_engine *eng = engine_with(&r, 1);
    struct log l = {0};
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 3600001, "op", "too long", 0, record,
                                     &l), HS_ALARM_REFUSED);
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 0, "op", NULL, 0, record, &l),
                     HS_ALARM_REFUSED);
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 600000, "op", "sensor wash", 0,
                                     record, &l), HS_ALARM_DONE);
    assert_int_equal(l.ev[0].to, HS_ALARM_SHELVED);
    assert_int_equal(l.ev[0].shelved_until_ms, 600000);
    feed(eng, 1250, 1000, &l); /* raised while shelved: no event */
    assert_int_equal(l.n, 1);
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 900000, "op", NULL, 100000, record,
                                     &l), HS_ALARM_DONE);
    assert_string_equal(l.cause[1], "shelve-extended");
    hs_alarm_tick(eng, 999999, record, &l);
    assert_int_equal(l.n, 2);
    hs_alarm_tick(eng, 1000000, record, &l); /* expiry: comes back as a new alarm */
    assert_int_equal(l.n, 3);
    assert_string_equal(l.cause[2], "shelve-expired");
    assert_int_equal(l.ev[2].to, HS_ALARM_UNACKED);
    /* Shelve again, clear while shelved, unshelve by hand: back to normal. */
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 60000, "op", NULL, 1000001, record,
                                     &l), HS_ALARM_DONE);
    feed(eng, 1150, 1000002, &l);
    assert_int_equal(hs_alarm_unshelve(eng, "east-2", "band", "op", NULL, 1000003, record, &l),
                     HS_ALARM_DONE);
    assert_int_equal(l.ev[4].to, HS_ALARM_NORMAL);
    assert_int_equal(hs_alarm_unshelve(eng, "east-2", "band", "op", NULL, 1000004, record, &l),
                     HS_ALARM_ALREADY);
    assert_chain(&l, 1);
    hs_alarm_free(eng);
}

static void suppressed_and_out_of_service(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = r.off_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&r, 1);
    struct log l = {0};
    assert_int_equal(hs_alarm_suppress(eng, "east-2", NULL, 1, "pond drained", 0, record, &l),
                     HS_ALARM_DONE);
    assert_int_equal(hs_alarm_suppress(eng, "east-2", NULL, 1, NULL, 1, record, &l),
                     HS_ALARM_ALREADY);
    feed(eng, 1000, 2, &l);
    assert_int_equal(l.n, 1);
    assert_int_equal(hs_alarm_shelve(eng, "east-2", "band", 1000, "op", NULL, 3, record, &l),
                     HS_ALARM_REFUSED);
    assert_int_equal(hs_alarm_suppress(eng, "east-2", NULL, 0, NULL, 4, record, &l),
                     HS_ALARM_DONE);
    assert_int_equal(l.ev[1].to, HS_ALARM_UNACKED); /* the condition is there */
    assert_int_equal(hs_alarm_set_in_service(eng, "east-2", "band", 0, "tech", "recalibrating",
                                             5, record, &l), HS_ALARM_DONE);
    assert_int_equal(l.ev[2].to, HS_ALARM_OUT_OF_SERVICE);
    assert_int_equal(hs_alarm_suppress(eng, "east-2", "band", 1, NULL, 6, record, &l),
                     HS_ALARM_REFUSED);
    feed(eng, 1150, 7, &l);
    assert_int_equal(hs_alarm_set_in_service(eng, "east-2", "band", 1, "tech", NULL, 8, record,
                                             &l), HS_ALARM_DONE);
    assert_int_equal(l.ev[3].to, HS_ALARM_NORMAL);
    assert_chain(&l, 1);
    hs_alarm_free(eng);
}

static void ack_by_event_id(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = r.off_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&r, 50);
    hs_alarm_rule r2 = r;
    snprintf(r2.name, sizeof r2.name, "band-2");
    assert_int_equal(hs_alarm_add(eng, &r2, "east-2"), HS_ALARM_DONE);
    assert_int_equal(hs_alarm_add(eng, &r2, "east-2"), HS_ALARM_REFUSED);
    struct log l = {0};
    feed(eng, 1300, 0, &l); /* both raise: events 50 and 51 */
    assert_int_equal(l.n, 2);
    assert_int_equal(hs_alarm_ack_event(eng, 0, "op", NULL, 1, record, &l),
                     HS_ALARM_UNKNOWN_EVENT);
    assert_int_equal(hs_alarm_ack_event(eng, 52, "op", NULL, 1, record, &l),
                     HS_ALARM_UNKNOWN_EVENT);
    assert_int_equal(hs_alarm_ack_event(eng, 51, "op", NULL, 1, record, &l), HS_ALARM_DONE);
    assert_int_equal(l.n, 3);
    assert_int_equal(l.ev[2].episode_id, 51); /* band-2 was acked, not band */
    assert_int_equal(hs_alarm_ack_event(eng, 51, "op", NULL, 2, record, &l), HS_ALARM_ALREADY);
    assert_int_equal(hs_alarm_ack_event(eng, 52, "op", NULL, 2, record, &l), HS_ALARM_ALREADY);
    assert_int_equal(l.n, 3);
    assert_int_equal(hs_alarm_ack_event(eng, 50, "op", NULL, 3, record, &l), HS_ALARM_DONE);
    assert_int_equal(hs_alarm_ack(eng, "west-9", "band", "op", NULL, 4, record, &l),
                     HS_ALARM_UNKNOWN_POND);
    assert_int_equal(hs_alarm_ack(eng, "east-2", "nope", "op", NULL, 4, record, &l),
                     HS_ALARM_UNKNOWN_RULE);
    assert_int_equal(hs_alarm_ack(eng, "east-2", NULL, "op", NULL, 4, record, &l),
                     HS_ALARM_ALREADY);
    hs_alarm_free(eng);
}

static void density_fall_and_stale(void **unused)
{
    (void)unused;
    hs_alarm_rule fall, stale;
    hs_alarm_rule_default(&fall, HS_RULE_DENSITY_FALL);
    snprintf(fall.name, sizeof fall.name, "rain");
    fall.filter_samples = 3; /* one sample a minute: a short median */
    hs_alarm_rule_default(&stale, HS_RULE_SENSOR_STALE);
    snprintf(stale.name, sizeof stale.name, "stale");
    hs_alarm_engine *eng = engine_with(&fall, 1);
    assert_int_equal(hs_alarm_add(eng, &stale, "east-2"), HS_ALARM_DONE);
    struct log l = {0};
    /* Slow evaporation: density rises, no alarm. */
    for (int i = 0; i < 60; i++)
        feed(eng, 1150.0 + 0.01 * i, (int64_t)i * 60000, &l);
    assert_int_equal(l.n, 0);
    /* A storm: 6 kg/m3 down within 20 minutes (default limit 5). */
    for (int i = 0; i < 20; i++)
        feed(eng, 1150.6 - 0.3 * i, 3600000 + (int64_t)i * 60000, &l);
    assert_int_equal(l.n, 1);
    assert_int_equal(l.ev[0].kind, HS_RULE_DENSITY_FALL);
    assert_true(l.ev[0].value > 5.0);
    /* Sample age over the limit raises the stale rule. */
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.sample_age_s = 121;
    assert_int_equal(hs_alarm_update(eng, "east-2", &in, 5000000, record, &l), HS_ALARM_DONE);
    assert_int_equal(l.n, 2);
    assert_int_equal(l.ev[1].kind, HS_RULE_SENSOR_STALE);
    assert_int_equal(hs_alarm_update(eng, "nowhere", &in, 5000000, record, &l),
                     HS_ALARM_UNKNOWN_POND);
    hs_alarm_free(eng);
}

/* The afternoon warms a pond from 15 to 35 degC: its in-situ density falls
 * about 8 kg/m3 (a 1.09 SG brine; EOS-80 thermal expansion, UNESCO 1981)
 * while its brine, and so its density at the reference temperature, stays
 * the same. No density-fall and no band alarm; a real fall of the
 * reference density (rain) with the in-situ density flat still raises. */
static void warm_afternoon_is_not_rain(void **unused)
{
    (void)unused;
    hs_alarm_rule fall, band = band_rule();
    hs_alarm_rule_default(&fall, HS_RULE_DENSITY_FALL);
    snprintf(fall.name, sizeof fall.name, "rain");
    fall.filter_samples = 3;
    band.low = 1085.0;
    band.high = 1100.0;
    band.on_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&fall, 1);
    assert_int_equal(hs_alarm_add(eng, &band, "east-2"), HS_ALARM_DONE);
    struct log l = {0};
    for (int i = 0; i <= 120; i++) { /* two hours, warming then cooling */
        double warm = i <= 60 ? i / 60.0 : (120 - i) / 60.0;
        feed_both(eng, 1090.0, 1090.0 - 8.0 * warm, (int64_t)i * 60000, &l);
    }
    assert_int_equal(l.n, 0);
    for (int i = 0; i < 20; i++) /* rain: 6 kg/m3 down at reference temperature */
        feed_both(eng, 1090.0 - 0.3 * i, 1090.0, 7200000 + (int64_t)i * 60000, &l);
    assert_true(l.n >= 1);
    int fell = 0; /* the band (low 1085) may come first */
    for (int i = 0; i < l.n; i++)
        fell |= l.ev[i].kind == HS_RULE_DENSITY_FALL;
    assert_true(fell);
    hs_alarm_free(eng);
}

static void restore_after_restart(void **unused)
{
    (void)unused;
    hs_alarm_rule r = band_rule();
    r.on_delay_ms = r.off_delay_ms = 0;
    hs_alarm_engine *eng = engine_with(&r, 41);
    assert_int_equal(hs_alarm_restore(eng, "east-2", "band", HS_ALARM_UNACKED, 40, 37, 0),
                     HS_ALARM_DONE);
    assert_int_equal(hs_alarm_restore(eng, "east-2", "band", HS_ALARM_UNACKED, 41, 37, 0),
                     HS_ALARM_INVALID);
    struct log l = {0};
    feed(eng, 1250, 0, &l); /* still active: no repeat of the raise */
    assert_int_equal(l.n, 0);
    assert_int_equal(hs_alarm_ack_event(eng, 37, "op", NULL, 1, record, &l), HS_ALARM_DONE);
    assert_int_equal(l.ev[0].event_id, 41);
    assert_int_equal(l.ev[0].to, HS_ALARM_ACKED);
    hs_alarm_free(eng);
}

static void names_and_checks(void **unused)
{
    (void)unused;
    for (int k = 0; k < HS_RULE_KIND_COUNT; k++)
        assert_int_equal(hs_rule_kind_from_name(hs_rule_kind_name((hs_rule_kind)k)), k);
    for (int s = 0; s < HS_ALARM_STATE_COUNT; s++)
        assert_int_equal(hs_alarm_state_from_name(hs_alarm_state_name((hs_alarm_state)s)), s);
    for (int q = 0; q < HS_QTY_COUNT; q++)
        assert_int_equal(hs_alarm_quantity_from_name(hs_alarm_quantity_name(q)), q);
    assert_int_equal(hs_alarm_priority_from_name("urgent"), HS_PRIORITY_URGENT);
    assert_int_equal(hs_alarm_priority_from_name("whenever"), -1);
    assert_int_equal(hs_rule_kind_from_name("salt-alert"), -1);
    hs_alarm_rule r;
    hs_alarm_rule_default(&r, HS_RULE_LEVEL_HIGH);
    snprintf(r.name, sizeof r.name, "lvl");
    assert_non_null(hs_alarm_rule_check(&r)); /* level limits must come from the config */
    r.high = 0.9;
    assert_null(hs_alarm_rule_check(&r));
    r.low = 1.0;
    assert_non_null(hs_alarm_rule_check(&r));
    r.low = 0.1;
    r.deadband = 0.5;
    assert_non_null(hs_alarm_rule_check(&r));
    /* Bittern limit default: 29 deg Be (Baseggio 1974, 4th Symp. on Salt). */
    hs_alarm_rule_default(&r, HS_RULE_BITTERN_LIMIT);
    assert_true(fabs(r.high - 29.0) < 1e-12);
    assert_int_equal(r.quantity, HS_QTY_BAUME);
    /* Crystalliser feed: 25 deg Be, below the 25.5-26 of common practice,
     * no source. */
    hs_alarm_rule_default(&r, HS_RULE_GYPSUM_IN_FEED);
    assert_true(fabs(r.low - 25.0) < 1e-12);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(raise_ack_clear),
        cmocka_unit_test(margin_of_the_uncertainty),
        cmocka_unit_test(density_fall_on_noise),
        cmocka_unit_test(return_unacked_then_reraise),
        cmocka_unit_test(chatter_restarts_delay),
        cmocka_unit_test(shelve_and_expiry),
        cmocka_unit_test(suppressed_and_out_of_service),
        cmocka_unit_test(ack_by_event_id),
        cmocka_unit_test(density_fall_and_stale),
        cmocka_unit_test(warm_afternoon_is_not_rain),
        cmocka_unit_test(restore_after_restart),
        cmocka_unit_test(names_and_checks),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
