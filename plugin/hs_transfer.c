/* Transfer-pump decision engine; see hs_transfer.h for the rules. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hc_state.h"
#include "hs_transfer.h"

static const struct {
    const char *name;
    const char *text;
} reason_table[HS_XR_BITS] = {
    {"source-level-low", "source pond level at or below its minimum"},
    {"destination-level-high", "destination pond level at or above its maximum"},
    {"destination-density-band", "destination density after mixing would leave its band"},
    {"rain", "rain is falling or forecast"},
    {"bad-input", "an input needed for this transfer is bad or missing"},
    {"stale-input", "an input needed for this transfer is stale"},
    {"bus-down", "a field bus this transfer needs is down"},
    {"manual-override", "the pump is in manual (local) control"},
    {"no-run-feedback", "the pump did not confirm running; locked out for the minimum off time"},
    {"manual-unknown", "the pump's manual signal is unknown: hands off, nothing is written"},
    {"feedback-lockout", "the pump failed to start too often; locked out until an operator resets it"},
    {"density-source", "the density this transfer decides on is not from its own source (changed or missing)"},
    {"output-unconfirmed", "the device does not confirm the pump command"},
    {"output-dropped", "the PLC or a panel stopped the pump; not restarted before the minimum off time"},
    {"trigger-met", "the source brine has reached its transfer point"},
    {"trigger-not-met", "the source brine has not reached its transfer point"},
    {"hysteresis-hold", "running on: source still within the hysteresis of its transfer point"},
    {"min-on-time", "kept running for the minimum on time"},
    {"min-off-time", "kept off for the minimum off time"},
    {"max-run-time", "stopped: maximum run time reached"},
    {"pump-still-running", "commanded off but the pump still reports running"},
    {"uncertain-source", "the source density is too uncertain to say the trigger is met"},
};

void hs_transfer_state_init(struct hs_transfer_state *state)
{
    memset(state, 0, sizeof *state);
    state->start_density_kg_m3 = NAN;
    state->start_method = -1;
}

void hs_transfer_reset_lockout(struct hs_transfer_state *state)
{
    state->locked_out = 0;
    state->failed_starts = 0;
}

void hs_transfer_rule_defaults(struct hs_transfer_rule *rule)
{
    memset(rule, 0, sizeof *rule);
    rule->trigger = HS_TRIGGER_DENSITY;
    rule->start_density_kg_m3 = NAN;
    rule->start_stage = HC_STAGE_NONE;
    rule->hysteresis_kg_m3 = 2.0; /* common practice, no source: ~0.2 deg Be near 1.2 */
    rule->source_level_min_m = NAN;
    rule->dest_level_max_m = NAN;
    rule->level_deadband_m = 0.02;
    rule->dest_density_min_kg_m3 = NAN;
    rule->dest_density_max_kg_m3 = NAN;
    rule->feedback_timeout_ms = 30000;
    rule->lockout_after = 3;
    rule->density_method = -1;
}

int hs_transfer_rule_check(const struct hs_transfer_rule *rule, char *why, size_t why_len)
{
    const char *reason = NULL;
    if (rule->trigger == HS_TRIGGER_DENSITY && !(rule->start_density_kg_m3 > 0))
        reason = "a density trigger needs a positive start density";
    else if (rule->trigger == HS_TRIGGER_STAGE &&
             (rule->start_stage < 0 || rule->start_stage >= HC_STAGE_COUNT))
        reason = "a stage trigger needs a known stage";
    else if (!(rule->hysteresis_kg_m3 >= 0))
        reason = "hysteresis must be zero or positive";
    else if (!(rule->level_deadband_m >= 0))
        reason = "level deadband must be zero or positive";
    else if (!isnan(rule->dest_density_min_kg_m3) && !isnan(rule->dest_density_max_kg_m3) &&
             !(rule->dest_density_min_kg_m3 < rule->dest_density_max_kg_m3))
        reason = "destination density band: minimum must be below maximum";
    else if (rule->min_on_ms < 0 || rule->min_off_ms < 0 || rule->max_run_ms < 0 ||
             rule->feedback_timeout_ms < 0)
        reason = "durations cannot be negative";
    else if (rule->max_run_ms > 0 && rule->min_on_ms > rule->max_run_ms)
        reason = "minimum on time exceeds the maximum run time";
    else if (rule->actuate && rule->has_feedback && rule->feedback_timeout_ms == 0)
        reason = "an actuated pump with run feedback needs a feedback timeout";
    else if (rule->lockout_after < 0)
        reason = "lockout_after cannot be negative";
    if (reason == NULL)
        return 0;
    if (why != NULL && why_len > 0)
        snprintf(why, why_len, "%s", reason);
    return -1;
}

