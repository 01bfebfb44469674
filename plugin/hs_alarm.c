/* The alarm engine's state machines (see hs_alarm.h). Ownership: the engine
 * owns its array of alarms; nothing else is allocated after hs_alarm_add. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hc_uncertainty.h"
#include "hs_alarm.h"

#define FALL_SLOTS 16    /* density-fall window in 16 buckets of window/16 */
#define RECENT_EVENTS 16 /* event ids remembered per alarm for ack by id */

struct alarm {
    hs_alarm_rule rule;
    char pond[HS_ALARM_NAME_MAX];
    hs_alarm_state state;
    int active;               /* condition after deadband and delays */
    int raw;                  /* condition before delays; -1 unknown */
    int64_t raw_since_ms;     /* when raw last changed */
    double value;             /* last known value */
    double limit;             /* limit last crossed or in force */
    int64_t shelved_until_ms;
    uint64_t episode_id;
    uint64_t last_event_id;
    uint64_t recent[RECENT_EVENTS];
    unsigned recent_next;
    struct {
        int64_t bucket;
        double max;
        double sigma;         /* noise estimate when that max was taken */
    } fall[FALL_SLOTS];
    double filter[HS_FALL_FILTER_MAX]; /* density-fall: the last samples, a ring */
    unsigned filter_n, filter_next;
    int64_t filter_t_ms;      /* time of the last sample taken into the filter */
    int uncertain;            /* nominally past its limit, but within k u */
};

struct hs_alarm_engine {
    struct alarm *alarms;
    size_t n, cap;
    uint64_t next_event_id;
};

hs_alarm_engine *hs_alarm_new(uint64_t next_event_id)
{
    hs_alarm_engine *eng = calloc(1, sizeof *eng);
    if (eng)
        eng->next_event_id = next_event_id ? next_event_id : 1;
    return eng;
}

void hs_alarm_free(hs_alarm_engine *eng)
{
    if (eng) {
        free(eng->alarms);
        free(eng);
    }
}

size_t hs_alarm_count(const hs_alarm_engine *eng) { return eng->n; }
uint64_t hs_alarm_next_event_id(const hs_alarm_engine *eng) { return eng->next_event_id; }

static int name_ok(const char *s)
{
    return s != NULL && *s != '\0' && strlen(s) < HS_ALARM_NAME_MAX;
}

hs_alarm_result hs_alarm_add(hs_alarm_engine *eng, const hs_alarm_rule *rule, const char *pond)
{
    if (!name_ok(pond) || hs_alarm_rule_check(rule) != NULL)
        return HS_ALARM_INVALID;
    if (hs_alarm_has(eng, pond, rule->name))
        return HS_ALARM_REFUSED;
    if (eng->n == eng->cap) {
        size_t cap = eng->cap ? eng->cap * 2 : 16;
        struct alarm *more = realloc(eng->alarms, cap * sizeof *more);
        if (more == NULL)
            return HS_ALARM_NO_MEMORY;
        eng->alarms = more;
        eng->cap = cap;
    }
    struct alarm *a = &eng->alarms[eng->n++];
    memset(a, 0, sizeof *a);
    a->rule = *rule;
    strcpy(a->pond, pond);
    a->state = HS_ALARM_NORMAL;
    a->raw = -1;
    a->value = NAN;
    a->limit = !isnan(rule->high) ? rule->high : rule->low;
    for (int i = 0; i < FALL_SLOTS; i++)
        a->fall[i].bucket = INT64_MIN;
    return HS_ALARM_DONE;
}

int hs_alarm_has(const hs_alarm_engine *eng, const char *pond, const char *rule)
{
    for (size_t i = 0; i < eng->n; i++)
        if (strcmp(eng->alarms[i].pond, pond) == 0 &&
            (rule == NULL || strcmp(eng->alarms[i].rule.name, rule) == 0))
            return 1;
    return 0;
}

