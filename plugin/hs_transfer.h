/* Transfer-pump decisions: when to move brine from one pond to the next,
 * and every reason it must not. Pure logic: no I/O, no clock, no
 * allocation. The caller gathers inputs each cycle (with their quality),
 * calls hs_transfer_decide(), then journals, publishes and (only where the
 * site opted in with `actuate = yes`) writes the pump output.
 *
 * Safety rules built in:
 *  - Interlocks stop a running pump at once, whatever the minimum on time.
 *  - Any required input that is bad, stale or missing blocks the transfer
 *    and, when actuating, commands the pump off (its safe state).
 *  - A pump in manual override is never written, and neither is one whose
 *    manual signal is unknown (bad, stale, missing): hands off, and the
 *    caller raises an alarm (decision.manual_unknown).
 *  - A pump that does not confirm running within the feedback timeout is
 *    commanded off and latched out for the minimum off time; after
 *    lockout_after such failed starts in a row it stays locked out until an
 *    operator resets it (hs_transfer_reset_lockout).
 *  - A transfer decides only on the density source it was set up for
 *    (rule.density_method) and stops when the source changes during a run.
 *  - An output command the device does not confirm (hs_output.h) stops the
 *    transfer; a running pump the PLC or a panel stopped is not restarted
 *    before the minimum off time.
 *  - Uncertainty: a transfer starts only when its trigger is met by a
 *    margin of HS_DECISION_K standard uncertainties of the source density
 *    (for a stage trigger: the stage of density - k u is reached), and a
 *    run holds on down to the start density less max(hysteresis, k u).
 *    A trigger met only within the margin gives `uncertain-source` and no
 *    start: the state cannot tell which side of the line the brine is.
 * Error convention: functions return 0 on success, -1 on a malformed rule
 * (hs_transfer_rule_check writes the reason). */
#ifndef HS_TRANSFER_H
#define HS_TRANSFER_H

#include <stddef.h>
#include <stdint.h>

#include "hs_margin.h"

#define HS_TRANSFER_NAME_MAX 48

typedef enum {
    HS_TRIGGER_DENSITY, /* source density at or above start_density_kg_m3 */
    HS_TRIGGER_STAGE    /* source at or past start_stage (an hc_stage) */
} hs_trigger_kind;

/* Quality of one input as the transfer engine sees it. */
typedef enum {
    HS_XQ_GOOD,
    HS_XQ_STALE,   /* older than the signal's stale limit */
    HS_XQ_BAD,     /* comm failure, out of range, sentinel, decode error */
    HS_XQ_ABSENT   /* no such signal configured */
} hs_xfer_quality;

struct hs_xfer_input {
    double value;
    hs_xfer_quality quality;
};

/* One transfer's rule, from its [transfer NAME] section. NaN disables a
 * numeric limit; a zero duration disables that timing rule. */
struct hs_transfer_rule {
    hs_trigger_kind trigger;
    double start_density_kg_m3;   /* density trigger [kg/m3] */
    int start_stage;              /* stage trigger (hc_stage value) */
    double hysteresis_kg_m3;      /* stop below start density minus this [kg/m3] */
    double source_level_min_m;    /* stop at or below [m] */
    double dest_level_max_m;      /* stop at or above [m] */
    double level_deadband_m;      /* a level interlock clears this far inside [m] */
    double dest_density_min_kg_m3;/* band the destination must stay in after mixing */
    double dest_density_max_kg_m3;
    int64_t min_on_ms;
    int64_t min_off_ms;
    int64_t max_run_ms;
    int64_t feedback_timeout_ms;  /* run feedback must confirm within this */
    int actuate;                  /* 0: advisory only (default) */
    int has_rain;                 /* a rain signal guards this transfer */
    int has_manual;               /* a manual-override signal exists */
    int has_feedback;             /* a run-feedback signal exists */
    int lockout_after;            /* failed starts in a row before the lockout; 0: never */
    int density_method;           /* hc_method the source must be decided on; -1: any */
};

/* One cycle's inputs. Inputs a rule does not use may be left absent. */
struct hs_transfer_inputs {
    int64_t now_ms;                    /* monotonic [ms] */
    struct hs_xfer_input source_density;  /* [kg/m3] */
    double source_density_u;           /* its standard uncertainty [kg/m3]; 0 or NaN:
                                          not known (no margin) */
    int source_stage;                  /* hc_stage, valid when source_density is good */
    int source_stage_low;              /* stage of the source density less k u (hc_stage);
                                          read only when source_density_u > 0 */
    struct hs_xfer_input source_level;    /* [m] */
    struct hs_xfer_input dest_level;      /* [m] */
    struct hs_xfer_input dest_density_after_mixing; /* predicted [kg/m3] */
    struct hs_xfer_input rain;            /* nonzero: raining or rain forecast */
    struct hs_xfer_input manual;          /* nonzero: pump in manual (local) control */
    struct hs_xfer_input run_feedback;    /* nonzero: pump confirms running */
    int bus_up;                        /* every bus the transfer needs is connected */
    int source_method;                 /* hc_method behind source_density; -1 unknown */
    int output_unconfirmed;            /* the device does not confirm our command (hs_output.h) */
    int output_dropped;                /* a confirmed RUN was undone by the PLC or a panel */
};

/* Reasons, as bits. The first group are interlocks: any one blocks. Only
 * the names leave the process (journal, MQTT), never the bit numbers. */
