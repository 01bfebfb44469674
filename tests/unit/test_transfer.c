/* Transfer decision engine: every trigger, interlock and timing rule, and a
 * property test over random input sequences. Pure logic; no science values
 * are checked here (densities are round numbers chosen for the logic). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "hc_state.h"
#include "hs_transfer.h"

static struct hs_xfer_input good(double v)
{
    return (struct hs_xfer_input){v, HS_XQ_GOOD};
}

/* A crystalliser feed: start at 1210 kg/m3, hysteresis 3, levels and band
 * guarded, rain and manual signals present, timing rules off. */
static struct hs_transfer_rule base_rule(void)
{
    struct hs_transfer_rule r;
    hs_transfer_rule_defaults(&r);
    r.start_density_kg_m3 = 1210;
    r.hysteresis_kg_m3 = 3;
    r.source_level_min_m = 0.20;
    r.dest_level_max_m = 0.40;
    r.level_deadband_m = 0.02;
    r.dest_density_min_kg_m3 = 1200;
    r.dest_density_max_kg_m3 = 1250;
    r.has_rain = 1;
    r.has_manual = 1;
    return r;
}

static struct hs_transfer_inputs ready_inputs(int64_t now)
{
    struct hs_transfer_inputs in;
    memset(&in, 0, sizeof in);
    in.now_ms = now;
    in.source_density = good(1215);
    in.source_stage = HC_STAGE_HALITE;
    in.source_level = good(0.50);
    in.dest_level = good(0.20);
    in.dest_density_after_mixing = good(1220);
    in.rain = good(0);
    in.manual = good(0);
    in.run_feedback = (struct hs_xfer_input){NAN, HS_XQ_ABSENT};
    in.bus_up = 1;
    return in;
}

struct engine {
    struct hs_transfer_rule rule;
    struct hs_transfer_state state;
    struct hs_transfer_decision last;
    int have_last;
};

static void engine_init(struct engine *e, struct hs_transfer_rule rule)
{
    e->rule = rule;
    hs_transfer_state_init(&e->state);
    e->have_last = 0;
}

static struct hs_transfer_decision step(struct engine *e, const struct hs_transfer_inputs *in)
{
    struct hs_transfer_decision d;
    hs_transfer_decide(&e->rule, &e->state, in, e->have_last ? &e->last : NULL, &d);
    e->last = d;
    e->have_last = 1;
    return d;
}

/* Decisions respect the state's uncertainty (k = HS_DECISION_K = 2): a
 * trigger met only within 2u of the source density waits with
 * uncertain-source; met by more, it runs; a run holds down to the start
 * density less max(hysteresis, 2u). Round numbers for the logic. */
static void uncertain_source_waits(void **unused)
{
    (void)unused;
    struct engine e;
    engine_init(&e, base_rule());
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_density = good(1215);     /* 5 above the start density */
    in.source_density_u = 4.0;          /* 2u = 8: cannot tell */
    struct hs_transfer_decision d = step(&e, &in);
    assert_false(d.pump_on);
    assert_true(d.reasons & HS_XR_UNCERTAIN_SOURCE);
    assert_true(d.reasons & HS_XR_TRIGGER_NOT_MET);
    in.now_ms = 1000;
    in.source_density_u = 2.0;          /* 2u = 4 < 5: sure */
    d = step(&e, &in);
    assert_true(d.pump_on);
    assert_false(d.reasons & HS_XR_UNCERTAIN_SOURCE);
    /* running: 1204 is 6 below the start, within 2u = 8 (above the
     * hysteresis of 3): held on */
    in.now_ms = 2000;
    in.source_density = good(1204);
    in.source_density_u = 4.0;
    d = step(&e, &in);
    assert_true(d.pump_on);
    assert_true(d.reasons & HS_XR_HYSTERESIS_HOLD);
    in.now_ms = 3000;
    in.source_density = good(1201);     /* 9 below: beyond 2u */
    d = step(&e, &in);
    assert_false(d.pump_on);
    /* stage trigger: the stage of density - 2u must be reached too */
    struct hs_transfer_rule r = base_rule();
    r.trigger = HS_TRIGGER_STAGE;
    r.start_stage = HC_STAGE_HALITE;
    engine_init(&e, r);
    in = ready_inputs(0);
    in.source_density_u = 5.0;
    in.source_stage_low = HC_STAGE_GYPSUM;
    d = step(&e, &in);
    assert_false(d.pump_on);
    assert_true(d.reasons & HS_XR_UNCERTAIN_SOURCE);
    in.now_ms = 1000;
    in.source_stage_low = HC_STAGE_HALITE;
    d = step(&e, &in);
    assert_true(d.pump_on);
}

