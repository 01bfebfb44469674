/* Transfers in the running daemon: gather each transfer's inputs with their
 * quality, predict the destination density after mixing, decide
 * (hs_transfer.h), journal and publish changes, and write the pump output
 * and PLC heartbeat only where the site opted in (actuate = yes). */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_ion.h"
#include "hc_mixing.h"
#include "hc_uncertainty.h"
#include "hs_log.h"
#include "hs_runtime_private.h"

#define STILL_RUNNING_LOG_MS 60000 /* a repeated "still running" line at most this often */

int hs_rt_transfers_init(hs_runtime *rt)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        struct hs_rt_transfer *x = &rt->transfers[i];
        memset(x, 0, sizeof *x);
        hs_conf_transfer_rule(&rt->site, &rt->site.transfers[i], &x->rule);
        hs_transfer_state_init(&x->state);
        x->predicted_mix_kg_m3 = NAN;
        hs_output_init(&x->out);
        x->want = -1;
        const hs_transfer_conf *t = &rt->site.transfers[i];
        /* the first transfer naming a heartbeat register owns its count */
        x->hb_owner = -1;
        for (size_t j = 0; t->actuate && t->heartbeat_address >= 0 && j <= i; j++) {
            const hs_transfer_conf *o = &rt->site.transfers[j];
            if (o->actuate && o->bus_index == t->bus_index && o->unit_id == t->unit_id &&
                o->heartbeat_address == t->heartbeat_address) {
                x->hb_owner = (int)j;
                break;
            }
        }
        if (t->actuate)
            hs_log(HSP_LOG_WARNING, "[transfer %s]: actuate = yes: this daemon WRITES the pump "
                   "output (%s %u on [bus %s]); the PLC must keep its own interlocks",
                   t->name, t->output == HS_OUTPUT_COIL ? "coil" : "register",
                   t->output_address, t->bus);
        if (isnan(t->rated_flow_m3_h))
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: no rated_flow, so the destination density "
                   "after mixing cannot be predicted; that interlock is off", t->name);
    }
    return 0;
}

static hs_xfer_quality xq(hs_quality q)
{
    switch (q) {
    case HS_QUALITY_GOOD:
    case HS_QUALITY_UNCERTAIN: return HS_XQ_GOOD;
    case HS_QUALITY_STALE: return HS_XQ_STALE;
    default: return HS_XQ_BAD;
    }
}

static struct hs_xfer_input from_reading(const hs_runtime *rt, int signal)
{
    if (signal < 0)
        return (struct hs_xfer_input){NAN, HS_XQ_ABSENT};
    const hs_reading *r = &rt->readings[signal];
    if (!r->have)
        return (struct hs_xfer_input){NAN, HS_XQ_BAD};
    return (struct hs_xfer_input){r->value, xq(r->quality)};
}

/* Rain from a gauge: what fell within the window, from the readings kept. */
static struct hs_xfer_input rain_input(hs_runtime *rt, struct hs_rt_transfer *x,
                                       const hs_transfer_conf *t, int64_t now_ms)
{
    struct hs_xfer_input in = from_reading(rt, t->rain_index);
    if (t->rain_index < 0 || in.quality != HS_XQ_GOOD)
        return in;
    if (t->rain_mode == HS_RAIN_FLAG) {
        in.value = in.value != 0;
        return in;
    }
    const hs_reading *r = &rt->readings[t->rain_index];
    unsigned last = (x->rain_head + HS_RT_RAIN_SLOTS - 1) % HS_RT_RAIN_SLOTS;
    if (x->rain_n == 0 || x->rain_t[last] != r->t_ms) {
        x->rain_t[x->rain_head] = r->t_ms;
        x->rain_v[x->rain_head] = r->value;
        x->rain_head = (x->rain_head + 1) % HS_RT_RAIN_SLOTS;
        if (x->rain_n < HS_RT_RAIN_SLOTS)
            x->rain_n++;
    }
    /* the oldest kept reading inside the window is the baseline */
    double base = r->value;
    for (unsigned k = 0; k < x->rain_n; k++) {
        unsigned i = (x->rain_head + HS_RT_RAIN_SLOTS - 1 - k) % HS_RT_RAIN_SLOTS;
        if (now_ms - x->rain_t[i] > t->rain_window_ms)
            break;
        base = x->rain_v[i];
    }
    /* a gauge that was reset counts what it shows since the reset */
    double fallen = r->value >= base ? r->value - base : r->value;
    in.value = fallen >= t->rain_threshold_m;
    return in;
}

