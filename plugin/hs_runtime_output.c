/* The runtime's side of commands to the field: each actuated transfer's
 * decision goes to its pump output through hs_output.h (decide, write, read
 * back, compare, re-send or alarm) over the bus's priority commands
 * (hp_outcmd.h); the PLC heartbeat counts only while every output behind it
 * is confirmed and in our hands; shutdown and reload drive outputs that
 * nobody will watch any more to STOP and confirm it. */
#include <string.h>
#include <time.h>

#include "hs_log.h"
#include "hs_runtime_private.h"

#define HEARTBEAT_EVERY_MS 1000 /* the PLC sees the counter step +1 this often */
#define HEARTBEAT_LOST_MS 3000  /* a heartbeat write unanswered this long is sent again */
#define RELEASE_WAIT_MS 5000    /* shutdown/reload: how long STOP may take to confirm */

static int actuated(const hs_runtime *rt, size_t i)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    return t->actuate && t->bus_index >= 0 && rt->buses != NULL && rt->buses[t->bus_index] != NULL;
}

static void out_timing(const hs_transfer_conf *t, struct hs_out_timing *tm)
{
    hs_output_timing_default(tm);
    tm->confirm_ms = t->confirm_timeout_ms;
}

static uint16_t out_value(const hs_transfer_conf *t, int on)
{
    if (t->output == HS_OUTPUT_COIL)
        return on ? 1 : 0;
    return on ? t->on_value : t->off_value;
}

/* The device's latest answer for the transfer's output, if any. */
static int answer_of(hs_runtime *rt, const hs_transfer_conf *t, struct hs_out_answer *a)
{
    hp_outcmd_result r;
    int coil = t->output == HS_OUTPUT_COIL;
    if (hp_bus_command_result(rt->buses[t->bus_index], t->unit_id, coil, t->output_address,
                              &r) != 0)
        return 0;
    a->seq = r.seq;
    a->ok_write = r.write_errno == 0;
    a->have_value = r.read;
    if (!r.read)
        a->value_on = 0;
    else if (coil)
        a->value_on = r.value != 0;
    else
        a->value_on = r.value == t->on_value ? 1 : 0;
    return 1;
}

/* One step of one output: the state machine, then its action on the bus. */
static void output_step(hs_runtime *rt, size_t i, int64_t mono_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    struct hs_rt_transfer *x = &rt->transfers[i];
    struct hs_out_timing tm;
    out_timing(t, &tm);
    struct hs_out_answer a;
    int have = answer_of(rt, t, &a);
    struct hs_out_events ev;
    int want = x->want;
    hs_out_action act = hs_output_step(&x->out, &tm, want, x->hands_off, mono_ms,
                                       have ? &a : NULL, &ev);
    const char *word = want == 1 ? "RUN" : "STOP";
    if (act != HS_OUT_NONE) {
        int coil = t->output == HS_OUTPUT_COIL;
        uint32_t seq = 0;
        hp_outcmd_kind kind = act == HS_OUT_SEND ? HP_OUTCMD_WRITE_VERIFY : HP_OUTCMD_READ;
        if (hp_bus_command(rt->buses[t->bus_index], t->unit_id, coil, t->output_address, kind,
                           out_value(t, want == 1), &seq) != 0)
            seq = 0;
        hs_output_asked(&x->out, seq, mono_ms);
    }
    if (ev.sent)
        hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output %s written", t->name, word);
    if (ev.confirmed)
        hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output %s confirmed by the device "
               "%lld ms after the decision", t->name, word,
               (long long)x->out.confirmed_after_ms);
    if (ev.overridden)
        hs_log(HSP_LOG_WARNING, "[transfer %s]: the device shows the pump output at RUN "
               "against our STOP; STOP sent again", t->name);
    if (ev.dropped) {
        x->out_dropped = 1;
        hs_log(HSP_LOG_WARNING, "[transfer %s]: the PLC or a panel stopped the pump; not "
               "restarted before the minimum off time", t->name);
    }
    if (ev.failed) {
        x->out_failed = 1;
        hs_log(HSP_LOG_ERR, "[transfer %s]: the device did not confirm pump output %s within "
               "%lld ms; re-sending; the PLC heartbeat stops so its watchdog takes over",
               t->name, word, (long long)tm.confirm_ms);
    }
    if (ev.recovered || (x->out_failed && x->out.state == HS_OUT_CONFIRMED)) {
        if (x->out_failed)
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output confirmed again", t->name);
        x->out_failed = 0;
    }
}