static void runs_when_ready(void **unused)
{
    (void)unused;
    struct engine e;
    engine_init(&e, base_rule());
    struct hs_transfer_inputs in = ready_inputs(1000);
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.advice, HS_ADVICE_RUN);
    assert_int_equal(d.pump_on, 1);
    assert_true(d.reasons & HS_XR_TRIGGER_MET);
    assert_int_equal(d.reasons & HS_XR_INTERLOCK_MASK, 0);
    assert_int_equal(d.write, HS_WRITE_NONE); /* advisory by default */
    assert_int_equal(d.changed, 1);
    d = step(&e, &in);
    assert_int_equal(d.changed, 0);
}

static void idle_below_trigger(void **unused)
{
    (void)unused;
    struct engine e;
    engine_init(&e, base_rule());
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_density = good(1209.9);
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.advice, HS_ADVICE_IDLE);
    assert_true(d.reasons & HS_XR_TRIGGER_NOT_MET);
}

static void density_hysteresis(void **unused)
{
    (void)unused;
    struct engine e;
    engine_init(&e, base_rule());
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.source_density = good(1207.5); /* below start, within 3 of it */
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 1);
    assert_true(d.reasons & HS_XR_HYSTERESIS_HOLD);
    in.source_density = good(1206.9);
    d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_int_equal(d.advice, HS_ADVICE_IDLE);
    in.source_density = good(1208); /* within hysteresis but not running: stays off */
    assert_int_equal(step(&e, &in).pump_on, 0);
}

static void stage_trigger(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.trigger = HS_TRIGGER_STAGE;
    r.start_stage = HC_STAGE_HALITE;
    r.start_density_kg_m3 = NAN;
    assert_int_equal(hs_transfer_rule_check(&r, NULL, 0), 0);
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_stage = HC_STAGE_GYPSUM;
    assert_int_equal(step(&e, &in).pump_on, 0);
    in.source_stage = HC_STAGE_HALITE;
    in.source_density = good(1214);
    assert_int_equal(step(&e, &in).pump_on, 1);
    /* noise at the boundary: stage flickers back, density within hysteresis */
    in.source_stage = HC_STAGE_GYPSUM;
    in.source_density = good(1212);
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 1);
    assert_true(d.reasons & HS_XR_HYSTERESIS_HOLD);
    in.source_density = good(1210.5); /* more than 3 below the run's start */
    assert_int_equal(step(&e, &in).pump_on, 0);
}

/* Each interlock blocks a ready transfer and stops a running one at once,
 * whatever the minimum on time, and is reported by its own name. */
static void check_interlock(void (*spoil)(struct hs_transfer_inputs *), unsigned bit,
                            const char *name)
{
    struct hs_transfer_rule r = base_rule();
    r.min_on_ms = 600000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.now_ms = 1000;
    spoil(&in);
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_int_equal(d.advice, HS_ADVICE_BLOCKED);
    assert_true(d.reasons & bit);
    assert_false(d.reasons & HS_XR_MIN_ON_TIME);
    assert_string_equal(hs_transfer_reason_name(bit), name);
    assert_non_null(hs_transfer_reason_text(bit));
    /* and a fresh engine never starts under it */
    engine_init(&e, r);
    d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_true(d.reasons & bit);
}

static void spoil_source_level(struct hs_transfer_inputs *in) { in->source_level = good(0.20); }
static void spoil_dest_level(struct hs_transfer_inputs *in) { in->dest_level = good(0.41); }
static void spoil_band_low(struct hs_transfer_inputs *in) { in->dest_density_after_mixing = good(1199); }
static void spoil_band_high(struct hs_transfer_inputs *in) { in->dest_density_after_mixing = good(1251); }
static void spoil_rain(struct hs_transfer_inputs *in) { in->rain = good(1); }
static void spoil_bad(struct hs_transfer_inputs *in) { in->source_density.quality = HS_XQ_BAD; }
static void spoil_nan(struct hs_transfer_inputs *in) { in->dest_level = good(NAN); }
static void spoil_stale(struct hs_transfer_inputs *in) { in->dest_level.quality = HS_XQ_STALE; }
static void spoil_rain_stale(struct hs_transfer_inputs *in) { in->rain.quality = HS_XQ_STALE; }
static void spoil_bus(struct hs_transfer_inputs *in) { in->bus_up = 0; }
static void spoil_manual(struct hs_transfer_inputs *in) { in->manual = good(1); }

