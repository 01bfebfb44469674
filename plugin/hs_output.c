/* One pump output as a command/feedback pair; see hs_output.h for the
 * policy and the table of states. */
#include <string.h>

#include "hs_output.h"

static const char *const state_names[HS_OUT_STATE_COUNT] = {
    "unknown", "reading", "sending", "backoff", "confirmed", "failed", "hands-off",
};

const char *hs_output_state_name(hs_out_state s)
{
    return (unsigned)s < HS_OUT_STATE_COUNT ? state_names[s] : "invalid";
}

void hs_output_timing_default(struct hs_out_timing *t)
{
    t->answer_ms = 5000;
    t->confirm_ms = 3000;
    t->backoff_min_ms = 250;
    t->backoff_max_ms = 4000;
    t->verify_ms = 1000;
}

void hs_output_init(struct hs_output *o)
{
    memset(o, 0, sizeof *o);
    o->state = HS_OUT_UNKNOWN;
    o->want = -1;
    o->device = -1;
}

int hs_output_confirmed(const struct hs_output *o)
{
    return o->state == HS_OUT_CONFIRMED;
}

void hs_output_asked(struct hs_output *o, uint32_t seq, int64_t now_ms)
{
    o->seq = seq;
    o->asked_ms = now_ms;
}

/* The back-off after `attempts` sends: the first re-send goes at once. */
static int64_t backoff(const struct hs_out_timing *t, unsigned attempts)
{
    if (attempts <= 1)
        return 0;
    int64_t d = t->backoff_min_ms;
    for (unsigned i = 2; i < attempts && d < t->backoff_max_ms; i++)
        d *= 2;
    return d < t->backoff_max_ms ? d : t->backoff_max_ms;
}

static hs_out_action send(struct hs_output *o, int64_t now_ms, struct hs_out_events *ev)
{
    if (o->attempts == 0)
        ev->sent = 1;
    else
        ev->resent = 1;
    o->attempts++;
    o->state = o->state == HS_OUT_FAILED ? HS_OUT_FAILED : HS_OUT_SENDING;
    o->seq = 0;
    o->asked_ms = now_ms;
    return HS_OUT_SEND;
}

static void new_decision(struct hs_output *o, int want, int64_t now_ms)
{
    o->want = want;
    o->decided_ms = now_ms;
    o->attempts = 0;
}

/* Not confirmed: wait for the back-off, or give up to FAILED (which keeps
 * trying at the longest back-off). */
static void unconfirmed(struct hs_output *o, const struct hs_out_timing *t, int64_t now_ms,
                        struct hs_out_events *ev)
{
    o->seq = 0;
    if (o->state == HS_OUT_FAILED) {
        o->next_ms = now_ms + t->backoff_max_ms;
        return;
    }
    o->next_ms = now_ms + backoff(t, o->attempts);
    if (now_ms - o->decided_ms >= t->confirm_ms) {
        o->state = HS_OUT_FAILED;
        ev->failed = 1;
    } else {
        o->state = HS_OUT_BACKOFF;
    }
}

static void confirm(struct hs_output *o, int64_t now_ms, struct hs_out_events *ev,
                    const struct hs_out_timing *t)
{
    if (o->state == HS_OUT_FAILED)
        ev->recovered = 1;
    if (o->state != HS_OUT_CONFIRMED) {
        ev->confirmed = 1;
        o->confirmed_after_ms = now_ms - o->decided_ms;
    }
    o->state = HS_OUT_CONFIRMED;
    o->seq = 0;
    o->attempts = 0;
    o->next_ms = now_ms + t->verify_ms;
}