/* Adds BAD/STALE reasons for one required input; returns 1 when usable. */
static int require(const struct hs_xfer_input *in, unsigned *reasons)
{
    switch (in->quality) {
    case HS_XQ_GOOD:
        if (isfinite(in->value))
            return 1;
        *reasons |= HS_XR_BAD_INPUT;
        return 0;
    case HS_XQ_STALE:
        *reasons |= HS_XR_STALE_INPUT;
        return 0;
    case HS_XQ_BAD:
    case HS_XQ_ABSENT:
    default:
        *reasons |= HS_XR_BAD_INPUT;
        return 0;
    }
}

static void latch(struct hs_transfer_state *state, unsigned bit, int64_t until)
{
    state->latched |= bit;
    if (until > state->latch_until_ms)
        state->latch_until_ms = until;
}

/* Returns 1 when the source brine asks for a transfer (start or keep on). */
static int triggered(const struct hs_transfer_rule *rule, const struct hs_transfer_state *state,
                     const struct hs_transfer_inputs *in, unsigned *reasons)
{
    double rho = in->source_density.value;
    double u = in->source_density_u;
    double margin = u > 0.0 ? HS_DECISION_K * u : 0.0; /* NaN u: no margin known */
    double band = fmax(rule->hysteresis_kg_m3, margin);
    int met, sure;
    double hold_from;
    if (rule->trigger == HS_TRIGGER_STAGE) {
        met = in->source_stage != HC_STAGE_NONE && in->source_stage >= rule->start_stage;
        sure = met && (margin == 0.0 || (in->source_stage_low != HC_STAGE_NONE &&
                                         in->source_stage_low >= rule->start_stage));
        /* Stages are discrete; hold on through noise at the boundary by the
         * density at which the run began. */
        hold_from = state->start_density_kg_m3 - band;
    } else {
        met = rho >= rule->start_density_kg_m3;
        sure = rho >= rule->start_density_kg_m3 + margin;
        hold_from = rule->start_density_kg_m3 - band;
    }
    if (sure || (met && state->running)) {
        *reasons |= HS_XR_TRIGGER_MET;
        return 1;
    }
    if (state->running && rho >= hold_from) {
        *reasons |= HS_XR_HYSTERESIS_HOLD;
        return 1;
    }
    *reasons |= HS_XR_TRIGGER_NOT_MET;
    if (met)
        *reasons |= HS_XR_UNCERTAIN_SOURCE;
    return 0;
}

static int band_configured(const struct hs_transfer_rule *rule)
{
    return !isnan(rule->dest_density_min_kg_m3) || !isnan(rule->dest_density_max_kg_m3);
}

/* Interlocks from the inputs (not the latch). Updates the level flags. */
static unsigned interlocks(const struct hs_transfer_rule *rule, struct hs_transfer_state *state,
                           const struct hs_transfer_inputs *in, int *density_ok)
{
    unsigned r = 0;
    *density_ok = require(&in->source_density, &r);
    if (!in->bus_up)
        r |= HS_XR_BUS_DOWN;
    if (!isnan(rule->source_level_min_m) && require(&in->source_level, &r)) {
        double level = in->source_level.value;
        if (level <= rule->source_level_min_m)
            state->source_low = 1;
        else if (level >= rule->source_level_min_m + rule->level_deadband_m)
            state->source_low = 0;
    }
    if (!isnan(rule->dest_level_max_m) && require(&in->dest_level, &r)) {
        double level = in->dest_level.value;
        if (level >= rule->dest_level_max_m)
            state->dest_high = 1;
        else if (level <= rule->dest_level_max_m - rule->level_deadband_m)
            state->dest_high = 0;
    }
    if (!isnan(rule->source_level_min_m) && state->source_low)
        r |= HS_XR_SOURCE_LEVEL_LOW;
    if (!isnan(rule->dest_level_max_m) && state->dest_high)
        r |= HS_XR_DEST_LEVEL_HIGH;
    if (band_configured(rule) && require(&in->dest_density_after_mixing, &r)) {
        double rho = in->dest_density_after_mixing.value;
        if ((!isnan(rule->dest_density_min_kg_m3) && rho < rule->dest_density_min_kg_m3) ||
            (!isnan(rule->dest_density_max_kg_m3) && rho > rule->dest_density_max_kg_m3))
            r |= HS_XR_DEST_DENSITY_BAND;
    }
    if (rule->has_rain && require(&in->rain, &r) && in->rain.value != 0)
        r |= HS_XR_RAIN;
    if (rule->has_manual) {
        unsigned mr = 0;
        if (!require(&in->manual, &mr))
            r |= mr | (rule->actuate ? HS_XR_MANUAL_UNKNOWN : 0);
        else if (in->manual.value != 0)
            r |= HS_XR_MANUAL_OVERRIDE;
    }
    if (rule->density_method >= 0 && in->source_method != rule->density_method)
        r |= HS_XR_DENSITY_SOURCE;
    if (state->running && state->start_method >= 0 && in->source_method != state->start_method)
        r |= HS_XR_DENSITY_SOURCE;
    if (in->output_unconfirmed)
        r |= HS_XR_OUTPUT_UNCONFIRMED;
    if (rule->actuate && rule->has_feedback)
        require(&in->run_feedback, &r);
    return r;
}