static void interlock_source_level(void **u) { (void)u; check_interlock(spoil_source_level, HS_XR_SOURCE_LEVEL_LOW, "source-level-low"); }
static void interlock_dest_level(void **u) { (void)u; check_interlock(spoil_dest_level, HS_XR_DEST_LEVEL_HIGH, "destination-level-high"); }
static void interlock_band_low(void **u) { (void)u; check_interlock(spoil_band_low, HS_XR_DEST_DENSITY_BAND, "destination-density-band"); }
static void interlock_band_high(void **u) { (void)u; check_interlock(spoil_band_high, HS_XR_DEST_DENSITY_BAND, "destination-density-band"); }
static void interlock_rain(void **u) { (void)u; check_interlock(spoil_rain, HS_XR_RAIN, "rain"); }
static void interlock_bad(void **u) { (void)u; check_interlock(spoil_bad, HS_XR_BAD_INPUT, "bad-input"); }
static void interlock_nan(void **u) { (void)u; check_interlock(spoil_nan, HS_XR_BAD_INPUT, "bad-input"); }
static void interlock_stale(void **u) { (void)u; check_interlock(spoil_stale, HS_XR_STALE_INPUT, "stale-input"); }
static void interlock_rain_stale(void **u) { (void)u; check_interlock(spoil_rain_stale, HS_XR_STALE_INPUT, "stale-input"); }
static void interlock_bus(void **u) { (void)u; check_interlock(spoil_bus, HS_XR_BUS_DOWN, "bus-down"); }
static void interlock_manual(void **u) { (void)u; check_interlock(spoil_manual, HS_XR_MANUAL_OVERRIDE, "manual-override"); }

static void level_deadband(void **unused)
{
    (void)unused;
    struct engine e;
    engine_init(&e, base_rule());
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_level = good(0.19);
    assert_true(step(&e, &in).reasons & HS_XR_SOURCE_LEVEL_LOW);
    in.source_level = good(0.215); /* above the minimum, inside the deadband */
    assert_true(step(&e, &in).reasons & HS_XR_SOURCE_LEVEL_LOW);
    in.source_level = good(0.221);
    struct hs_transfer_decision d = step(&e, &in);
    assert_false(d.reasons & HS_XR_SOURCE_LEVEL_LOW);
    assert_int_equal(d.pump_on, 1);
    in.dest_level = good(0.40);
    assert_true(step(&e, &in).reasons & HS_XR_DEST_LEVEL_HIGH);
    in.dest_level = good(0.385);
    assert_true(step(&e, &in).reasons & HS_XR_DEST_LEVEL_HIGH);
    in.dest_level = good(0.379);
    assert_false(step(&e, &in).reasons & HS_XR_DEST_LEVEL_HIGH);
}

static void unguarded_inputs_ignored(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r;
    hs_transfer_rule_defaults(&r);
    r.start_density_kg_m3 = 1100;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in;
    memset(&in, 0, sizeof in);
    in.source_density = good(1120);
    in.bus_up = 1;
    in.source_level.quality = HS_XQ_ABSENT;
    in.dest_level.quality = HS_XQ_ABSENT;
    in.dest_density_after_mixing.quality = HS_XQ_ABSENT;
    in.rain.quality = HS_XQ_ABSENT;
    in.manual.quality = HS_XQ_ABSENT;
    in.run_feedback.quality = HS_XQ_ABSENT;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 1);
    assert_int_equal(d.reasons & HS_XR_INTERLOCK_MASK, 0);
}

static void min_on_time(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.min_on_ms = 60000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.source_density = good(1100);
    in.now_ms = 59999;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 1);
    assert_true(d.reasons & HS_XR_MIN_ON_TIME);
    in.now_ms = 60000;
    assert_int_equal(step(&e, &in).pump_on, 0);
}

