/* [transfer NAME]: a transfer pump between two ponds (see hs_conf_transfer.h).
 * Advisory by default: `actuate = yes` makes the daemon write the pump
 * output, and config/reference.ini warns about what that means. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_state.h"
#include "hs_conf_keys.h"
#include "hs_conf_transfer.h"

typedef hs_transfer_conf T;

static const char *const trigger_names[] = {"density", "stage", NULL};
/* Same order as hc_stage. */
static const char *const stage_names[] = {"seawater", "carbonate", "gypsum", "halite",
                                          "magnesium-sulfate", "potash", "bischofite", NULL};
static const char *const output_names[] = {"coil", "register", NULL};
static const char *const rain_mode_names[] = {"gauge", "flag", NULL};

#define KEY_SIGNAL(nm, f, h) \
    {.name = nm, .type = HS_KT_STRING, .offset = offsetof(T, f), .size = sizeof(((T *)0)->f), \
     .flags = 0, .help = h}
#define KEY_I32(nm, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_INT32, .offset = offsetof(T, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}

static const hs_key transfer_keys[] = {
    KEY_NAME("source", T, source, HS_KEY_REQUIRED, "the pond brine is taken from"),
    KEY_NAME("destination", T, destination, HS_KEY_REQUIRED, "the pond brine is pumped into"),
    KEY_ENUM("trigger", T, trigger, trigger_names, "density", HS_KEY_RELOADABLE,
             "density (source reaches start_density) or stage (source reaches start_stage)"),
    KEY_ENUM("start_stage", T, start_stage, stage_names, "halite", HS_KEY_RELOADABLE,
             "stage trigger: the stage the source must reach (halite for a crystalliser feed)"),
    KEY_DBL("start_density", T, start_density_kg_m3, &hs_unit_density_ref, 990, 1450, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "density trigger; default the source pond's density_out"),
    KEY_DBL("hysteresis", T, hysteresis_kg_m3, &hs_unit_density, 0, 50, "2 kg/m3",
            HS_KEY_RELOADABLE, "a running transfer stops this far below its start density"),
    KEY_DBL("source_level_min", T, source_level_min_m, &hs_unit_length, 0, 20, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "interlock: stop at or below; default the source's level_min"),
    KEY_DBL("destination_level_max", T, dest_level_max_m, &hs_unit_length, 0, 20,
            HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "interlock: stop at or above; default the destination's level_max"),
    KEY_DBL("level_deadband", T, level_deadband_m, &hs_unit_length, 0, 1, "0.02 m",
            HS_KEY_RELOADABLE, "a level interlock clears this far inside its limit"),
    KEY_DBL("destination_density_min", T, dest_density_min_kg_m3, &hs_unit_density_ref, 990, 1450,
            HS_NO_DEFAULT, HS_KEY_RELOADABLE,
            "interlock: density after mixing must stay above; default the destination's density_in"),
    KEY_DBL("destination_density_max", T, dest_density_max_kg_m3, &hs_unit_density_ref, 990, 1450,
            HS_NO_DEFAULT, HS_KEY_RELOADABLE, "interlock: density after mixing must stay below"),
    KEY_DBL("rated_flow", T, rated_flow_m3_h, NULL, 0.01, 100000, HS_NO_DEFAULT,
            HS_KEY_RELOADABLE, "pump flow in m3/h, for the mixing prediction"),
    KEY_DUR("batch", T, batch_ms, 60 * SEC_MS, 48 * 3600 * SEC_MS, "1h", HS_KEY_RELOADABLE,
            "run length the mixing prediction assumes (rated_flow x batch)"),
    KEY_DUR("min_on", T, min_on_ms, 0, 24 * 3600 * SEC_MS, "5min", HS_KEY_RELOADABLE,
            "a started pump keeps running at least this long (interlocks still stop it)"),
    KEY_DUR("min_off", T, min_off_ms, 0, 24 * 3600 * SEC_MS, "10min", HS_KEY_RELOADABLE,
            "a stopped pump stays off at least this long (also after start-up)"),
    KEY_DUR("max_run", T, max_run_ms, 0, 7 * 24 * 3600 * SEC_MS, "6h", HS_KEY_RELOADABLE,
            "longest continuous run; 0 = no limit"),
    KEY_DUR("feedback_timeout", T, feedback_timeout_ms, SEC_MS, 3600 * SEC_MS, "30s",
            HS_KEY_RELOADABLE, "run feedback must confirm within this, else alarm and stop"),
    KEY_DUR("confirm_timeout", T, confirm_timeout_ms, 500, 60 * SEC_MS, "3s", HS_KEY_RELOADABLE,
            "actuate: the device must confirm a pump command (read back) within this, else "
            "alarm and the PLC heartbeat stops"),
    KEY_I32("lockout_after", lockout_after, 0, 100, "3", HS_KEY_RELOADABLE,
            "actuate: failed starts in a row (no run feedback) before the transfer locks out "
            "until an operator acknowledges its feedback-lockout alarm (0 = never)"),
    KEY_BOOL("actuate", T, actuate, "no", 0,
             "yes: WRITE the pump output (opt-in; see the cautions). no: advise only"),
    KEY_NAME("bus", T, bus, 0, "bus of the pump output (needed with actuate = yes)"),
    KEY_U8("unit_id", T, unit_id, 0, 247, "1", 0, "Modbus unit id of the pump output"),
    KEY_ENUM("output", T, output, output_names, "coil", 0,
             "coil (write single coil, FC 05) or register (write single register, FC 06)"),
    KEY_U16("output_address", T, output_address, 0, 65535, "0", 0, "address of the pump output"),
    KEY_U16("on_value", T, on_value, 0, 65535, "1", 0, "register output: value for run"),
    KEY_U16("off_value", T, off_value, 0, 65535, "0", 0, "register output: value for stop"),
    KEY_I32("heartbeat_address", heartbeat_address, -1, 65535, "-1", 0,
            "holding register the daemon counts up each cycle; the PLC stops the pump when it "
            "stops changing (-1 = none)"),
    KEY_SIGNAL("feedback", feedback, "signal POND.QUANTITY confirming the pump runs (nonzero)"),
    KEY_SIGNAL("manual", manual, "signal POND.QUANTITY: nonzero when the pump is in local control"),
    KEY_SIGNAL("rain", rain, "signal POND.QUANTITY of the rain gauge or rain flag"),
    KEY_ENUM("rain_mode", T, rain_mode, rain_mode_names, "gauge", HS_KEY_RELOADABLE,
             "gauge (accumulated depth) or flag (nonzero = rain falling or forecast)"),
    KEY_DUR("rain_window", T, rain_window_ms, 60 * SEC_MS, 48 * 3600 * SEC_MS, "1h",
            HS_KEY_RELOADABLE, "gauge: rain counted over this window"),
    KEY_DBL("rain_threshold", T, rain_threshold_m, &hs_unit_rain, 0, 1, "0.5 mm",
            HS_KEY_RELOADABLE, "gauge: this much rain within the window blocks the transfer"),
    {NULL},
};