int hs_alarm_get(const hs_alarm_engine *eng, size_t i, hs_alarm_info *out)
{
    if (i >= eng->n)
        return -1;
    const struct alarm *a = &eng->alarms[i];
    *out = (hs_alarm_info){
        .pond = a->pond, .rule = a->rule.name, .kind = a->rule.kind, .state = a->state,
        .active = a->active, .value = a->value, .priority = a->rule.priority,
        .episode_id = a->episode_id, .last_event_id = a->last_event_id,
        .shelved_until_ms = a->shelved_until_ms, .uncertain = a->uncertain,
        .max_shelve_ms = a->rule.max_shelve_ms,
    };
    return 0;
}

/* Moves a to state `to` and reports it. raise starts a new episode. */
static void transition(hs_alarm_engine *eng, struct alarm *a, hs_alarm_state to, const char *cause,
                       int raise, const char *actor, const char *note, int64_t now_ms,
                       hs_alarm_emit_fn emit, void *ctx)
{
    uint64_t id = eng->next_event_id++;
    hs_alarm_state from = a->state;
    a->state = to;
    if (raise)
        a->episode_id = id;
    a->last_event_id = id;
    a->recent[a->recent_next++ % RECENT_EVENTS] = id;
    hs_alarm_event ev = {
        .event_id = id, .episode_id = a->episode_id, .t_ms = now_ms, .pond = a->pond,
        .rule = a->rule.name, .kind = a->rule.kind, .from = from, .to = to,
        .active = a->active, .cause = cause, .quantity = a->rule.quantity, .value = a->value, .limit = a->limit,
        .priority = a->rule.priority, .actor = actor, .note = note,
        .shelved_until_ms = to == HS_ALARM_SHELVED ? a->shelved_until_ms : 0,
    };
    if (to == HS_ALARM_NORMAL)
        a->episode_id = 0;
    if (emit)
        emit(ctx, &ev);
}

/* The state an alarm takes when it comes back from shelved, suppressed or
 * out of service: as if the condition were new. */
static void reenter(hs_alarm_engine *eng, struct alarm *a, const char *cause, const char *actor,
                    const char *note, int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    if (a->active)
        transition(eng, a, HS_ALARM_UNACKED, cause, 1, actor, note, now_ms, emit, ctx);
    else
        transition(eng, a, HS_ALARM_NORMAL, cause, 0, actor, note, now_ms, emit, ctx);
}

static void condition_changed(hs_alarm_engine *eng, struct alarm *a, int64_t now_ms,
                              hs_alarm_emit_fn emit, void *ctx)
{
    if (a->active) {
        if (a->state == HS_ALARM_NORMAL || a->state == HS_ALARM_RTN_UNACKED)
            transition(eng, a, HS_ALARM_UNACKED, "condition-raised", 1, NULL, NULL, now_ms, emit,
                       ctx);
    } else {
        if (a->state == HS_ALARM_UNACKED)
            transition(eng, a, HS_ALARM_RTN_UNACKED, "condition-cleared", 0, NULL, NULL, now_ms,
                       emit, ctx);
        else if (a->state == HS_ALARM_ACKED)
            transition(eng, a, HS_ALARM_NORMAL, "condition-cleared", 0, NULL, NULL, now_ms, emit,
                       ctx);
    }
}

/* Applies the on/off delay to a raw condition that differs from active. */
static void check_delay(hs_alarm_engine *eng, struct alarm *a, int64_t now_ms,
                        hs_alarm_emit_fn emit, void *ctx)
{
    if (a->raw < 0 || a->raw == a->active)
        return;
    int64_t delay = a->raw ? a->rule.on_delay_ms : a->rule.off_delay_ms;
    if (now_ms - a->raw_since_ms >= delay) {
        a->active = a->raw;
        condition_changed(eng, a, now_ms, emit, ctx);
    }
}

/* The condition before delays: past a limit by the margin m (k u; 0 when
 * no uncertainty applies) to raise, back inside by max(deadband, m) to
 * clear. Sets a->uncertain when the limit is crossed within the margin. */
static int raw_condition(struct alarm *a, double v, double m)
{
    const hs_alarm_rule *r = &a->rule;
    double band = fmax(r->deadband, m);
    a->uncertain = 0;
    if (!isnan(r->high) && (a->active ? v > r->high - band : v > r->high + m)) {
        a->limit = r->high;
        return 1;
    }
    if (!isnan(r->low) && (a->active ? v < r->low + band : v < r->low - m)) {
        a->limit = r->low;
        return 1;
    }
    a->uncertain = !a->active && ((!isnan(r->high) && v > r->high) ||
                                  (!isnan(r->low) && v < r->low));
    return 0;
}