static struct hs_xfer_input pond_density(const hs_runtime *rt, int pond)
{
    const hs_pond_view *v = &rt->ponds[pond].view;
    if (!v->have_state)
        return (struct hs_xfer_input){NAN, HS_XQ_BAD};
    /* at the reference temperature: the brine, not the weather, decides */
    return (struct hs_xfer_input){v->state.density_ref_kg_m3, xq(v->quality)};
}

/* The stage trigger judges the source's brine at the reference temperature
 * by its density there, as a hydrometer does: a pond that warms in the
 * afternoon does not change stage for the trigger, and past halite no
 * uncertain CF decides. */
static hc_stage source_stage_ref(const hs_runtime *rt, int pond)
{
    const hs_pond_view *v = &rt->ponds[pond].view;
    if (!v->have_state)
        return HC_STAGE_NONE;
    return hs_stage_at_density_ref(rt->models, rt->site.ponds[pond].feed_index,
                                   v->state.density_ref_kg_m3,
                                   rt->site.site.reference_temperature_c);
}

static struct hs_xfer_input pond_level(const hs_runtime *rt, int pond)
{
    const hs_pond_view *v = &rt->ponds[pond].view;
    if (!isfinite(v->depth_m))
        return (struct hs_xfer_input){NAN, v->depth_quality == HS_QUALITY_STALE ? HS_XQ_STALE
                                                                                : HS_XQ_BAD};
    return (struct hs_xfer_input){v->depth_m, xq(v->depth_quality)};
}

/* The destination's density after one batch of source brine, at the site
 * reference temperature like every density a decision compares, from the
 * mixed composition (mass of water and of every ion conserved), never by
 * averaging densities. */
static struct hs_xfer_input mixed_density(hs_runtime *rt, const hs_transfer_conf *t)
{
    struct hs_xfer_input out = {NAN, HS_XQ_BAD};
    const struct hs_rt_pond *src = &rt->ponds[t->source_index];
    const struct hs_rt_pond *dst = &rt->ponds[t->dest_index];
    if (!src->view.have_state || !dst->view.have_state || !isfinite(dst->report.volume_m3))
        return out;
    double mm[HC_ION_COUNT], ms[HC_ION_COUNT], md[HC_ION_COUNT], mix[HC_ION_COUNT];
    for (int i = 0; i < HC_ION_COUNT; i++)
        mm[i] = hc_ion_molar_mass((hc_ion)i);
    hc_path_point ps, pd;
    const hc_path *path_s = hs_brine_models_path(rt->models, rt->site.ponds[t->source_index].feed_index);
    const hc_path *path_d = hs_brine_models_path(rt->models, rt->site.ponds[t->dest_index].feed_index);
    if (hc_path_point_at_cf(path_s, src->view.state.concentration_factor, &ps, NULL) != HC_OK ||
        hc_path_point_at_cf(path_d, dst->view.state.concentration_factor, &pd, NULL) != HC_OK)
        return out;
    memcpy(ms, ps.molality, sizeof ms);
    memcpy(md, pd.molality, sizeof md);
    double v_batch = t->rated_flow_m3_h * (double)t->batch_ms / 3.6e6;
    hc_brine_amount a, b, m;
    double mass, rho;
    if (hc_amount_from_volume(ms, mm, HC_ION_COUNT, v_batch, src->view.state.density_kg_m3, &a) ||
        hc_amount_from_volume(md, mm, HC_ION_COUNT, dst->report.volume_m3,
                              dst->view.state.density_kg_m3, &b) ||
        hc_amount_mix(&a, &b, &m) || hc_amount_molality(&m, mm, mix, &mass) ||
        hc_brine_density(mix, rt->site.site.reference_temperature_c, &rho) != HC_OK)
        return out;
    hs_quality q = src->view.quality > dst->view.quality ? src->view.quality : dst->view.quality;
    return (struct hs_xfer_input){rho, xq(q)};
}