static void min_off_time(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.min_off_ms = 30000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    /* counts from start-up */
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_int_equal(d.advice, HS_ADVICE_WAIT);
    assert_true(d.reasons & HS_XR_MIN_OFF_TIME);
    in.now_ms = 30000;
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.now_ms = 31000;
    in.rain = good(1);
    assert_int_equal(step(&e, &in).pump_on, 0);
    in.rain = good(0);
    in.now_ms = 60999;
    d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_true(d.reasons & HS_XR_MIN_OFF_TIME);
    in.now_ms = 61000;
    assert_int_equal(step(&e, &in).pump_on, 1);
}

static void max_run_time(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.max_run_ms = 3600000;
    r.min_off_ms = 600000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).pump_on, 0); /* minimum off time from start-up */
    in.now_ms = 600000;
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.now_ms = 600000 + 3599999;
    assert_int_equal(step(&e, &in).pump_on, 1);
    in.now_ms = 600000 + 3600000;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_true(d.reasons & HS_XR_MAX_RUN_TIME);
    assert_int_equal(d.advice, HS_ADVICE_WAIT);
    in.now_ms += 599999;
    d = step(&e, &in);
    assert_int_equal(d.pump_on, 0);
    assert_true(d.reasons & HS_XR_MAX_RUN_TIME);
    in.now_ms += 1;
    d = step(&e, &in);
    assert_int_equal(d.pump_on, 1);
    assert_false(d.reasons & HS_XR_MAX_RUN_TIME);
}

static void actuation_writes(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).write, HS_WRITE_ON);
    in.source_level.quality = HS_XQ_BAD; /* bad data: safe state, written */
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.write, HS_WRITE_OFF);
    assert_int_equal(d.pump_on, 0);
    in.source_level = good(0.5);
    in.manual = good(1); /* local control: never written */
    assert_int_equal(step(&e, &in).write, HS_WRITE_NONE);
    struct hs_xfer_input remote = good(0), local = good(1);
    assert_int_equal(hs_transfer_safe_write(&r, &remote), HS_WRITE_OFF);
    assert_int_equal(hs_transfer_safe_write(&r, &local), HS_WRITE_NONE);
    r.actuate = 0;
    assert_int_equal(hs_transfer_safe_write(&r, &remote), HS_WRITE_NONE);
}

/* Issue 17 point 3: manual is never written, not at shutdown and not while
 * the manual signal is unknown (hands off, and an alarm). */
static void manual_unknown_hands_off(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    assert_int_equal(step(&e, &in).write, HS_WRITE_ON);
    const hs_xfer_quality unknown[] = {HS_XQ_BAD, HS_XQ_STALE, HS_XQ_ABSENT};
    for (size_t k = 0; k < sizeof unknown / sizeof unknown[0]; k++) {
        in.manual = (struct hs_xfer_input){0, unknown[k]};
        in.now_ms += 1000;
        struct hs_transfer_decision d = step(&e, &in);
        assert_int_equal(d.write, HS_WRITE_NONE);
        assert_int_equal(d.manual_unknown, 1);
        assert_true(d.reasons & HS_XR_MANUAL_UNKNOWN);
        assert_int_equal(d.pump_on, 0);
        assert_int_equal(hs_transfer_safe_write(&r, &in.manual), HS_WRITE_NONE);
    }
    assert_int_equal(hs_transfer_safe_write(&r, NULL), HS_WRITE_NONE);
    /* known again and remote: the safe state is written again */
    in.manual = good(0);
    in.now_ms += 1000;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.manual_unknown, 0);
    assert_int_not_equal(d.write, HS_WRITE_NONE);
    /* without a manual signal, shutdown writes the safe state */
    r.has_manual = 0;
    assert_int_equal(hs_transfer_safe_write(&r, NULL), HS_WRITE_OFF);
}

/* Issue 17 point 6: after lockout_after failed starts the transfer stays off
 * until an operator resets it; one alarm when it locks. */
static void feedback_lockout(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    r.has_feedback = 1;
    r.feedback_timeout_ms = 10000;
    r.min_off_ms = 20000;
    r.lockout_after = 2;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(100000);
    in.run_feedback = good(0);
    e.state.started = 1;
    int lockouts = 0;
    for (int k = 0; k < 600; k++) {
        struct hs_transfer_decision d = step(&e, &in);
        lockouts += d.lockout_alarm;
        in.now_ms += 1000;
    }
    assert_int_equal(lockouts, 1);
    assert_int_equal(e.state.failed_starts, 2);
    assert_int_equal(e.state.locked_out, 1);
    struct hs_transfer_decision d = step(&e, &in);
    assert_true(d.reasons & HS_XR_LOCKOUT);
    assert_int_equal(d.write, HS_WRITE_OFF);
    hs_transfer_reset_lockout(&e.state);
    in.now_ms += 1000;
    d = step(&e, &in);
    assert_false(d.reasons & HS_XR_LOCKOUT);
    assert_int_equal(d.write, HS_WRITE_ON);
    /* a confirmed run clears the count of failed starts */
    in.run_feedback = good(1);
    in.now_ms += 1000;
    step(&e, &in);
    assert_int_equal(e.state.failed_starts, 0);
}