hs_out_action hs_output_step(struct hs_output *o, const struct hs_out_timing *t, int want,
                             int hands_off, int64_t now_ms, const struct hs_out_answer *answer,
                             struct hs_out_events *ev)
{
    memset(ev, 0, sizeof *ev);
    /* the answer to what we asked, if it came */
    int answered = o->seq != 0 && answer != NULL && answer->seq == o->seq;
    if (answered) {
        if (answer->have_value)
            o->device = answer->value_on ? 1 : 0;
        o->seq = 0;
    }
    if (hands_off) {
        if (o->state == HS_OUT_FAILED)
            ev->recovered = 1; /* nothing of ours to confirm any more */
        if (o->state != HS_OUT_HANDS_OFF) {
            o->state = HS_OUT_HANDS_OFF;
            o->next_ms = now_ms;
        }
        o->want = -1; /* whatever we decided before does not hold any more */
        if (o->seq == 0 && now_ms >= o->next_ms) {
            o->next_ms = now_ms + t->verify_ms;
            o->asked_ms = now_ms;
            return HS_OUT_READ;
        }
        if (o->seq != 0 && now_ms - o->asked_ms >= t->answer_ms)
            o->seq = 0;
        return HS_OUT_NONE;
    }
    if (o->state == HS_OUT_HANDS_OFF) {
        o->state = HS_OUT_UNKNOWN; /* back in our hands: read back first */
        o->seq = 0;
    }
    if (o->hold_run) {
        if (want != 0)
            return HS_OUT_NONE; /* a RUN the PLC or a panel undid is not ours to repeat */
        o->hold_run = 0;
    }
    if (want != o->want && want >= 0) {
        int keep_failed = o->state == HS_OUT_FAILED;
        new_decision(o, want, now_ms);
        if (o->state == HS_OUT_CONFIRMED || o->state == HS_OUT_BACKOFF || keep_failed ||
            o->state == HS_OUT_SENDING)
            return send(o, now_ms, ev); /* known device, new decision: at once */
    }

    switch (o->state) {
    case HS_OUT_UNKNOWN:
        o->state = HS_OUT_READING;
        o->asked_ms = now_ms;
        o->seq = 0;
        return HS_OUT_READ;
    case HS_OUT_READING:
        if (answered && answer->have_value) {
            if (o->want < 0 || o->device == o->want) {
                if (o->want >= 0)
                    confirm(o, now_ms, ev, t);
                else
                    o->state = HS_OUT_UNKNOWN; /* nothing decided: keep looking */
                return HS_OUT_NONE;
            }
            return send(o, now_ms, ev);
        }
        if (answered || (o->seq != 0 && now_ms - o->asked_ms >= t->answer_ms) ||
            (o->seq == 0 && now_ms - o->asked_ms >= t->answer_ms)) {
            /* no read-back: decide on the write's own read-back */
            if (o->want >= 0)
                return send(o, now_ms, ev);
            o->state = HS_OUT_UNKNOWN;
        }
        return HS_OUT_NONE;
    case HS_OUT_SENDING:
    case HS_OUT_FAILED:
        if (answered) {
            if (answer->ok_write && answer->have_value && o->device == o->want) {
                confirm(o, now_ms, ev, t);
                return HS_OUT_NONE;
            }
            unconfirmed(o, t, now_ms, ev);
            return o->next_ms <= now_ms ? send(o, now_ms, ev) : HS_OUT_NONE;
        }
        if (o->seq != 0 && now_ms - o->asked_ms < t->answer_ms) {
            /* waiting for the bus turn; the confirmation may be overdue */
            if (o->state == HS_OUT_SENDING && now_ms - o->decided_ms >= t->confirm_ms) {
                o->state = HS_OUT_FAILED;
                ev->failed = 1;
            }
            return HS_OUT_NONE;
        }
        if (o->seq != 0 || o->state == HS_OUT_SENDING) {
            /* no answer within answer_ms, or the request could not be posted */
            unconfirmed(o, t, now_ms, ev);
            return o->next_ms <= now_ms ? send(o, now_ms, ev) : HS_OUT_NONE;
        }
        return now_ms >= o->next_ms ? send(o, now_ms, ev) : HS_OUT_NONE;
    case HS_OUT_BACKOFF:
        if (now_ms - o->decided_ms >= t->confirm_ms) {
            o->state = HS_OUT_FAILED;
            ev->failed = 1;
        }
        return now_ms >= o->next_ms ? send(o, now_ms, ev) : HS_OUT_NONE;
    case HS_OUT_CONFIRMED:
        if (answered && answer->have_value && o->device != o->want) {
            if (o->want == 1) {
                ev->dropped = 1; /* the PLC or a panel stopped it: not ours to undo */
                o->state = HS_OUT_UNKNOWN;
                o->want = -1;
                o->hold_run = 1;
                return HS_OUT_NONE;
            }
            ev->overridden = 1;
            o->decided_ms = now_ms;
            o->attempts = 0;
            return send(o, now_ms, ev);
        }
        if (o->seq == 0 && now_ms >= o->next_ms) {
            o->next_ms = now_ms + t->verify_ms;
            o->asked_ms = now_ms;
            return HS_OUT_READ;
        }
        if (o->seq != 0 && now_ms - o->asked_ms >= t->answer_ms)
            o->seq = 0; /* a lost read: ask again at the next period */
        return HS_OUT_NONE;
    case HS_OUT_HANDS_OFF:
    case HS_OUT_STATE_COUNT:
        break;
    }
    return HS_OUT_NONE;
}