/* 1 when transfer i lets the heartbeat count: its output is confirmed (or
 * being confirmed in time) and in our hands. */
static int vouches(const hs_runtime *rt, size_t i)
{
    const struct hs_rt_transfer *x = &rt->transfers[i];
    if (x->out_failed)
        return 0;
    if (x->hands_off && (x->last.reasons & HS_XR_MANUAL_UNKNOWN))
        return 0; /* we cannot tell who drives the pump: nobody vouches for it */
    return 1;
}

static void heartbeat_step(hs_runtime *rt, size_t i, int64_t mono_ms)
{
    const hs_transfer_conf *t = &rt->site.transfers[i];
    struct hs_rt_transfer *x = &rt->transfers[i];
    int ok = 1;
    for (size_t j = 0; j < rt->site.n_transfers; j++)
        if (rt->transfers[j].hb_owner == (int)i && actuated(rt, j) && !vouches(rt, j))
            ok = 0;
    if (!ok) {
        if (!x->hb_stopped)
            hs_log(HSP_LOG_ERR, "[transfer %s]: PLC heartbeat (register %d) stopped at %u: a "
                   "pump output behind it is not confirmed or not in our hands; the PLC "
                   "watchdog takes over", t->name, (int)t->heartbeat_address, x->hb_confirmed);
        x->hb_stopped = 1;
        return;
    }
    if (x->hb_stopped) {
        hs_log(HSP_LOG_NOTICE, "[transfer %s]: PLC heartbeat counts again", t->name);
        x->hb_stopped = 0;
        x->hb_next_ms = mono_ms;
    }
    hp_bus *bus = rt->buses[t->bus_index];
    uint16_t address = (uint16_t)t->heartbeat_address;
    if (x->hb_seq != 0) {
        hp_outcmd_result r;
        if (hp_bus_command_result(bus, t->unit_id, 0, address, &r) == 0 && r.seq == x->hb_seq) {
            if (r.write_errno == 0)
                x->hb_confirmed = x->hb_value;
            x->hb_seq = 0; /* a failed write is sent again with the same value */
        } else if (mono_ms - x->hb_asked_ms >= HEARTBEAT_LOST_MS) {
            x->hb_seq = 0; /* lost (dropped unanswered): the same value again */
        } else {
            return; /* still in flight: never queue a second step behind it */
        }
    }
    if (mono_ms < x->hb_next_ms)
        return;
    /* +1 on what the device acknowledged: the PLC never sees a skip */
    uint16_t value = hs_transfer_heartbeat_next(x->hb_confirmed);
    uint32_t seq = 0;
    if (hp_bus_command(bus, t->unit_id, 0, address, HP_OUTCMD_WRITE, value, &seq) == 0) {
        x->hb_value = value;
        x->hb_seq = seq;
        x->hb_asked_ms = mono_ms;
    }
    x->hb_next_ms += HEARTBEAT_EVERY_MS;
    if (x->hb_next_ms <= mono_ms)
        x->hb_next_ms = mono_ms + HEARTBEAT_EVERY_MS;
}

void hs_rt_outputs_tick(hs_runtime *rt, int64_t mono_ms)
{
    for (size_t i = 0; rt->transfers != NULL && i < rt->site.n_transfers; i++) {
        if (!actuated(rt, i))
            continue;
        struct hs_rt_transfer *x = &rt->transfers[i];
        if (x->want >= 0 || x->hands_off)
            output_step(rt, i, mono_ms);
    }
    for (size_t i = 0; rt->transfers != NULL && i < rt->site.n_transfers; i++)
        if (actuated(rt, i) && rt->transfers[i].hb_owner == (int)i &&
            rt->transfers[i].have_last)
            heartbeat_step(rt, i, mono_ms);
}

/* Drives the outputs marked in stop[] to STOP and waits (bounded) for the
 * device to confirm; 1 when all confirmed. */