const hs_section_type hs_section_transfer;

static int transfer_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int i = hs_cfg_grow((void **)&site->transfers, &site->n_transfers, sizeof site->transfers[0]);
    if (i < 0) {
        hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
        return -1;
    }
    T *t = &site->transfers[i];
    t->line = hs_cfg_line(cfg);
    if (strlen(name) >= sizeof t->name) {
        hs_cfg_error(cfg, t->line, "transfer name '%s' must be shorter than %zu characters",
                     name, sizeof t->name);
        site->n_transfers--;
        return -1;
    }
    snprintf(t->name, sizeof t->name, "%s", name);
    t->source_index = t->dest_index = t->bus_index = -1;
    t->feedback_index = t->manual_index = t->rain_index = -1;
    t->start_density_kg_m3 = t->source_level_min_m = t->dest_level_max_m = NAN;
    t->dest_density_min_kg_m3 = t->dest_density_max_kg_m3 = t->rated_flow_m3_h = NAN;
    return i;
}

static void *transfer_at(hs_site *site, size_t index)
{
    return &site->transfers[index];
}

static int where(hs_cfg *cfg, size_t index, const char *key)
{
    return hs_cfg_where(cfg, &hs_section_transfer, index, key);
}

static int find_signal(const hs_site *site, const char *name)
{
    for (size_t i = 0; i < site->n_signals; i++)
        if (strcmp(site->signals[i].name, name) == 0)
            return (int)i;
    return -1;
}

static void link_signal(hs_site *site, hs_cfg *cfg, size_t index, const char *key,
                        const char *name, int *out)
{
    *out = -1;
    if (name[0] == '\0')
        return;
    *out = find_signal(site, name);
    char hint[160];
    if (*out < 0)
        hs_cfg_error(cfg, where(cfg, index, key), "%s: no [signal %s] in this file%s", key, name,
                     hs_site_signal_hint(site, name, hint, sizeof hint));
}

/* A signal an actuated transfer decides on must be read more often than it
 * goes stale, or the pump follows the poll: good, stale, good, ... */