/* Issue 17 point 5: the transfer decides only on its own density source and
 * stops when the source changes during a run. */
static void density_source(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    r.density_method = HC_METHOD_DENSITOMETER;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_method = HC_METHOD_DENSITOMETER;
    assert_int_equal(step(&e, &in).write, HS_WRITE_ON);
    in.source_method = HC_METHOD_PSS78; /* densitometer bad: conductivity fallback */
    in.now_ms += 1000;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.write, HS_WRITE_OFF);
    assert_true(d.reasons & HS_XR_DENSITY_SOURCE);
    assert_int_equal(d.advice, HS_ADVICE_BLOCKED);
    /* no configured source: a change of method during a run stops it */
    r.density_method = -1;
    engine_init(&e, r);
    in = ready_inputs(0);
    in.source_method = HC_METHOD_PSS78;
    assert_int_equal(step(&e, &in).write, HS_WRITE_ON);
    in.source_method = HC_METHOD_SITE_CALIBRATION;
    in.now_ms += 1000;
    d = step(&e, &in);
    assert_true(d.reasons & HS_XR_DENSITY_SOURCE);
    assert_int_equal(d.pump_on, 0);
}

static void run_feedback_missing(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    r.has_feedback = 1;
    r.feedback_timeout_ms = 20000;
    r.min_off_ms = 120000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(200000);
    in.run_feedback = good(0);
    e.state.started = 1; /* pretend a long idle time before */
    e.state.changed_ms = 0;
    assert_int_equal(step(&e, &in).write, HS_WRITE_ON);
    in.now_ms += 19999;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.write, HS_WRITE_ON);
    assert_int_equal(d.feedback_alarm, 0);
    in.now_ms += 1;
    d = step(&e, &in);
    assert_int_equal(d.write, HS_WRITE_OFF);
    assert_int_equal(d.feedback_alarm, 1);
    assert_true(d.reasons & HS_XR_NO_RUN_FEEDBACK);
    assert_int_equal(d.advice, HS_ADVICE_BLOCKED);
    in.now_ms += 1000;
    d = step(&e, &in);
    assert_int_equal(d.feedback_alarm, 0); /* raised once, stays latched */
    assert_true(d.reasons & HS_XR_NO_RUN_FEEDBACK);
    in.now_ms = 200000 + 20000 + 120000;
    d = step(&e, &in);
    assert_false(d.reasons & HS_XR_NO_RUN_FEEDBACK);
    assert_int_equal(d.write, HS_WRITE_ON); /* one retry after the lockout */
    in.run_feedback = good(1);
    in.now_ms += 30000;
    d = step(&e, &in);
    assert_int_equal(d.write, HS_WRITE_ON);
    assert_int_equal(d.feedback_alarm, 0);
}

static void pump_still_running(void **unused)
{
    (void)unused;
    struct hs_transfer_rule r = base_rule();
    r.actuate = 1;
    r.has_feedback = 1;
    r.feedback_timeout_ms = 5000;
    struct engine e;
    engine_init(&e, r);
    struct hs_transfer_inputs in = ready_inputs(0);
    in.source_density = good(1100); /* nothing to move */
    in.run_feedback = good(1);      /* yet the pump runs */
    assert_int_equal(step(&e, &in).feedback_alarm, 0);
    in.now_ms = 5000;
    struct hs_transfer_decision d = step(&e, &in);
    assert_int_equal(d.feedback_alarm, 1);
    assert_true(d.reasons & HS_XR_PUMP_STILL_RUNNING);
    assert_int_equal(d.write, HS_WRITE_OFF);
    in.run_feedback.quality = HS_XQ_STALE; /* actuated feedback is a required input */
    assert_true(step(&e, &in).reasons & HS_XR_STALE_INPUT);
}