enum {
    HS_XR_SOURCE_LEVEL_LOW    = 1u << 0,
    HS_XR_DEST_LEVEL_HIGH     = 1u << 1,
    HS_XR_DEST_DENSITY_BAND   = 1u << 2,
    HS_XR_RAIN                = 1u << 3,
    HS_XR_BAD_INPUT           = 1u << 4,
    HS_XR_STALE_INPUT         = 1u << 5,
    HS_XR_BUS_DOWN            = 1u << 6,
    HS_XR_MANUAL_OVERRIDE     = 1u << 7,
    HS_XR_NO_RUN_FEEDBACK     = 1u << 8,  /* latched fault */
    HS_XR_MANUAL_UNKNOWN      = 1u << 9,  /* manual signal bad/stale: hands off */
    HS_XR_LOCKOUT             = 1u << 10, /* too many failed starts: operator reset */
    HS_XR_DENSITY_SOURCE      = 1u << 11, /* deciding density source changed or missing */
    HS_XR_OUTPUT_UNCONFIRMED  = 1u << 12, /* the device does not confirm the command */
    HS_XR_OUTPUT_DROPPED      = 1u << 13, /* latched: PLC or panel stopped our pump */
    HS_XR_INTERLOCK_MASK      = (1u << 14) - 1,
    /* timing and trigger: explain, never a safety block */
    HS_XR_TRIGGER_MET         = 1u << 14,
    HS_XR_TRIGGER_NOT_MET     = 1u << 15,
    HS_XR_HYSTERESIS_HOLD     = 1u << 16, /* running, trigger fell but within hysteresis */
    HS_XR_MIN_ON_TIME         = 1u << 17, /* kept running: minimum on time */
    HS_XR_MIN_OFF_TIME        = 1u << 18, /* kept off: minimum off time */
    HS_XR_MAX_RUN_TIME        = 1u << 19, /* stopped: maximum run time reached */
    HS_XR_PUMP_STILL_RUNNING  = 1u << 20, /* commanded off, feedback says running */
    HS_XR_UNCERTAIN_SOURCE    = 1u << 21, /* the trigger is within k u of the source
                                             density: not started on a guess */
    HS_XR_BITS                = 22
};

typedef enum {
    HS_ADVICE_IDLE,    /* nothing to move: pump off */
    HS_ADVICE_RUN,     /* move brine: pump on */
    HS_ADVICE_BLOCKED, /* brine is ready but an interlock forbids it: pump off */
    HS_ADVICE_WAIT     /* brine is ready, a timing rule holds it off: pump off */
} hs_advice;

typedef enum {
    HS_WRITE_NONE, /* write nothing (advisory, or pump in manual) */
    HS_WRITE_ON,
    HS_WRITE_OFF
} hs_pump_write;

/* Memory between cycles; zero it (hs_transfer_state_init) at start. */
struct hs_transfer_state {
    int running;            /* the advice/command is "on" */
    int started;            /* a first decision has been made */
    int64_t changed_ms;     /* when running last changed */
    int64_t latch_until_ms; /* no start before this (max run, feedback fault) */
    unsigned latched;       /* reason bits held by the latch */
    int source_low;         /* level interlocks, with their deadband */
    int dest_high;
    double start_density_kg_m3; /* source density when the run began */
    int start_method;       /* hc_method of the source when the run began */
    int failed_starts;      /* starts in a row the run feedback never confirmed */
    int locked_out;         /* lockout_after reached: off until an operator resets */
};

struct hs_transfer_decision {
    hs_advice advice;
    int pump_on;            /* the advice in one bit */
    hs_pump_write write;    /* what to write to the pump output this cycle */
    unsigned reasons;       /* HS_XR_* */
    int changed;            /* advice or reasons differ from last cycle */
    int feedback_alarm;     /* run feedback missing: raise an alarm */
    int lockout_alarm;      /* this cycle locked the transfer out */
    int manual_unknown;     /* actuated, but the manual signal is unknown: alarm */
};

void hs_transfer_state_init(struct hs_transfer_state *state);

/* Sets the rule's defaults: density trigger with NaN thresholds (so the
 * config must give one), deadband 0.02 m, advisory. */
void hs_transfer_rule_defaults(struct hs_transfer_rule *rule);

/* 0 when the rule is coherent, else -1 with a reason in why. */
int hs_transfer_rule_check(const struct hs_transfer_rule *rule, char *why, size_t why_len);

/* One cycle. prev is the last decision (or NULL at the first cycle) and is
 * only read to set out->changed. Always fills out. */
void hs_transfer_decide(const struct hs_transfer_rule *rule, struct hs_transfer_state *state,
                        const struct hs_transfer_inputs *in,
                        const struct hs_transfer_decision *prev,
                        struct hs_transfer_decision *out);

/* The safe state for shutdown: pump off when actuating and the manual
 * signal (when configured) is known and says remote; nothing otherwise. */
hs_pump_write hs_transfer_safe_write(const struct hs_transfer_rule *rule,
                                     const struct hs_xfer_input *manual);

/* An operator's reset of a feedback lockout (also clears the failed-start
 * count). */
void hs_transfer_reset_lockout(struct hs_transfer_state *state);

/* Short names ("source-level-low") and operator sentences per reason bit;
 * NULL for an unknown bit. */
const char *hs_transfer_reason_name(unsigned bit);
const char *hs_transfer_reason_text(unsigned bit);
const char *hs_advice_name(hs_advice advice); /* "idle", "run", "blocked", "wait" */

/* Writes "name,name,..." of the set bits into buf (empty when none).
 * Returns the length that would have been written, as snprintf. */
int hs_transfer_reasons_format(unsigned reasons, char *buf, size_t len);

/* The PLC heartbeat: a counter that changes every cycle, 1..65535 (never 0,
 * so a PLC can tell "never written" from "written"). */
uint16_t hs_transfer_heartbeat_next(uint16_t previous);

#endif