static int drive_to_stop(hs_runtime *rt, const int *stop, const char *why)
{
    int64_t start = hs_rt_mono_ms();
    int all = 0;
    for (size_t i = 0; i < rt->site.n_transfers; i++)
        if (stop[i]) {
            rt->transfers[i].want = 0;
            rt->transfers[i].hands_off = 0;
        }
    while (!all && hs_rt_mono_ms() - start < RELEASE_WAIT_MS) {
        all = 1;
        for (size_t i = 0; i < rt->site.n_transfers; i++) {
            if (!stop[i])
                continue;
            output_step(rt, i, hs_rt_mono_ms());
            if (!hs_output_confirmed(&rt->transfers[i].out))
                all = 0;
        }
        if (!all) {
            struct timespec pause = {0, 20 * 1000000L};
            nanosleep(&pause, NULL);
        }
    }
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        if (!stop[i])
            continue;
        const hs_transfer_conf *t = &rt->site.transfers[i];
        if (hs_output_confirmed(&rt->transfers[i].out))
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output set to STOP for %s (confirmed "
                   "by the device)", t->name, why);
        else
            hs_log(HSP_LOG_ERR, "[transfer %s]: could not confirm the pump output at STOP for "
                   "%s within %d ms; the PLC heartbeat watchdog must stop it", t->name, why,
                   RELEASE_WAIT_MS);
    }
    return all;
}

static struct hs_xfer_input manual_of(const hs_runtime *rt, const hs_transfer_conf *t)
{
    if (t->manual_index < 0)
        return (struct hs_xfer_input){0, HS_XQ_ABSENT};
    const hs_reading *r = &rt->readings[t->manual_index];
    if (!r->have || r->quality != HS_QUALITY_GOOD)
        return (struct hs_xfer_input){r->value, r->have ? HS_XQ_BAD : HS_XQ_ABSENT};
    return (struct hs_xfer_input){r->value, HS_XQ_GOOD};
}

/* Marks the actuated outputs to stop: all (fresh NULL, shutdown) or those
 * fresh does not actuate at the same place. Manual ones are left alone. */
static size_t mark_release(hs_runtime *rt, const hs_site *fresh, int *stop, const char *why)
{
    size_t n = 0;
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        stop[i] = 0;
        const hs_transfer_conf *t = &rt->site.transfers[i];
        if (!actuated(rt, i))
            continue;
        if (fresh != NULL) {
            int kept = 0;
            for (size_t j = 0; j < fresh->n_transfers && !kept; j++)
                kept = hs_conf_transfer_same_output(&rt->site, t, fresh, &fresh->transfers[j]);
            if (kept)
                continue;
        }
        struct hs_xfer_input manual = manual_of(rt, t);
        if (hs_transfer_safe_write(&rt->transfers[i].rule, &manual) != HS_WRITE_OFF) {
            hs_log(HSP_LOG_NOTICE, "[transfer %s]: pump output left as it is at %s: the pump "
                   "is in manual or its manual signal is unknown", t->name, why);
            continue;
        }
        stop[i] = 1;
        n++;
    }
    return n;
}

void hs_rt_transfers_safe(hs_runtime *rt)
{
    if (rt->transfers == NULL || rt->site.n_transfers == 0)
        return;
    int stop[rt->site.n_transfers];
    if (mark_release(rt, NULL, stop, "shutdown") > 0)
        drive_to_stop(rt, stop, "shutdown");
}

void hs_rt_transfers_release(hs_runtime *rt, const hs_site *fresh)
{
    if (rt->transfers == NULL || rt->site.n_transfers == 0)
        return;
    int stop[rt->site.n_transfers];
    if (mark_release(rt, fresh, stop, "the reload") > 0)
        drive_to_stop(rt, stop, "the reload (the new configuration no longer drives it)");
}

void hs_rt_transfers_adopt(hs_runtime *rt, const hs_site *old_site,
                           const struct hs_rt_transfer *old, size_t n_old)
{
    for (size_t i = 0; i < rt->site.n_transfers; i++) {
        const hs_transfer_conf *t = &rt->site.transfers[i];
        for (size_t j = 0; j < n_old; j++) {
            if (!hs_conf_transfer_same_output(old_site, &old_site->transfers[j], &rt->site, t))
                continue;
            struct hs_rt_transfer *x = &rt->transfers[i];
            x->out = old[j].out;
            x->out.seq = 0; /* requests in flight died with the old bus workers */
            if (x->out.state != HS_OUT_CONFIRMED && x->out.state != HS_OUT_FAILED)
                x->out.state = HS_OUT_UNKNOWN; /* read back first */
            x->want = old[j].want;
            x->out_failed = old[j].out_failed;
            if (t->heartbeat_address == old_site->transfers[j].heartbeat_address &&
                old[j].hb_owner >= 0 && (size_t)old[j].hb_owner < n_old)
                x->hb_confirmed = old[old[j].hb_owner].hb_confirmed; /* the count goes on */
        }
    }
}