static int buses_up(const hs_runtime *rt, const hs_transfer_conf *t)
{
    for (size_t s = 0; s < rt->site.n_signals; s++) {
        const hs_signal *sig = &rt->site.signals[s];
        if ((sig->pond_index == t->source_index || sig->pond_index == t->dest_index) &&
            sig->bus_index >= 0 && rt->bus_down[sig->bus_index])
            return 0;
    }
    if (t->actuate && t->bus_index >= 0 && rt->bus_down[t->bus_index])
        return 0;
    return 1;
}

/* The feedback-lockout alarm of a transfer: its journal state after a
 * restart re-latches the lockout; an operator's acknowledgement resets it
 * (`halostage ack`, the MQTT command, any client of the command path). */
static hs_alarm_state lockout_alarm_state(const hs_runtime *rt, const char *transfer, int *found)
{
    *found = 0;
    for (size_t k = 0; k < hs_alarm_count(rt->alarms); k++) {
        hs_alarm_info info;
        if (hs_alarm_get(rt->alarms, k, &info) == 0 && strcmp(info.pond, transfer) == 0 &&
            strcmp(info.rule, "feedback-lockout") == 0) {
            *found = 1;
            return info.state;
        }
    }
    return HS_ALARM_NORMAL;
}

static void lockout_by_operator(hs_runtime *rt, size_t i)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    struct hs_rt_transfer *x = &rt->transfers[i];
    int found;
    hs_alarm_state st = lockout_alarm_state(rt, t->name, &found);
    if (!found)
        return;
    if (!x->lockout_checked) {
        x->lockout_checked = 1;
        if (st == HS_ALARM_UNACKED && !x->state.locked_out) {
            x->state.locked_out = 1; /* locked before the restart, never reset */
            hs_log(HSP_LOG_WARNING, "[transfer %s]: still locked out after failed starts "
                   "(journal); acknowledge its feedback-lockout alarm to reset", t->name);
        }
        return;
    }
    if (x->state.locked_out && st == HS_ALARM_ACKED) {
        hs_transfer_reset_lockout(&x->state);
        hs_log(HSP_LOG_NOTICE, "[transfer %s]: feedback lockout reset by an operator's "
               "acknowledgement", t->name);
    }
}

static void emit_alarm(void *ctx, const hs_alarm_event *ev)
{
    hs_rt_emit_alarm(ctx, ev);
}

static void transfer_alarms(hs_runtime *rt, size_t i, int64_t now_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    struct hs_rt_transfer *x = &rt->transfers[i];
    if (!t->actuate)
        return;
    hs_alarm_input in;
    hs_alarm_input_clear(&in);
    in.output_unconfirmed = x->out_failed;
    in.feedback_lockout = x->state.locked_out;
    in.manual_unknown = (x->last.reasons & HS_XR_MANUAL_UNKNOWN) != 0;
    hs_alarm_update(rt->alarms, t->name, &in, now_ms, emit_alarm, rt);
}