/* Run-feedback supervision, only where we command the pump. */
static unsigned supervise_feedback(const struct hs_transfer_rule *rule,
                                   struct hs_transfer_state *state,
                                   const struct hs_transfer_inputs *in, unsigned reasons,
                                   int *alarm, int *lockout_alarm)
{
    if (reasons & (HS_XR_MANUAL_OVERRIDE | HS_XR_MANUAL_UNKNOWN))
        return 0; /* an operator drives the pump (or we cannot tell): nothing to supervise */
    if (!rule->actuate || !rule->has_feedback || in->run_feedback.quality != HS_XQ_GOOD ||
        !isfinite(in->run_feedback.value))
        return 0;
    int64_t since = in->now_ms - state->changed_ms;
    int confirms = in->run_feedback.value != 0;
    if (state->running && confirms)
        state->failed_starts = 0;
    if (state->running && !confirms && since >= rule->feedback_timeout_ms) {
        int64_t lockout = rule->min_off_ms > 0 ? rule->min_off_ms : rule->feedback_timeout_ms;
        if (!(state->latched & HS_XR_NO_RUN_FEEDBACK)) {
            *alarm = 1;
            state->failed_starts++;
            if (rule->lockout_after > 0 && state->failed_starts >= rule->lockout_after &&
                !state->locked_out) {
                state->locked_out = 1;
                *lockout_alarm = 1;
            }
        }
        latch(state, HS_XR_NO_RUN_FEEDBACK, in->now_ms + lockout);
        return 0;
    }
    if (!state->running && confirms && since >= rule->feedback_timeout_ms) {
        *alarm = 1;
        return HS_XR_PUMP_STILL_RUNNING;
    }
    return 0;
}

void hs_transfer_decide(const struct hs_transfer_rule *rule, struct hs_transfer_state *state,
                        const struct hs_transfer_inputs *in,
                        const struct hs_transfer_decision *prev,
                        struct hs_transfer_decision *out)
{
    memset(out, 0, sizeof *out);
    int64_t now = in->now_ms;
    if (!state->started) {
        /* The minimum off time counts from start-up too: the pump may
         * have been stopped moments ago by our own shutdown. */
        state->started = 1;
        state->changed_ms = now;
    }
    if (state->latched && now >= state->latch_until_ms)
        state->latched = 0;

    int density_ok;
    unsigned reasons = interlocks(rule, state, in, &density_ok);
    reasons |= supervise_feedback(rule, state, in, reasons, &out->feedback_alarm,
                                  &out->lockout_alarm);
    if (in->output_dropped && state->running) {
        /* the PLC or a panel stopped our pump: not ours to undo, and it
         * counts as a failed start, so a pump stopped again and again locks
         * out instead of being restarted after every minimum off time */
        int64_t rest = rule->min_off_ms > 0 ? rule->min_off_ms : rule->feedback_timeout_ms;
        latch(state, HS_XR_OUTPUT_DROPPED, now + rest);
        state->failed_starts++;
        if (rule->lockout_after > 0 && state->failed_starts >= rule->lockout_after &&
            !state->locked_out) {
            state->locked_out = 1;
            out->lockout_alarm = 1;
        }
    }
    if (state->locked_out)
        reasons |= HS_XR_LOCKOUT;