static void check_poll_vs_stale(const hs_site *site, hs_cfg *cfg, size_t i, int signal)
{
    const hs_signal *g = &site->signals[signal];
    if (g->bus_index < 0)
        return;
    const hs_bus *b = &site->buses[g->bus_index];
    if (g->point.interval_ms > b->conf.stale_after_ms)
        hs_cfg_error(cfg, where(cfg, i, "actuate"),
                     "actuate: [signal %s] is polled every %lld ms but goes stale after %lld ms "
                     "([bus %s] stale_after); an actuated transfer would start and stop with "
                     "the polls: poll it more often or raise stale_after",
                     g->name, (long long)g->point.interval_ms, (long long)b->conf.stale_after_ms,
                     b->name);
}

/* What an actuated transfer needs before it may write a pump output. */
static void check_actuated(const hs_site *site, hs_cfg *cfg, size_t i)
{
    const hs_transfer_conf *t = &site->transfers[i];
    if (t->feedback[0] == '\0')
        hs_cfg_error(cfg, where(cfg, i, "actuate"),
                     "actuate = yes needs feedback (the pump's run signal): without it a "
                     "start can never be confirmed");
    if (t->heartbeat_address < 0)
        hs_cfg_error(cfg, where(cfg, i, "actuate"),
                     "actuate = yes needs heartbeat_address: the PLC's watchdog must be able "
                     "to stop the pump when this daemon cannot");
    for (size_t s = 0; s < site->n_signals; s++) {
        const hs_signal *g = &site->signals[s];
        int used = (g->pond_index >= 0 &&
                    (g->pond_index == t->source_index || g->pond_index == t->dest_index)) ||
                   (int)s == t->feedback_index || (int)s == t->manual_index ||
                   (int)s == t->rain_index;
        if (used)
            check_poll_vs_stale(site, cfg, i, (int)s);
    }
}

static void link_one(hs_site *site, hs_cfg *cfg, size_t i)
{
    T *t = &site->transfers[i];
    char hint[160];
    t->source_index = hs_site_pond(site, t->source);
    if (t->source_index < 0)
        hs_cfg_error(cfg, where(cfg, i, "source"), "source: no [pond %s] in this file%s",
                     t->source, hs_site_pond_hint(site, t->source, hint, sizeof hint));
    t->dest_index = hs_site_pond(site, t->destination);
    if (t->dest_index < 0)
        hs_cfg_error(cfg, where(cfg, i, "destination"), "destination: no [pond %s] in this file%s",
                     t->destination, hs_site_pond_hint(site, t->destination, hint, sizeof hint));
    if (t->source_index >= 0 && t->source_index == t->dest_index)
        hs_cfg_error(cfg, where(cfg, i, "destination"),
                     "destination: a transfer cannot pump a pond into itself");
    if (t->bus[0]) {
        t->bus_index = hs_site_bus(site, t->bus);
        if (t->bus_index < 0)
            hs_cfg_error(cfg, where(cfg, i, "bus"), "bus: no [bus %s] in this file%s", t->bus,
                         hs_site_bus_hint(site, t->bus, hint, sizeof hint));
    }
    if (t->actuate && t->bus_index < 0 && !t->bus[0])
        hs_cfg_error(cfg, where(cfg, i, "actuate"),
                     "actuate = yes needs bus (and output_address) of the pump output");
    if ((!isnan(t->dest_density_min_kg_m3) || !isnan(t->dest_density_max_kg_m3)) &&
        isnan(t->rated_flow_m3_h))
        hs_cfg_error(cfg, where(cfg, i, "rated_flow"),
                     "rated_flow: needed to predict the destination density after mixing");
    link_signal(site, cfg, i, "feedback", t->feedback, &t->feedback_index);
    link_signal(site, cfg, i, "manual", t->manual, &t->manual_index);
    link_signal(site, cfg, i, "rain", t->rain, &t->rain_index);
    if (hs_site_pond(site, t->name) >= 0)
        hs_cfg_error(cfg, t->line, "[transfer %s]: a pond has that name too; the transfer's "
                     "alarms are named after it, so give it another", t->name);
    if (t->actuate)
        check_actuated(site, cfg, i);
    if (t->source_index < 0 || t->dest_index < 0)
        return;
    struct hs_transfer_rule rule;
    hs_conf_transfer_rule(site, t, &rule);
    if (rule.trigger == HS_TRIGGER_DENSITY && isnan(rule.start_density_kg_m3)) {
        hs_cfg_error(cfg, where(cfg, i, "start_density"),
                     "start_density: needed, since [pond %s] has no density_out", t->source);
        return;
    }
    char why[160];
    if (hs_transfer_rule_check(&rule, why, sizeof why) != 0)
        hs_cfg_error(cfg, t->line, "[transfer %s]: %s", t->name, why);
}

