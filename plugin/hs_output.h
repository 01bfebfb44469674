/* Commands to the field: one pump output as a command/feedback pair. The
 * transfer engine (hs_transfer.h) decides RUN or STOP; this module carries
 * the decision to the device and believes only what the device says back.
 * Pure logic: no I/O, no clock (the caller passes monotonic ms), no
 * allocation. The caller (hs_runtime_transfer.c) performs the action
 * hs_output_step returns through the bus's priority commands (hp_outcmd.h)
 * and hands every result back.
 *
 * Policy:
 *  - The state of an output is what the device reports (coil or register
 *    read back), never what we last sent.
 *  - Read back first: at start-up, after a reload and after hands-off, the
 *    output is read before anything is written; a device that already
 *    matches the decision is not written at all.
 *  - A new decision is written at once and read back in the same bus turn
 *    (write + read, ahead of queued reads). A mismatch, a refused or
 *    unanswered write, or no answer within answer_ms is re-sent at once,
 *    then with back-off (backoff_min_ms doubling up to backoff_max_ms). A
 *    slow device may apply a write late: every re-send reads back too.
 *  - Not confirmed within confirm_ms of the decision: FAILED. The caller
 *    raises an alarm in the journal and stops counting the PLC heartbeat,
 *    so the PLC's watchdog takes over. FAILED keeps re-sending at the
 *    longest back-off; a confirmation returns to CONFIRMED (alarm clears,
 *    heartbeat resumes).
 *  - Re-assert means "check", not "write again": a confirmed output is read
 *    back every verify_ms. If the device shows STOP while we decided RUN, the
 *    PLC or a panel stopped the pump: we never overwrite that (DROPPED is
 *    reported; no RUN is sent until the engine has decided STOP, and the
 *    engine latches the transfer off and counts a failed start).
 *    If the device shows RUN while we decided STOP, STOP is sent again (the
 *    safe direction), unless the pump is in manual.
 *  - Hands off (manual, or manual unknown): nothing is written, ever; the
 *    output is only read.
 *
 * States (what the output is doing; the action each returns):
 *   UNKNOWN    nothing known: READ
 *   READING    read-back asked, waiting: NONE (or READ again after answer_ms)
 *   SENDING    command asked (write + read-back), waiting: NONE
 *   BACKOFF    not confirmed; re-send at next_ms: NONE, then SEND
 *   CONFIRMED  the device reports the decision: NONE, READ every verify_ms
 *   FAILED     not confirmed within confirm_ms: as BACKOFF, alarm raised
 *   HANDS_OFF  manual or unknown manual: READ every verify_ms, never SEND
 *
 * Memory: the caller owns every struct. Error convention: none (total). */
#ifndef HS_OUTPUT_H
#define HS_OUTPUT_H

#include <stdint.h>

typedef enum {
    HS_OUT_UNKNOWN,
    HS_OUT_READING,
    HS_OUT_SENDING,
    HS_OUT_BACKOFF,
    HS_OUT_CONFIRMED,
    HS_OUT_FAILED,
    HS_OUT_HANDS_OFF,
    HS_OUT_STATE_COUNT
} hs_out_state;

typedef enum { HS_OUT_NONE, HS_OUT_READ, HS_OUT_SEND } hs_out_action;

/* Timing of one output. hs_output_timing_default() fills sane values. */
struct hs_out_timing {
    int64_t answer_ms;      /* a bus turn not answered within this is re-asked */
    int64_t confirm_ms;     /* decision to confirmation, else FAILED */
    int64_t backoff_min_ms; /* first back-off after the immediate re-send */
    int64_t backoff_max_ms;
    int64_t verify_ms;      /* read-back period of a confirmed output */
};

/* One answer of the device for this output (from hp_outcmd_result). */
struct hs_out_answer {
    uint32_t seq;           /* the request it answers */
    int ok_write;           /* the write was acknowledged (or none was asked) */
    int have_value;         /* value was read back */
    int value_on;           /* 1: the device's output is RUN */
};

struct hs_output {
    hs_out_state state;
    int want;               /* -1 none yet, 0 STOP, 1 RUN */
    int device;             /* -1 unknown, 0 STOP, 1 RUN (as last read back) */
    uint32_t seq;           /* request we wait for; 0 none */
    int64_t asked_ms;       /* when that request was asked */
    int64_t decided_ms;     /* when want last changed (or the first send) */
    int64_t next_ms;        /* BACKOFF/FAILED: next send; CONFIRMED/HANDS_OFF: next read */
    unsigned attempts;      /* sends since decided_ms */
    int64_t confirmed_after_ms; /* last confirmation: decided to confirmed [ms] */
    int hold_run;           /* after DROPPED: no RUN until a STOP decision came */
};

/* What one step reports besides the action. */
struct hs_out_events {
    int sent;               /* a SEND is returned for a new decision (first attempt) */
    int resent;             /* a SEND is returned again for the same decision */
    int confirmed;          /* the device now matches the decision */
    int failed;             /* became FAILED this step (raise the alarm) */
    int recovered;          /* left FAILED this step (clear the alarm) */
    int dropped;            /* a confirmed RUN was undone outside us */
    int overridden;         /* the device ran against our STOP (re-sent) */
};

void hs_output_timing_default(struct hs_out_timing *t);
void hs_output_init(struct hs_output *o);

/* One step. want: 0 STOP, 1 RUN, -1 no decision (read only). hands_off:
 * never write. answer: the latest device answer, or NULL when none. *seq_out
 * is not set here: after performing a READ or SEND the caller calls
 * hs_output_asked() with the request's sequence number. */
hs_out_action hs_output_step(struct hs_output *o, const struct hs_out_timing *t, int want,
                             int hands_off, int64_t now_ms, const struct hs_out_answer *answer,
                             struct hs_out_events *ev);
/* The request for the action just returned was posted as seq (0: it could
 * not be posted; the step retries after the back-off). */
void hs_output_asked(struct hs_output *o, uint32_t seq, int64_t now_ms);

/* 1 when the device is known to match the decision. */
int hs_output_confirmed(const struct hs_output *o);
const char *hs_output_state_name(hs_out_state s); /* "confirmed", ... */

#endif
