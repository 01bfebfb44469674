/* Alarm rule kinds: names, defaults and consistency checks. */
#include <math.h>
#include <string.h>

#include "hs_alarm.h"

const char *const hs_rule_kind_names[HS_RULE_KIND_COUNT + 1] = {
    "near-saturation", "gypsum-in-feed", "bittern-limit",   "density-band",
    "level-high",      "level-high-high", "level-low",      "density-fall",
    "sensor-stale",    "bus-down",        "output-unconfirmed", "feedback-lockout",
    "manual-unknown",  "sensor-stuck",    NULL,
};
#define kind_names hs_rule_kind_names

static const char *const state_names[HS_ALARM_STATE_COUNT] = {
    "normal",   "unacknowledged", "acknowledged",   "returned-unacknowledged",
    "shelved",  "suppressed",     "out-of-service",
};

const char *const hs_alarm_quantity_names[HS_QTY_COUNT + 1] = {
    "halite_si", "gypsum_si", "density_ref_kg_m3", "baume",
    "depth_m",   "density_fall_kg_m3", "sample_age_s", "bus_down",
    "output_unconfirmed", "feedback_lockout", "manual_unknown", "sensors_stuck", NULL,
};
#define quantity_names hs_alarm_quantity_names

const char *const hs_alarm_priority_names[5] = {"urgent", "high", "medium", "low", NULL};

static int lookup(const char *const *names, int n, const char *name)
{
    for (int i = 0; name != NULL && i < n; i++)
        if (names[i] != NULL && strcmp(names[i], name) == 0)
            return i;
    return -1;
}

const char *hs_rule_kind_name(hs_rule_kind k)
{
    return (unsigned)k < HS_RULE_KIND_COUNT ? kind_names[k] : NULL;
}
int hs_rule_kind_from_name(const char *name)
{
    return lookup(kind_names, HS_RULE_KIND_COUNT, name);
}
const char *hs_alarm_state_name(hs_alarm_state s)
{
    return (unsigned)s < HS_ALARM_STATE_COUNT ? state_names[s] : NULL;
}
int hs_alarm_state_from_name(const char *name)
{
    return lookup(state_names, HS_ALARM_STATE_COUNT, name);
}
const char *hs_alarm_quantity_name(hs_alarm_quantity q)
{
    return (unsigned)q < HS_QTY_COUNT ? quantity_names[q] : NULL;
}
int hs_alarm_quantity_from_name(const char *name)
{
    return lookup(quantity_names, HS_QTY_COUNT, name);
}
const char *hs_alarm_priority_name(hs_alarm_priority p)
{
    return p >= HS_PRIORITY_URGENT && p <= HS_PRIORITY_LOW ? hs_alarm_priority_names[p - 1]
                                                            : NULL;
}
int hs_alarm_priority_from_name(const char *name)
{
    int i = lookup(hs_alarm_priority_names, 4, name);
    return i < 0 ? -1 : i + 1;
}

const char *hs_alarm_result_text(hs_alarm_result r)
{
    switch (r) {
    case HS_ALARM_DONE: return "done";
    case HS_ALARM_ALREADY: return "nothing to do: already in that state";
    case HS_ALARM_UNKNOWN_POND: return "unknown pond";
    case HS_ALARM_UNKNOWN_RULE: return "unknown alarm rule for this pond";
    case HS_ALARM_UNKNOWN_EVENT: return "unknown event id";
    case HS_ALARM_REFUSED: return "refused in the alarm's present state or beyond a limit";
    case HS_ALARM_INVALID: return "invalid argument";
    case HS_ALARM_NO_MEMORY: return "out of memory";
    }
    return "unknown result";
}

/* Defaults. Where a limit comes from a source it is cited; the rest are
 * starting points for commissioning, marked as such. */
