/* The alarm engine: rules from the config applied per pond, each alarm a
 * state machine with the ISA-18.2 states (normal, unacknowledged,
 * acknowledged, returned-to-normal unacknowledged, shelved, suppressed, out
 * of service). Rule kinds and their names are ours.
 *
 * Pure logic: no I/O, no clock, no threads. The caller passes the time
 * (ms since the epoch, UTC) into every call, so tests drive it with a fake
 * clock. Every transition is reported through an emit callback with a unique,
 * increasing event id; the caller journals it (hs_store_add_journal) and
 * publishes it. The engine allocates only in hs_alarm_new/hs_alarm_add.
 *
 * A condition is evaluated with a deadband (it clears only once the value is
 * back inside the limit by the deadband) and on/off delays (it must hold for
 * that long before the alarm raises or clears). An unknown value (NaN) holds
 * the condition as it was; the stale-sensor rule catches missing data.
 *
 * Uncertainty (a state's standard uncertainties, hc_uncertainty.h): a
 * density or Baume rule raises only when the value is past its limit by
 * HS_DECISION_K (2) standard uncertainties, and clears only when back inside
 * by max(deadband, 2u). Where the value is past the limit but within 2u the
 * alarm does not act and says so: hs_alarm_info.uncertain is set (the
 * caller logs it as `uncertain-source`). Saturation-index rules carry no
 * uncertainty yet and compare as given.
 * density-fall works on a robust filtered density: the median of the last
 * filter_samples samples (127 unless configured). Its fall must exceed the
 * rule's `high` and also HS_FALL_NOISE_K (10) standard deviations of that
 * median, estimated from the samples themselves (1.4826 MAD, GUM-free
 * robust statistics: Rousseeuw & Croux 1993; a median of N has about
 * 1.2533 sigma / sqrt(N), Kenney & Keeping 1962), the larger of the
 * estimates at the window's top and now; hs_margin.h says why ten. Until the filter is
 * full the fall is unknown.
 *
 * Error convention: functions return an hs_alarm_result; HS_ALARM_DONE (0)
 * and HS_ALARM_ALREADY (1, nothing to do) are successes. */
#ifndef HS_ALARM_H
#define HS_ALARM_H

#include <stddef.h>
#include <stdint.h>

#include "hc_state.h"
#include "hs_margin.h"

#define HS_ALARM_NAME_MAX 64 /* pond and rule names, with the terminating NUL */
#define HS_FALL_FILTER_MAX 255 /* longest density-fall median filter [samples] */

typedef enum {
    HS_ALARM_NORMAL,
    HS_ALARM_UNACKED,      /* active, not acknowledged */
    HS_ALARM_ACKED,        /* active, acknowledged */
    HS_ALARM_RTN_UNACKED,  /* returned to normal, not acknowledged */
    HS_ALARM_SHELVED,      /* hidden by an operator until an expiry */
    HS_ALARM_SUPPRESSED,   /* suppressed by design (e.g. pond empty or bypassed) */
    HS_ALARM_OUT_OF_SERVICE,
    HS_ALARM_STATE_COUNT
} hs_alarm_state;

/* What a rule watches for. */
typedef enum {
    HS_RULE_NEAR_SATURATION, /* halite SI (or density) near saturation where salt must not settle */
    HS_RULE_GYPSUM_IN_FEED,  /* crystalliser feed not yet past gypsum (Be too low) */
    HS_RULE_BITTERN_LIMIT,   /* crystalliser brine at the bittern limit (Be too high) */
    HS_RULE_DENSITY_BAND,    /* density outside the pond's band */
    HS_RULE_LEVEL_HIGH,
    HS_RULE_LEVEL_HIGH_HIGH,
    HS_RULE_LEVEL_LOW,
    HS_RULE_DENSITY_FALL,    /* rapid density fall, e.g. rain dilution */
    HS_RULE_SENSOR_STALE,    /* no good sample for too long */
    HS_RULE_BUS_DOWN,        /* the pond's field bus, or a device it reads, is down */
    /* a transfer's pump output (the alarm's "pond" is the transfer's name) */
    HS_RULE_OUTPUT_UNCONFIRMED, /* the device does not confirm the pump command */
    HS_RULE_FEEDBACK_LOCKOUT,   /* failed starts: locked out until an operator acks */
    HS_RULE_MANUAL_UNKNOWN,     /* the manual signal is unknown: hands off */
    HS_RULE_SENSOR_STUCK,    /* a signal of the pond repeats itself: stuck (flatline) */
    HS_RULE_KIND_COUNT
} hs_rule_kind;