    int wanted = density_ok && triggered(rule, state, in, &reasons);
    if (state->running && rule->max_run_ms > 0 && now - state->changed_ms >= rule->max_run_ms) {
        int64_t rest = rule->min_off_ms > 0 ? rule->min_off_ms : rule->max_run_ms;
        latch(state, HS_XR_MAX_RUN_TIME, now + rest);
    }
    reasons |= state->latched;

    int on;
    if (reasons & HS_XR_INTERLOCK_MASK) {
        on = 0;
    } else if (state->running) {
        if (state->latched & HS_XR_MAX_RUN_TIME) {
            on = 0;
        } else if (wanted) {
            on = 1;
        } else if (rule->min_on_ms > 0 && now - state->changed_ms < rule->min_on_ms) {
            on = 1;
            reasons |= HS_XR_MIN_ON_TIME;
        } else {
            on = 0;
        }
    } else if (!wanted || state->latched) {
        on = 0;
    } else if (rule->min_off_ms > 0 && now - state->changed_ms < rule->min_off_ms) {
        on = 0;
        reasons |= HS_XR_MIN_OFF_TIME;
    } else {
        on = 1;
    }

    if (on != state->running) {
        state->running = on;
        state->changed_ms = now;
        if (on) {
            state->start_density_kg_m3 = in->source_density.value;
            state->start_method = in->source_method;
        } else {
            state->start_method = -1;
        }
    }

    out->pump_on = on;
    out->reasons = reasons;
    if (on)
        out->advice = HS_ADVICE_RUN;
    else if (reasons & HS_XR_INTERLOCK_MASK)
        out->advice = HS_ADVICE_BLOCKED;
    else if (wanted)
        out->advice = HS_ADVICE_WAIT;
    else
        out->advice = HS_ADVICE_IDLE;

    out->manual_unknown = (reasons & HS_XR_MANUAL_UNKNOWN) != 0;
    if (!rule->actuate || (reasons & (HS_XR_MANUAL_OVERRIDE | HS_XR_MANUAL_UNKNOWN)))
        out->write = HS_WRITE_NONE; /* hands off: local control, or we cannot tell */
    else
        out->write = on ? HS_WRITE_ON : HS_WRITE_OFF;
    out->changed = prev == NULL || prev->advice != out->advice || prev->reasons != out->reasons;
}

hs_pump_write hs_transfer_safe_write(const struct hs_transfer_rule *rule,
                                     const struct hs_xfer_input *manual)
{
    if (!rule->actuate)
        return HS_WRITE_NONE;
    if (rule->has_manual && (manual == NULL || manual->quality != HS_XQ_GOOD ||
                             !isfinite(manual->value) || manual->value != 0))
        return HS_WRITE_NONE; /* in manual, or unknown: never written */
    return HS_WRITE_OFF;
}

const char *hs_transfer_reason_name(unsigned bit)
{
    for (unsigned i = 0; i < HS_XR_BITS; i++)
        if (bit == 1u << i)
            return reason_table[i].name;
    return NULL;
}

const char *hs_transfer_reason_text(unsigned bit)
{
    for (unsigned i = 0; i < HS_XR_BITS; i++)
        if (bit == 1u << i)
            return reason_table[i].text;
    return NULL;
}

const char *hs_advice_name(hs_advice advice)
{
    switch (advice) {
    case HS_ADVICE_IDLE: return "idle";
    case HS_ADVICE_RUN: return "run";
    case HS_ADVICE_BLOCKED: return "blocked";
    case HS_ADVICE_WAIT: return "wait";
    }
    return "unknown";
}

int hs_transfer_reasons_format(unsigned reasons, char *buf, size_t len)
{
    int total = 0;
    if (len > 0)
        buf[0] = '\0';
    for (unsigned i = 0; i < HS_XR_BITS; i++) {
        if (!(reasons & (1u << i)))
            continue;
        size_t used = (size_t)total < len ? (size_t)total : len;
        int n = snprintf(buf + used, len - used, "%s%s", total ? "," : "", reason_table[i].name);
        if (n < 0)
            return n;
        total += n;
    }
    return total;
}

uint16_t hs_transfer_heartbeat_next(uint16_t previous)
{
    return previous == 65535u ? 1u : (uint16_t)(previous + 1u);
}