void hs_rt_transfers_run(hs_runtime *rt, int64_t mono_ms, int64_t now_ms)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        const hs_transfer_conf *t = &rt->site.transfers[i];
        struct hs_rt_transfer *x = &rt->transfers[i];
        struct hs_transfer_inputs in;
        memset(&in, 0, sizeof in);
        in.now_ms = mono_ms;
        in.source_density = pond_density(rt, t->source_index);
        const hs_pond_view *sv = &rt->ponds[t->source_index].view;
        in.source_stage = source_stage_ref(rt, t->source_index);
        in.source_density_u = sv->have_state ? hc_unc_density_ref(&sv->state) : NAN;
        if (in.source_density_u > 0.0)
            in.source_stage_low = hs_stage_at_density_ref(
                rt->models, rt->site.ponds[t->source_index].feed_index,
                sv->state.density_ref_kg_m3 - HS_DECISION_K * in.source_density_u,
                sv->state.reference_temperature_c);
        in.source_level = pond_level(rt, t->source_index);
        in.dest_level = pond_level(rt, t->dest_index);
        in.dest_density_after_mixing = mixed_density(rt, t);
        x->predicted_mix_kg_m3 = in.dest_density_after_mixing.value;
        in.rain = rain_input(rt, x, t, now_ms);
        in.manual = from_reading(rt, t->manual_index);
        in.run_feedback = from_reading(rt, t->feedback_index);
        in.bus_up = buses_up(rt, t);
        in.source_method = sv->have_state ? (int)sv->state.method : -1;
        in.output_unconfirmed = x->out_failed;
        in.output_dropped = x->out_dropped;
        x->out_dropped = 0;
        if (t->actuate)
            lockout_by_operator(rt, i);

        struct hs_transfer_decision d;
        hs_transfer_decide(&x->rule, &x->state, &in, x->have_last ? &x->last : NULL, &d);
        x->last = d;
        x->have_last = 1;
        if (d.changed) {
            char reasons[400];
            hs_transfer_reasons_format(d.reasons, reasons, sizeof reasons);
            hs_log(d.advice == HS_ADVICE_RUN || d.advice == HS_ADVICE_BLOCKED ? HSP_LOG_NOTICE
                                                                              : HSP_LOG_INFO,
                   "[transfer %s]: %s (%s)", t->name, hs_advice_name(d.advice), reasons);
            hs_rt_emit_transfer(rt, i, now_ms);
        }
        if (d.feedback_alarm && (d.reasons & HS_XR_PUMP_STILL_RUNNING)) {
            /* the same fault every cycle: one line a minute, with a count */
            if (mono_ms >= x->still_running_log_ms) {
                hs_log(HSP_LOG_ERR, "[transfer %s]: %s%s", t->name,
                       hs_transfer_reason_text(HS_XR_PUMP_STILL_RUNNING),
                       x->still_running_quiet ? " (repeated; lines left out since the last)"
                                              : "");
                x->still_running_log_ms = mono_ms + STILL_RUNNING_LOG_MS;
                x->still_running_quiet = 0;
            } else {
                x->still_running_quiet++;
            }
        } else if (d.feedback_alarm) {
            hs_log(HSP_LOG_ERR, "[transfer %s]: %s (%d failed start%s in a row)", t->name,
                   hs_transfer_reason_text(HS_XR_NO_RUN_FEEDBACK), x->state.failed_starts,
                   x->state.failed_starts == 1 ? "" : "s");
        }
        /* say once per run that the pump confirmed: the operator's proof
         * that the command reached the plant */
        if (!d.pump_on) {
            x->feedback_seen = 0;
        } else if (!x->feedback_seen && in.run_feedback.quality == HS_XQ_GOOD &&
                   in.run_feedback.value != 0.0) {
            x->feedback_seen = 1;
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: run feedback confirms the pump is running",
                   t->name);
        }
        if (d.lockout_alarm)
            hs_log(HSP_LOG_ERR, "[transfer %s]: %s after %d failed starts; acknowledge its "
                   "feedback-lockout alarm to reset", t->name,
                   hs_transfer_reason_text(HS_XR_LOCKOUT), x->state.failed_starts);
        if (t->actuate) {
            x->hands_off = d.write == HS_WRITE_NONE;
            if (d.write != HS_WRITE_NONE)
                x->want = d.write == HS_WRITE_ON ? 1 : 0;
        }
        transfer_alarms(rt, i, now_ms);
    }
}
