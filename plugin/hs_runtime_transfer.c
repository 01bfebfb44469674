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

#define REASSERT_MS 30000 /* an actuated output is written again at least this often */

int hs_rt_transfers_init(hs_runtime *rt)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        struct hs_rt_transfer *x = &rt->transfers[i];
        memset(x, 0, sizeof *x);
        hs_conf_transfer_rule(&rt->site, &rt->site.transfers[i], &x->rule);
        hs_transfer_state_init(&x->state);
        x->predicted_mix_kg_m3 = NAN;
        const hs_transfer_conf *t = &rt->site.transfers[i];
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

static void write_output(hs_runtime *rt, size_t i, hs_pump_write w, int64_t mono_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    struct hs_rt_transfer *x = &rt->transfers[i];
    if (w == HS_WRITE_NONE)
        return;
    if (w == x->last_write && mono_ms - x->last_write_ms < REASSERT_MS)
        return;
    int coil = t->output == HS_OUTPUT_COIL;
    uint16_t value = w == HS_WRITE_ON ? (coil ? 1 : t->on_value) : (coil ? 0 : t->off_value);
    if (hs_rt_write(rt, t->bus_index, t->unit_id, coil, t->output_address, value) != 0) {
        hs_log(HSP_LOG_ERR, "[transfer %s]: cannot queue the pump output write", t->name);
        return;
    }
    if (w != x->last_write)
        hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output %s written", t->name,
               w == HS_WRITE_ON ? "RUN" : "STOP");
    x->last_write = w;
    x->last_write_ms = mono_ms;
}

void hs_rt_transfers_run(hs_runtime *rt, int64_t mono_ms, int64_t now_ms)
{
    rt->heartbeat = hs_transfer_heartbeat_next(rt->heartbeat);
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
        if (d.feedback_alarm)
            hs_log(HSP_LOG_ERR, "[transfer %s]: %s", t->name,
                   d.reasons & HS_XR_PUMP_STILL_RUNNING
                       ? hs_transfer_reason_text(HS_XR_PUMP_STILL_RUNNING)
                       : hs_transfer_reason_text(HS_XR_NO_RUN_FEEDBACK));
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
        write_output(rt, i, d.write, mono_ms);
        if (t->actuate && t->heartbeat_address >= 0 && t->bus_index >= 0)
            hs_rt_write(rt, t->bus_index, t->unit_id, 0, (uint16_t)t->heartbeat_address,
                        rt->heartbeat);
    }
}

void hs_rt_transfers_safe(hs_runtime *rt)
{
    for (size_t i = 0; rt->transfers != NULL && i < rt->site.n_transfers; i++) {
        const hs_transfer_conf *t = &rt->site.transfers[i];
        struct hs_xfer_input manual = from_reading(rt, t->manual_index);
        if (hs_transfer_safe_write(&rt->transfers[i].rule, &manual) != HS_WRITE_OFF) {
            if (t->actuate)
                hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output left as it is at shutdown: "
                       "the pump is in manual or its manual signal is unknown", t->name);
            continue;
        }
        int coil = t->output == HS_OUTPUT_COIL;
        if (hs_rt_write(rt, t->bus_index, t->unit_id, coil, t->output_address,
                        coil ? 0 : t->off_value) == 0)
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output set to STOP for shutdown", t->name);
        else
            hs_log(HSP_LOG_ERR, "[transfer %s]: could not set the pump output to STOP; the "
                   "PLC heartbeat watchdog must stop it", t->name);
    }
}