void hs_alarm_rule_default(hs_alarm_rule *r, hs_rule_kind kind)
{
    memset(r, 0, sizeof *r);
    r->kind = kind;
    r->high = NAN;
    r->low = NAN;
    r->deadband = 0.0;
    r->on_delay_ms = 60000;
    r->off_delay_ms = 60000;
    r->priority = HS_PRIORITY_MEDIUM;
    r->window_ms = 3600000;
    r->filter_samples = HS_FALL_FILTER_DEFAULT;
    r->max_shelve_ms = 24 * 3600000;
    switch (kind) {
    case HS_RULE_NEAR_SATURATION:
        /* SI = 0 is saturation by definition; -0.05 leaves about 10 % in IAP
         * (common practice, no source). */
        r->quantity = HS_QTY_HALITE_SI;
        r->high = -0.05;
        r->deadband = 0.02;
        r->on_delay_ms = 300000;
        r->off_delay_ms = 300000;
        r->priority = HS_PRIORITY_HIGH;
        break;
    case HS_RULE_GYPSUM_IN_FEED:
        /* Crystallisers are fed at about 25.5 to 26 deg Be (common practice,
         * no source). */
        r->quantity = HS_QTY_BAUME;
        r->low = 25.0;
        r->deadband = 0.2;
        r->on_delay_ms = 600000;
        r->off_delay_ms = 300000;
        break;
    case HS_RULE_BITTERN_LIMIT:
        /* Bittern drained at 29 deg Be (Baseggio 1974, 4th Symp. on Salt). */
        r->quantity = HS_QTY_BAUME;
        r->high = 29.0;
        r->deadband = 0.2;
        r->on_delay_ms = 600000;
        r->off_delay_ms = 300000;
        r->priority = HS_PRIORITY_HIGH;
        break;
    case HS_RULE_DENSITY_BAND:
        r->quantity = HS_QTY_DENSITY; /* band from the config, no default */
        r->deadband = 1.0;
        r->on_delay_ms = 600000;
        break;
    case HS_RULE_LEVEL_HIGH:
    case HS_RULE_LEVEL_HIGH_HIGH:
    case HS_RULE_LEVEL_LOW:
        r->quantity = HS_QTY_DEPTH; /* limits from the config (the dike's) */
        r->deadband = 0.01;
        r->on_delay_ms = 30000;
        r->priority = kind == HS_RULE_LEVEL_HIGH_HIGH ? HS_PRIORITY_URGENT
                      : kind == HS_RULE_LEVEL_HIGH    ? HS_PRIORITY_HIGH
                                                      : HS_PRIORITY_MEDIUM;
        break;
    case HS_RULE_DENSITY_FALL:
        /* 5 kg/m3 within an hour is far beyond evaporation's pace (common
         * practice, no source). */
        r->quantity = HS_QTY_DENSITY_FALL;
        r->high = 5.0;
        r->deadband = 1.0;
        r->on_delay_ms = 0;
        r->off_delay_ms = 600000;
        r->priority = HS_PRIORITY_HIGH;
        break;
    case HS_RULE_SENSOR_STALE:
        r->quantity = HS_QTY_SAMPLE_AGE;
        r->high = 120.0;
        r->on_delay_ms = 0;
        r->off_delay_ms = 0;
        break;
    case HS_RULE_BUS_DOWN:
        r->quantity = HS_QTY_BUS_DOWN;
        r->high = 0.5;
        r->on_delay_ms = 30000;
        r->off_delay_ms = 0;
        r->priority = HS_PRIORITY_HIGH;
        break;
    case HS_RULE_OUTPUT_UNCONFIRMED:
    case HS_RULE_FEEDBACK_LOCKOUT:
    case HS_RULE_MANUAL_UNKNOWN:
        /* raised at once: each stands for a pump nobody may rely on */
        r->quantity = kind == HS_RULE_OUTPUT_UNCONFIRMED ? HS_QTY_OUTPUT_UNCONFIRMED
                      : kind == HS_RULE_FEEDBACK_LOCKOUT ? HS_QTY_FEEDBACK_LOCKOUT
                                                         : HS_QTY_MANUAL_UNKNOWN;
        r->high = 0.5;
        r->on_delay_ms = 0;
        r->off_delay_ms = 0;
        r->priority = kind == HS_RULE_OUTPUT_UNCONFIRMED ? HS_PRIORITY_URGENT : HS_PRIORITY_HIGH;
        break;
    case HS_RULE_SENSOR_STUCK:
        /* the flatline time (hours) is the delay already */
        r->quantity = HS_QTY_SENSORS_STUCK;
        r->high = 0.5;
        r->on_delay_ms = 0;
        r->off_delay_ms = 0;
        r->priority = HS_PRIORITY_MEDIUM;
        break;
    case HS_RULE_KIND_COUNT:
        break;
    }
}

const char *hs_alarm_rule_check(const hs_alarm_rule *r)
{
    if (r->name[0] == '\0' || memchr(r->name, '\0', sizeof r->name) == NULL)
        return "the alarm needs a name";
    if ((unsigned)r->kind >= HS_RULE_KIND_COUNT)
        return "unknown rule kind";
    if ((unsigned)r->quantity >= HS_QTY_COUNT)
        return "unknown quantity";
    if (isnan(r->high) && isnan(r->low))
        return "the rule needs 'high' or 'low' (or both)";
    if (isinf(r->high) || isinf(r->low))
        return "limits must be finite";
    if (!isnan(r->high) && !isnan(r->low) && r->low >= r->high)
        return "'low' must be below 'high'";
    if (!(r->deadband >= 0.0) || isinf(r->deadband))
        return "'deadband' must be zero or positive";
    if (!isnan(r->high) && !isnan(r->low) && 2.0 * r->deadband >= r->high - r->low)
        return "'deadband' must be less than half the band";
    if (r->on_delay_ms < 0 || r->off_delay_ms < 0)
        return "delays cannot be negative";
    if (r->priority < HS_PRIORITY_URGENT || r->priority > HS_PRIORITY_LOW)
        return "unknown priority";
    if (r->quantity == HS_QTY_DENSITY_FALL && r->window_ms < 16000)
        return "'window' must be at least 16s";
    if (r->filter_samples < 1 || r->filter_samples > HS_FALL_FILTER_MAX)
        return "'filter_samples' must be 1 to 255";
    if (r->max_shelve_ms <= 0)
        return "'max_shelve' must be positive";
    return NULL;
}

void hs_alarm_input_clear(hs_alarm_input *in)
{
    in->state = NULL;
    in->state_t_ms = 0;
    in->depth_m = NAN;
    in->sample_age_s = NAN;
    in->bus_down = -1;
    in->output_unconfirmed = in->feedback_lockout = in->manual_unknown = -1;
    in->sensors_stuck = NAN;
}