/* Median of n values (n <= HS_FALL_FILTER_MAX), by insertion sort of a copy. */
static double median_of(const double *x, unsigned n)
{
    double s[HS_FALL_FILTER_MAX];
    for (unsigned i = 0; i < n; i++) {
        unsigned j = i;
        for (; j > 0 && s[j - 1] > x[i]; j--)
            s[j] = s[j - 1];
        s[j] = x[i];
    }
    return n % 2 ? s[n / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}

/* The filtered density (median of the last N samples) and the standard
 * deviation of that median, sigma_f = 1.2533 (1.4826 MAD) / sqrt(N)
 * (Rousseeuw & Croux 1993; Kenney & Keeping 1962); NaN until N samples. */
static double filtered_density(struct alarm *a, double rho, int64_t t_ms, double *sigma_f)
{
    unsigned n = a->rule.filter_samples;
    if (n < 1 || n > HS_FALL_FILTER_MAX)
        n = HS_FALL_FILTER_DEFAULT;
    /* one sample per input time: a state evaluated again on the same
     * readings is not new evidence (and would shrink the noise estimate) */
    if (t_ms == 0 || t_ms != a->filter_t_ms) {
        a->filter[a->filter_next] = rho;
        a->filter_next = (a->filter_next + 1) % n;
        if (a->filter_n < n)
            a->filter_n++;
        a->filter_t_ms = t_ms;
    }
    *sigma_f = NAN;
    if (a->filter_n < n)
        return NAN;
    double med = median_of(a->filter, n), dev[HS_FALL_FILTER_MAX];
    for (unsigned i = 0; i < n; i++)
        dev[i] = fabs(a->filter[i] - med);
    *sigma_f = 1.2533 * 1.4826 * median_of(dev, n) / sqrt((double)n);
    return med;
}

/* Highest filtered density in the look-back window minus the current one;
 * *margin gets what the fall must exceed besides `high`: HS_FALL_NOISE_K
 * standard deviations of the filtered density. */
static double density_fall(struct alarm *a, double raw, int64_t t_ms, int64_t now_ms,
                           double *margin)
{
    if (!isfinite(raw))
        return NAN;
    double sigma_f;
    double rho = filtered_density(a, raw, t_ms, &sigma_f);
    if (!isfinite(rho))
        return NAN;
    int64_t width = a->rule.window_ms / FALL_SLOTS;
    int64_t bucket = now_ms / width;
    int slot = (int)(((bucket % FALL_SLOTS) + FALL_SLOTS) % FALL_SLOTS);
    if (a->fall[slot].bucket != bucket) {
        a->fall[slot].bucket = bucket;
        a->fall[slot].max = rho;
        a->fall[slot].sigma = sigma_f;
    } else if (rho > a->fall[slot].max) {
        a->fall[slot].max = rho;
        a->fall[slot].sigma = sigma_f;
    }
    /* The fall compares two medians, each with the noise of its own time:
     * the brine's noise wanders (a factor two over a day near halite), and
     * a top taken while it was high must not be judged by a quiet moment's
     * estimate. */
    double top = rho, sigma_top = sigma_f;
    for (int i = 0; i < FALL_SLOTS; i++)
        if (a->fall[i].bucket > bucket - FALL_SLOTS && a->fall[i].bucket <= bucket &&
            a->fall[i].max > top) {
            top = a->fall[i].max;
            sigma_top = a->fall[i].sigma;
        }
    double sigma = fmax(sigma_f, sigma_top);
    /* the fall must exceed max(high, K sigma): as a margin past `high` */
    *margin = fmax(0.0, HS_FALL_NOISE_K * sigma - a->rule.high);
    return top - rho;
}

/* The value a rule compares and, in *margin, how far past a limit it must be
 * to count (k u of the state, or the fall's noise; 0 when none applies). */
static double quantity_value(struct alarm *a, const hs_alarm_input *in, int64_t now_ms,
                             double *margin)
{
    const hc_brine_state *s = in->state;
    double u = NAN;
    *margin = 0.0;
    if (s != NULL && a->rule.quantity == HS_QTY_DENSITY)
        u = hc_unc_density_ref(s);
    else if (s != NULL && a->rule.quantity == HS_QTY_BAUME)
        u = s->baume_uncertainty;
    if (u > 0.0)
        *margin = HS_DECISION_K * u;
    switch (a->rule.quantity) {
    case HS_QTY_HALITE_SI: return s ? s->saturation_index[HC_MIN_HALITE] : NAN;
    case HS_QTY_GYPSUM_SI: return s ? s->saturation_index[HC_MIN_GYPSUM] : NAN;
    /* densities referred to the reference temperature: a pond warming in
     * the afternoon loses in-situ density without changing its brine */
    case HS_QTY_DENSITY: return s ? s->density_ref_kg_m3 : NAN;
    case HS_QTY_BAUME: return s ? s->baume : NAN;
    case HS_QTY_DEPTH: return in->depth_m;
    case HS_QTY_DENSITY_FALL:
        return density_fall(a, s ? s->density_ref_kg_m3 : NAN, in->state_t_ms, now_ms, margin);
    case HS_QTY_SAMPLE_AGE: return in->sample_age_s;
    case HS_QTY_BUS_DOWN: return in->bus_down < 0 ? NAN : (double)(in->bus_down != 0);
    case HS_QTY_OUTPUT_UNCONFIRMED:
        return in->output_unconfirmed < 0 ? NAN : (double)(in->output_unconfirmed != 0);
    case HS_QTY_FEEDBACK_LOCKOUT:
        return in->feedback_lockout < 0 ? NAN : (double)(in->feedback_lockout != 0);
    case HS_QTY_MANUAL_UNKNOWN:
        return in->manual_unknown < 0 ? NAN : (double)(in->manual_unknown != 0);
    case HS_QTY_SENSORS_STUCK: return in->sensors_stuck;
    case HS_QTY_COUNT: break;
    }
    return NAN;
}

hs_alarm_result hs_alarm_update(hs_alarm_engine *eng, const char *pond, const hs_alarm_input *in,
                                int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    if (pond == NULL || in == NULL)
        return HS_ALARM_INVALID;
    int seen = 0;
    for (size_t i = 0; i < eng->n; i++) {
        struct alarm *a = &eng->alarms[i];
        if (strcmp(a->pond, pond) != 0)
            continue;
        seen = 1;
        double margin;
        double v = quantity_value(a, in, now_ms, &margin);
        if (isnan(v)) /* unknown: the condition holds as it was */
            continue;
        a->value = v;
        int raw = raw_condition(a, v, margin);
        if (raw != a->raw) {
            a->raw = raw;
            a->raw_since_ms = now_ms;
        }
        check_delay(eng, a, now_ms, emit, ctx);
    }
    return seen ? HS_ALARM_DONE : HS_ALARM_UNKNOWN_POND;
}

void hs_alarm_tick(hs_alarm_engine *eng, int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    for (size_t i = 0; i < eng->n; i++) {
        struct alarm *a = &eng->alarms[i];
        check_delay(eng, a, now_ms, emit, ctx);
        if (a->state == HS_ALARM_SHELVED && now_ms >= a->shelved_until_ms) {
            a->shelved_until_ms = 0;
            reenter(eng, a, "shelve-expired", NULL, NULL, now_ms, emit, ctx);
        }
    }
}

/* The alarm (pond, rule), or NULL with *why set. */
static struct alarm *find(hs_alarm_engine *eng, const char *pond, const char *rule,
                          hs_alarm_result *why)
{
    if (pond == NULL || rule == NULL) {
        *why = HS_ALARM_INVALID;
        return NULL;
    }
    *why = HS_ALARM_UNKNOWN_POND;
    for (size_t i = 0; i < eng->n; i++) {
        if (strcmp(eng->alarms[i].pond, pond) != 0)
            continue;
        *why = HS_ALARM_UNKNOWN_RULE;
        if (strcmp(eng->alarms[i].rule.name, rule) == 0)
            return &eng->alarms[i];
    }
    return NULL;
}

hs_alarm_result hs_alarm_restore(hs_alarm_engine *eng, const char *pond, const char *rule,
                                 hs_alarm_state state, uint64_t last_event_id,
                                 uint64_t episode_id, int64_t shelved_until_ms)
{
    hs_alarm_result why;
    struct alarm *a = find(eng, pond, rule, &why);
    if (a == NULL)
        return why;
    if ((unsigned)state >= HS_ALARM_STATE_COUNT || last_event_id >= eng->next_event_id)
        return HS_ALARM_INVALID;
    a->state = state;
    a->last_event_id = last_event_id;
    a->episode_id = episode_id;
    a->recent[a->recent_next++ % RECENT_EVENTS] = last_event_id;
    a->shelved_until_ms = state == HS_ALARM_SHELVED ? shelved_until_ms : 0;
    /* An alarm that was raised is taken as still active until the data say
     * otherwise, so a restart neither loses nor repeats it. */
    a->active = state == HS_ALARM_UNACKED || state == HS_ALARM_ACKED;
    a->raw = -1;
    return HS_ALARM_DONE;
}

static hs_alarm_result ack_one(hs_alarm_engine *eng, struct alarm *a, const char *actor,
                               const char *note, int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    if (a->state == HS_ALARM_UNACKED) {
        transition(eng, a, HS_ALARM_ACKED, "acknowledged", 0, actor, note, now_ms, emit, ctx);
        return HS_ALARM_DONE;
    }
    if (a->state == HS_ALARM_RTN_UNACKED) {
        transition(eng, a, HS_ALARM_NORMAL, "acknowledged", 0, actor, note, now_ms, emit, ctx);
        return HS_ALARM_DONE;
    }
    return HS_ALARM_ALREADY;
}

hs_alarm_result hs_alarm_ack(hs_alarm_engine *eng, const char *pond, const char *rule,
                             const char *actor, const char *note, int64_t now_ms,
                             hs_alarm_emit_fn emit, void *ctx)
{
    hs_alarm_result why;
    if (rule != NULL) {
        struct alarm *a = find(eng, pond, rule, &why);
        return a ? ack_one(eng, a, actor, note, now_ms, emit, ctx) : why;
    }
    if (pond == NULL)
        return HS_ALARM_INVALID;
    hs_alarm_result out = HS_ALARM_UNKNOWN_POND;
    for (size_t i = 0; i < eng->n; i++) {
        if (strcmp(eng->alarms[i].pond, pond) != 0)
            continue;
        if (ack_one(eng, &eng->alarms[i], actor, note, now_ms, emit, ctx) == HS_ALARM_DONE)
            out = HS_ALARM_DONE;
        else if (out == HS_ALARM_UNKNOWN_POND)
            out = HS_ALARM_ALREADY;
    }
    return out;
}

hs_alarm_result hs_alarm_ack_event(hs_alarm_engine *eng, uint64_t event_id, const char *actor,
                                   const char *note, int64_t now_ms, hs_alarm_emit_fn emit,
                                   void *ctx)
{
    if (event_id == 0 || event_id >= eng->next_event_id)
        return HS_ALARM_UNKNOWN_EVENT;
    for (size_t i = 0; i < eng->n; i++) {
        struct alarm *a = &eng->alarms[i];
        int mine = a->episode_id == event_id;
        for (int k = 0; !mine && k < RECENT_EVENTS; k++)
            mine = a->recent[k] == event_id;
        if (!mine)
            continue;
        /* Only an event of the episode still waiting for an ack counts. */
        if (a->episode_id != 0 && event_id >= a->episode_id)
            return ack_one(eng, a, actor, note, now_ms, emit, ctx);
        return HS_ALARM_ALREADY;
    }
    return HS_ALARM_ALREADY; /* issued, but older than any alarm remembers */
}

hs_alarm_result hs_alarm_shelve(hs_alarm_engine *eng, const char *pond, const char *rule,
                                int64_t duration_ms, const char *actor, const char *note,
                                int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    hs_alarm_result why;
    struct alarm *a = find(eng, pond, rule, &why);
    if (a == NULL)
        return why;
    if (duration_ms <= 0 || duration_ms > a->rule.max_shelve_ms)
        return HS_ALARM_REFUSED;
    if (a->state == HS_ALARM_SUPPRESSED || a->state == HS_ALARM_OUT_OF_SERVICE)
        return HS_ALARM_REFUSED;
    const char *cause = a->state == HS_ALARM_SHELVED ? "shelve-extended" : "shelved";
    a->shelved_until_ms = now_ms + duration_ms;
    transition(eng, a, HS_ALARM_SHELVED, cause, 0, actor, note, now_ms, emit, ctx);
    return HS_ALARM_DONE;
}

hs_alarm_result hs_alarm_unshelve(hs_alarm_engine *eng, const char *pond, const char *rule,
                                  const char *actor, const char *note, int64_t now_ms,
                                  hs_alarm_emit_fn emit, void *ctx)
{
    hs_alarm_result why;
    struct alarm *a = find(eng, pond, rule, &why);
    if (a == NULL)
        return why;
    if (a->state != HS_ALARM_SHELVED)
        return HS_ALARM_ALREADY;
    a->shelved_until_ms = 0;
    reenter(eng, a, "unshelved", actor, note, now_ms, emit, ctx);
    return HS_ALARM_DONE;
}

/* Sets or clears a special state (suppressed, out of service) on one alarm. */
static hs_alarm_result set_special(hs_alarm_engine *eng, struct alarm *a, hs_alarm_state special,
                                   int on, const char *cause_on, const char *cause_off,
                                   const char *actor, const char *note, int64_t now_ms,
                                   hs_alarm_emit_fn emit, void *ctx)
{
    if (on) {
        if (a->state == special)
            return HS_ALARM_ALREADY;
        if (special == HS_ALARM_SUPPRESSED && a->state == HS_ALARM_OUT_OF_SERVICE)
            return HS_ALARM_REFUSED;
        a->shelved_until_ms = 0;
        transition(eng, a, special, cause_on, 0, actor, note, now_ms, emit, ctx);
        return HS_ALARM_DONE;
    }
    if (a->state != special)
        return HS_ALARM_ALREADY;
    reenter(eng, a, cause_off, actor, note, now_ms, emit, ctx);
    return HS_ALARM_DONE;
}

static hs_alarm_result for_each(hs_alarm_engine *eng, const char *pond, const char *rule,
                                hs_alarm_state special, int on, const char *cause_on,
                                const char *cause_off, const char *actor, const char *note,
                                int64_t now_ms, hs_alarm_emit_fn emit, void *ctx)
{
    hs_alarm_result why;
    if (rule != NULL) {
        struct alarm *a = find(eng, pond, rule, &why);
        return a ? set_special(eng, a, special, on, cause_on, cause_off, actor, note, now_ms,
                               emit, ctx)
                 : why;
    }
    if (pond == NULL)
        return HS_ALARM_INVALID;
    hs_alarm_result out = HS_ALARM_UNKNOWN_POND;
    for (size_t i = 0; i < eng->n; i++) {
        if (strcmp(eng->alarms[i].pond, pond) != 0)
            continue;
        hs_alarm_result r = set_special(eng, &eng->alarms[i], special, on, cause_on, cause_off,
                                        actor, note, now_ms, emit, ctx);
        if (r == HS_ALARM_DONE || out == HS_ALARM_UNKNOWN_POND)
            out = r;
    }
    return out;
}

hs_alarm_result hs_alarm_suppress(hs_alarm_engine *eng, const char *pond, const char *rule,
                                  int suppressed, const char *note, int64_t now_ms,
                                  hs_alarm_emit_fn emit, void *ctx)
{
    return for_each(eng, pond, rule, HS_ALARM_SUPPRESSED, suppressed, "suppressed",
                    "unsuppressed", NULL, note, now_ms, emit, ctx);
}

hs_alarm_result hs_alarm_set_in_service(hs_alarm_engine *eng, const char *pond,
                                        const char *rule, int in_service, const char *actor,
                                        const char *note, int64_t now_ms,
                                        hs_alarm_emit_fn emit, void *ctx)
{
    return for_each(eng, pond, rule, HS_ALARM_OUT_OF_SERVICE, !in_service,
                    "removed-from-service", "returned-to-service", actor, note, now_ms, emit,
                    ctx);
}