static void rule_checks(void **unused)
{
    (void)unused;
    char why[128];
    struct hs_transfer_rule r;
    hs_transfer_rule_defaults(&r);
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), -1);
    assert_non_null(strstr(why, "start density"));
    r = base_rule();
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), 0);
    r.dest_density_min_kg_m3 = 1300;
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), -1);
    assert_non_null(strstr(why, "band"));
    r = base_rule();
    r.min_on_ms = 10;
    r.max_run_ms = 5;
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), -1);
    r = base_rule();
    r.trigger = HS_TRIGGER_STAGE;
    r.start_stage = 42;
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), -1);
    assert_non_null(strstr(why, "stage"));
    r = base_rule();
    r.actuate = r.has_feedback = 1;
    r.feedback_timeout_ms = 0;
    assert_int_equal(hs_transfer_rule_check(&r, why, sizeof why), -1);
}

static void names_and_format(void **unused)
{
    (void)unused;
    char buf[256];
    int n = hs_transfer_reasons_format(HS_XR_RAIN | HS_XR_BUS_DOWN, buf, sizeof buf);
    assert_string_equal(buf, "rain,bus-down");
    assert_int_equal(n, (int)strlen(buf));
    char small[6];
    n = hs_transfer_reasons_format(HS_XR_RAIN | HS_XR_BUS_DOWN, small, sizeof small);
    assert_int_equal(n, 13);
    assert_string_equal(small, "rain,");
    assert_int_equal(hs_transfer_reasons_format(0, buf, sizeof buf), 0);
    assert_string_equal(buf, "");
    for (unsigned i = 0; i < HS_XR_BITS; i++)
        assert_non_null(hs_transfer_reason_name(1u << i));
    assert_null(hs_transfer_reason_name(1u << HS_XR_BITS));
    assert_null(hs_transfer_reason_name(3));
    assert_string_equal(hs_advice_name(HS_ADVICE_BLOCKED), "blocked");
    assert_int_equal(hs_transfer_heartbeat_next(1), 2);
    assert_int_equal(hs_transfer_heartbeat_next(65535), 1);
    assert_int_equal(hs_transfer_heartbeat_next(0), 1);
}

/* ---- property test ---- */

static uint64_t rng_state = 0x9e3779b97f4a7c15ull;
static uint32_t rnd(void)
{
    /* xorshift64*: deterministic, so a failure reproduces */
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return (uint32_t)((rng_state * 2685821657736338717ull) >> 32);
}
static double uniform(double lo, double hi) { return lo + (hi - lo) * (rnd() / 4294967296.0); }

static struct hs_xfer_input random_input(double lo, double hi)
{
    struct hs_xfer_input in = good(uniform(lo, hi));
    uint32_t q = rnd() % 20;
    if (q == 0) in.quality = HS_XQ_BAD;
    else if (q == 1) in.quality = HS_XQ_STALE;
    else if (q == 2) in.value = NAN;
    return in;
}

static int usable(const struct hs_xfer_input *in)
{
    return in->quality == HS_XQ_GOOD && isfinite(in->value);
}