static void transfer_link(hs_site *site, hs_cfg *cfg)
{
    for (size_t i = 0; i < site->n_transfers; i++) {
        link_one(site, cfg, i);
        for (size_t j = 0; j < i; j++)
            if (site->transfers[i].actuate && site->transfers[j].actuate &&
                site->transfers[i].bus_index == site->transfers[j].bus_index &&
                site->transfers[i].unit_id == site->transfers[j].unit_id &&
                site->transfers[i].output == site->transfers[j].output &&
                site->transfers[i].output_address == site->transfers[j].output_address)
                hs_cfg_error(cfg, where(cfg, i, "output_address"),
                             "output_address: [transfer %s] already writes this output",
                             site->transfers[j].name);
    }
}

static void transfer_release(hs_site *site)
{
    free(site->transfers);
    site->transfers = NULL;
    site->n_transfers = 0;
}

static double or_default(double value, double fallback)
{
    return isnan(value) ? fallback : value;
}

void hs_conf_transfer_rule(const hs_site *site, const hs_transfer_conf *t,
                           struct hs_transfer_rule *rule)
{
    hs_transfer_rule_defaults(rule);
    const hs_pond *src = t->source_index >= 0 ? &site->ponds[t->source_index] : NULL;
    const hs_pond *dst = t->dest_index >= 0 ? &site->ponds[t->dest_index] : NULL;
    rule->trigger = t->trigger == 1 ? HS_TRIGGER_STAGE : HS_TRIGGER_DENSITY;
    rule->start_stage = t->start_stage;
    rule->start_density_kg_m3 =
        or_default(t->start_density_kg_m3, src ? src->density_out_kg_m3 : NAN);
    rule->hysteresis_kg_m3 = t->hysteresis_kg_m3;
    rule->source_level_min_m = or_default(t->source_level_min_m, src ? src->level_min_m : NAN);
    rule->dest_level_max_m = or_default(t->dest_level_max_m, dst ? dst->level_max_m : NAN);
    rule->level_deadband_m = t->level_deadband_m;
    rule->dest_density_min_kg_m3 =
        or_default(t->dest_density_min_kg_m3, dst ? dst->density_in_kg_m3 : NAN);
    rule->dest_density_max_kg_m3 = t->dest_density_max_kg_m3;
    rule->min_on_ms = t->min_on_ms;
    rule->min_off_ms = t->min_off_ms;
    rule->max_run_ms = t->max_run_ms;
    rule->feedback_timeout_ms = t->feedback_timeout_ms;
    rule->actuate = t->actuate;
    rule->has_rain = t->rain_index >= 0;
    rule->has_manual = t->manual_index >= 0;
    rule->has_feedback = t->feedback_index >= 0;
    rule->lockout_after = t->lockout_after;
    /* a transfer decides on the best density source its pond is built with
     * (the order in hs_brine_eval.h); a fallback is not it */
    rule->density_method = -1;
    if (src != NULL && hs_site_signal(site, t->source_index, HS_Q_DENSITY) != NULL)
        rule->density_method = HC_METHOD_DENSITOMETER;
    else if (src != NULL && hs_site_signal(site, t->source_index, HS_Q_PRESSURE_UPPER) != NULL &&
             hs_site_signal(site, t->source_index, HS_Q_LEVEL_PRESSURE) != NULL)
        rule->density_method = HC_METHOD_HYDROSTATIC;
    /* Without a flow figure the mixing cannot be predicted: the band check
     * would block forever on a missing input, so it is left out. */
    if (isnan(t->rated_flow_m3_h)) {
        rule->dest_density_min_kg_m3 = NAN;
        rule->dest_density_max_kg_m3 = NAN;
    }
}

int hs_conf_transfer_same_output(const hs_site *sa, const hs_transfer_conf *a, const hs_site *sb,
                                 const hs_transfer_conf *b)
{
    if (!a->actuate || !b->actuate || a->bus_index < 0 || b->bus_index < 0 ||
        a->unit_id != b->unit_id || a->output != b->output ||
        a->output_address != b->output_address)
        return 0;
    const hs_bus *x = &sa->buses[a->bus_index], *y = &sb->buses[b->bus_index];
    return strcmp(x->name, y->name) == 0 && x->conf.kind == y->conf.kind &&
           strcmp(x->conf.host, y->conf.host) == 0 && x->conf.port == y->conf.port &&
           strcmp(x->conf.device, y->conf.device) == 0;
}

const hs_section_type hs_section_transfer = {
    .kind = "transfer", .named = true, .required = false, .keys = transfer_keys,
    .add = transfer_add, .at = transfer_at, .link = transfer_link,
    .release = transfer_release,
};