/* The value a rule compares against its limits. */
typedef enum {
    HS_QTY_HALITE_SI,      /* log10(IAP/K) of halite [1] */
    HS_QTY_GYPSUM_SI,      /* [1] */
    HS_QTY_DENSITY,        /* [kg/m3] */
    HS_QTY_BAUME,          /* [deg Be] */
    HS_QTY_DEPTH,          /* [m] */
    HS_QTY_DENSITY_FALL,   /* highest density in the window minus now [kg/m3] */
    HS_QTY_SAMPLE_AGE,     /* age of the pond's oldest needed sample [s] */
    HS_QTY_BUS_DOWN,       /* 1 when down, 0 when up */
    HS_QTY_OUTPUT_UNCONFIRMED, /* 1 when the output is not confirmed, 0 when it is */
    HS_QTY_FEEDBACK_LOCKOUT,   /* 1 locked out, 0 not */
    HS_QTY_MANUAL_UNKNOWN,     /* 1 manual signal unknown, 0 known */
    HS_QTY_SENSORS_STUCK,  /* signals of the pond that are stuck (flatline) */
    HS_QTY_COUNT
} hs_alarm_quantity;

typedef enum {
    HS_PRIORITY_URGENT = 1,
    HS_PRIORITY_HIGH = 2,
    HS_PRIORITY_MEDIUM = 3,
    HS_PRIORITY_LOW = 4
} hs_alarm_priority;

typedef struct {
    char name[HS_ALARM_NAME_MAX]; /* the config's [alarm NAME] */
    hs_rule_kind kind;
    hs_alarm_quantity quantity;
    double high;            /* alarm above this; NaN when unused */
    double low;             /* alarm below this; NaN when unused */
    double deadband;        /* >= 0, in the quantity's unit */
    int64_t on_delay_ms;    /* condition must hold this long to raise */
    int64_t off_delay_ms;   /* and be gone this long to clear */
    hs_alarm_priority priority;
    int64_t window_ms;      /* density-fall look-back */
    unsigned filter_samples;/* density-fall: median of the last N samples (1..HS_FALL_FILTER_MAX) */
    int64_t max_shelve_ms;  /* longest shelve an operator may ask for */
} hs_alarm_rule;

/* NULL-terminated name lists, in enum order (priorities start at urgent). */
extern const char *const hs_rule_kind_names[HS_RULE_KIND_COUNT + 1];
extern const char *const hs_alarm_quantity_names[HS_QTY_COUNT + 1];
extern const char *const hs_alarm_priority_names[5];

/* Fills a rule of the kind with our defaults (limits, quantity, delays,
 * priority); the config overrides them. Sources of the defaults are in
 * hs_alarm_rules.c. */
void hs_alarm_rule_default(hs_alarm_rule *rule, hs_rule_kind kind);
/* "near-saturation", ...; NULL when out of range. */
const char *hs_rule_kind_name(hs_rule_kind kind);
int hs_rule_kind_from_name(const char *name); /* -1 when unknown */
const char *hs_alarm_state_name(hs_alarm_state state);
int hs_alarm_state_from_name(const char *name); /* -1 when unknown */
const char *hs_alarm_quantity_name(hs_alarm_quantity q); /* "halite_si", ... */
int hs_alarm_quantity_from_name(const char *name);
const char *hs_alarm_priority_name(hs_alarm_priority p); /* "urgent", ... */
int hs_alarm_priority_from_name(const char *name);
/* NULL when the rule is consistent, else a sentence naming the problem. */
const char *hs_alarm_rule_check(const hs_alarm_rule *rule);

/* What one evaluation of a pond knows. Unknown numbers are NaN. */
typedef struct {
    const hc_brine_state *state; /* may be NULL; its uncertainties set the margins */
    int64_t state_t_ms;          /* time of the newest input behind state; the
                                    density-fall filter takes a sample once per
                                    time (0: every call is a new sample) */
    double depth_m;
    double sample_age_s;
    int bus_down;                /* 1 down, 0 up, -1 unknown */
    /* a transfer's output (1 yes, 0 no, -1 unknown) */
    int output_unconfirmed, feedback_lockout, manual_unknown;
    double sensors_stuck;        /* stuck signals of the pond; NaN unknown */
} hs_alarm_input;

void hs_alarm_input_clear(hs_alarm_input *in);

/* One transition. Strings are valid during the callback only. */
typedef struct {
    uint64_t event_id;    /* unique, increasing */
    uint64_t episode_id;  /* event id that raised the current episode; 0 if none */
    int64_t t_ms;
    const char *pond;
    const char *rule;
    hs_rule_kind kind;
    hs_alarm_state from, to;
    int active;           /* the condition after this event */
    const char *cause;    /* "condition-raised", "acknowledged", "shelved", ... */
    hs_alarm_quantity quantity; /* what value and limit measure */
    double value;         /* value at the time; NaN when none */
    double limit;         /* limit crossed or in force; NaN when none */
    hs_alarm_priority priority;
    const char *actor;    /* who asked; NULL for the engine */
    const char *note;     /* operator's reason; may be NULL */
    int64_t shelved_until_ms; /* for "shelved"; 0 otherwise */
} hs_alarm_event;

typedef void (*hs_alarm_emit_fn)(void *ctx, const hs_alarm_event *ev);