static void property_random_sequences(void **unused)
{
    (void)unused;
    const int sequences = 400, steps = 300;
    long on_cycles = 0, blocked_cycles = 0;
    for (int s = 0; s < sequences; s++) {
        struct hs_transfer_rule r = base_rule();
        r.actuate = (int)(rnd() % 2);
        r.has_feedback = r.actuate && rnd() % 2;
        r.min_on_ms = (int64_t)(rnd() % 4) * 20000;
        r.min_off_ms = (int64_t)(rnd() % 4) * 20000;
        r.max_run_ms = rnd() % 2 ? 0 : 60000 + (int64_t)(rnd() % 4) * 60000;
        if (r.max_run_ms && r.min_on_ms > r.max_run_ms)
            r.min_on_ms = r.max_run_ms;
        r.feedback_timeout_ms = 15000;
        if (rnd() % 2) {
            r.trigger = HS_TRIGGER_STAGE;
            r.start_stage = HC_STAGE_HALITE;
        }
        assert_int_equal(hs_transfer_rule_check(&r, NULL, 0), 0);
        struct engine e;
        engine_init(&e, r);
        int64_t now = 0, last_on = -1, last_off = 0;
        int was_on = 0;
        for (int k = 0; k < steps; k++) {
            now += 1000 + rnd() % 9000;
            struct hs_transfer_inputs in = ready_inputs(now);
            in.source_density = random_input(1195, 1225);
            in.source_stage = in.source_density.value >= 1211 ? HC_STAGE_HALITE : HC_STAGE_GYPSUM;
            in.source_level = random_input(0.15, 0.60);
            in.dest_level = random_input(0.10, 0.45);
            in.dest_density_after_mixing = random_input(1195, 1255);
            in.rain = random_input(0, 1);
            in.rain.value = in.rain.value > 0.9;
            in.manual = random_input(0, 1);
            in.manual.value = in.manual.value > 0.95;
            in.run_feedback = random_input(0, 1);
            in.run_feedback.value = in.run_feedback.value > 0.3;
            in.bus_up = rnd() % 30 != 0;
            struct hs_transfer_decision d = step(&e, &in);

            int all_good = usable(&in.source_density) && usable(&in.source_level) &&
                           usable(&in.dest_level) && usable(&in.dest_density_after_mixing) &&
                           usable(&in.rain) && usable(&in.manual) && in.bus_up &&
                           (!r.actuate || !r.has_feedback || usable(&in.run_feedback));
            /* never act on bad or stale data */
            if (!all_good) {
                assert_int_equal(d.pump_on, 0);
                assert_int_not_equal(d.write, HS_WRITE_ON);
                blocked_cycles++;
            }
            /* one command per cycle, consistent with the advice */
            assert_true(d.write == HS_WRITE_NONE || d.write == HS_WRITE_ON ||
                        d.write == HS_WRITE_OFF);
            if (d.write == HS_WRITE_ON)
                assert_int_equal(d.pump_on, 1);
            if (d.write == HS_WRITE_OFF)
                assert_int_equal(d.pump_on, 0);
            assert_int_equal(d.pump_on, d.advice == HS_ADVICE_RUN);
            if (!r.actuate)
                assert_int_equal(d.write, HS_WRITE_NONE);
            if (usable(&in.manual) && in.manual.value != 0)
                assert_int_equal(d.write, HS_WRITE_NONE);
            if (!usable(&in.manual)) /* unknown manual: hands off */
                assert_int_equal(d.write, HS_WRITE_NONE);
            if (d.reasons & HS_XR_INTERLOCK_MASK)
                assert_int_equal(d.pump_on, 0);
            /* timing rules */
            if (d.pump_on && !was_on) {
                if (r.min_off_ms)
                    assert_true(now - last_off >= r.min_off_ms);
                last_on = now;
            }
            if (d.pump_on && r.max_run_ms)
                assert_true(now - last_on < r.max_run_ms);
            if (!d.pump_on && was_on) {
                if (r.min_on_ms && now - last_on < r.min_on_ms)
                    assert_true(d.reasons & HS_XR_INTERLOCK_MASK);
                last_off = now;
            }
            on_cycles += d.pump_on;
            was_on = d.pump_on;
        }
    }
    /* the sequences must exercise both sides, or the test proves nothing */
    assert_true(on_cycles > 1000);
    assert_true(blocked_cycles > 1000);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(runs_when_ready),
        cmocka_unit_test(uncertain_source_waits),
        cmocka_unit_test(idle_below_trigger),
        cmocka_unit_test(density_hysteresis),
        cmocka_unit_test(stage_trigger),
        cmocka_unit_test(interlock_source_level),
        cmocka_unit_test(interlock_dest_level),
        cmocka_unit_test(interlock_band_low),
        cmocka_unit_test(interlock_band_high),
        cmocka_unit_test(interlock_rain),
        cmocka_unit_test(interlock_bad),
        cmocka_unit_test(interlock_nan),
        cmocka_unit_test(interlock_stale),
        cmocka_unit_test(interlock_rain_stale),
        cmocka_unit_test(interlock_bus),
        cmocka_unit_test(interlock_manual),
        cmocka_unit_test(level_deadband),
        cmocka_unit_test(unguarded_inputs_ignored),
        cmocka_unit_test(min_on_time),
        cmocka_unit_test(min_off_time),
        cmocka_unit_test(max_run_time),
        cmocka_unit_test(actuation_writes),
        cmocka_unit_test(manual_unknown_hands_off),
        cmocka_unit_test(feedback_lockout),
        cmocka_unit_test(density_source),
        cmocka_unit_test(run_feedback_missing),
        cmocka_unit_test(pump_still_running),
        cmocka_unit_test(rule_checks),
        cmocka_unit_test(names_and_format),
        cmocka_unit_test(property_random_sequences),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