typedef enum {
    HS_ALARM_DONE = 0,
    HS_ALARM_ALREADY = 1,       /* e.g. acknowledged before: nothing changed */
    HS_ALARM_UNKNOWN_POND = -1,
    HS_ALARM_UNKNOWN_RULE = -2,
    HS_ALARM_UNKNOWN_EVENT = -3,
    HS_ALARM_REFUSED = -4,      /* not allowed in this state or beyond a limit */
    HS_ALARM_INVALID = -5,      /* malformed argument */
    HS_ALARM_NO_MEMORY = -6
} hs_alarm_result;

const char *hs_alarm_result_text(hs_alarm_result r);

typedef struct hs_alarm_engine hs_alarm_engine;

/* next_event_id: first id to hand out (last journaled id + 1, at least 1).
 * The caller owns the engine and frees it with hs_alarm_free(). */
hs_alarm_engine *hs_alarm_new(uint64_t next_event_id);
void hs_alarm_free(hs_alarm_engine *eng);
/* Applies a checked rule to one pond (copied). INVALID for a bad rule or
 * name, REFUSED for a duplicate (pond, rule). */
hs_alarm_result hs_alarm_add(hs_alarm_engine *eng, const hs_alarm_rule *rule, const char *pond);
size_t hs_alarm_count(const hs_alarm_engine *eng);
uint64_t hs_alarm_next_event_id(const hs_alarm_engine *eng);

/* Sets one alarm's state after a restart, from its last journal row, with
 * no event. The condition starts unknown and is re-evaluated. */
hs_alarm_result hs_alarm_restore(hs_alarm_engine *eng, const char *pond, const char *rule,
                                 hs_alarm_state state, uint64_t last_event_id,
                                 uint64_t episode_id, int64_t shelved_until_ms);

/* Evaluates every alarm of the pond on new input. Call it for every pond
 * each cycle, even without a new state (input.state NULL), so that the
 * sample age and bus rules see missing data. */
hs_alarm_result hs_alarm_update(hs_alarm_engine *eng, const char *pond, const hs_alarm_input *in,
                                int64_t now_ms, hs_alarm_emit_fn emit, void *ctx);
/* Runs what depends on time alone: pending on/off delays and shelve expiry.
 * Call it at least once a second. */
void hs_alarm_tick(hs_alarm_engine *eng, int64_t now_ms, hs_alarm_emit_fn emit, void *ctx);

/* Operator actions. rule NULL in ack means every alarm of the pond. */
hs_alarm_result hs_alarm_ack(hs_alarm_engine *eng, const char *pond, const char *rule,
                             const char *actor, const char *note, int64_t now_ms,
                             hs_alarm_emit_fn emit, void *ctx);
/* Acknowledges the alarm that event_id belongs to. ALREADY when that alarm
 * needs no acknowledgement any more (or the event is from an older episode). */
hs_alarm_result hs_alarm_ack_event(hs_alarm_engine *eng, uint64_t event_id, const char *actor,
                                   const char *note, int64_t now_ms, hs_alarm_emit_fn emit,
                                   void *ctx);
hs_alarm_result hs_alarm_shelve(hs_alarm_engine *eng, const char *pond, const char *rule,
                                int64_t duration_ms, const char *actor, const char *note,
                                int64_t now_ms, hs_alarm_emit_fn emit, void *ctx);
hs_alarm_result hs_alarm_unshelve(hs_alarm_engine *eng, const char *pond, const char *rule,
                                  const char *actor, const char *note, int64_t now_ms,
                                  hs_alarm_emit_fn emit, void *ctx);
/* Suppression by design (rule NULL: every alarm of the pond). */
hs_alarm_result hs_alarm_suppress(hs_alarm_engine *eng, const char *pond, const char *rule,
                                  int suppressed, const char *note, int64_t now_ms,
                                  hs_alarm_emit_fn emit, void *ctx);
hs_alarm_result hs_alarm_set_in_service(hs_alarm_engine *eng, const char *pond,
                                        const char *rule, int in_service, const char *actor,
                                        const char *note, int64_t now_ms,
                                        hs_alarm_emit_fn emit, void *ctx);

/* A snapshot of one alarm for listings and status pages. */
typedef struct {
    const char *pond;
    const char *rule;
    hs_rule_kind kind;
    hs_alarm_state state;
    int active;
    double value;
    hs_alarm_priority priority;
    uint64_t episode_id;
    uint64_t last_event_id;
    int64_t shelved_until_ms;
    int uncertain;            /* past its limit within 2u: not acted on (uncertain-source) */
    int64_t max_shelve_ms;    /* the rule's longest shelve */
} hs_alarm_info;

/* i-th alarm (0 <= i < count); strings live as long as the engine. */
int hs_alarm_get(const hs_alarm_engine *eng, size_t i, hs_alarm_info *out);
/* 1 when pond has at least one alarm, rule (when not NULL) that name. */
int hs_alarm_has(const hs_alarm_engine *eng, const char *pond, const char *rule);

#endif
