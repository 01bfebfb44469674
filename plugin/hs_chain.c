/* The chain schedule (see hs_chain.h for the rule). */
#include "hs_chain.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_balance.h"
#include "hc_baume.h"

#define DAY_MS 86400000LL
#define SEARCH_STEPS 48 /* bisection on the volume: 2^-48 of the largest move */

struct run {
    const struct hs_chain_input *in;
    struct hs_chain_result *out;
    hc_chain_pond *pond;                 /* = out->end */
    struct hs_transfer_state *state;     /* per link */
    struct hs_transfer_decision *prev;   /* per link */
    char *err;
    size_t errlen;
};

static int fail(struct run *r, const char *what, const char *name, hc_status st)
{
    snprintf(r->err, r->errlen, "%s %s: %s", what, name, hc_status_text(st));
    return -1;
}

/* Level and wetted area of a pond holding v; overflow when beyond the shape. */
static hc_status level_of(const struct hs_chain_pond_in *p, double v_m3, double *level,
                          double *area, int *overflow)
{
    *overflow = 0;
    hc_status st = hc_shape_level_of_volume(&p->shape, v_m3, level);
    if (st == HC_ERR_DOMAIN && v_m3 > 0) {
        *overflow = 1;
        *level = hc_shape_max_level(&p->shape);
        st = HC_OK;
    }
    if (st == HC_OK)
        st = hc_shape_at_level(&p->shape, *level, NULL, area);
    return st;
}

static double volume_at(const struct hs_chain_pond_in *p, double level_m)
{
    double v = NAN;
    if (!isfinite(level_m))
        return NAN;
    if (hc_shape_at_level(&p->shape, level_m, &v, NULL) != HC_OK)
        return NAN;
    return v;
}

static double baume_of(const struct hs_chain_input *in, double rho_ref)
{
    double sg, be;
    if (hc_baume_sg(rho_ref, in->t_ref_c, &sg) != HC_OK ||
        hc_baume_from_sg(sg, in->baume_modulus, &be) != HC_OK)
        return NAN;
    return be;
}

static void totals(const struct hs_chain_input *in, const hc_chain_pond *p, double *water,
                   double *ions)
{
    *water = 0;
    for (size_t k = 0; k < in->brine->n_ions; k++)
        ions[k] = 0;
    for (size_t i = 0; i < in->n_ponds; i++) {
        *water += p[i].water_kg;
        for (size_t k = 0; k < in->brine->n_ions; k++)
            ions[k] += p[i].dissolved_mol[k] + p[i].deposited_mol[k];
    }
}

static void no_emit(void *ctx, const hs_alarm_event *ev)
{
    (void)ctx;
    (void)ev;
}

/* The site's alarm rules on the day's predicted state: which would be
 * active. Fed twice, half a day apart, so that on-delays elapse. */
static void predict_alarms(struct run *r, int day, size_t i, const hc_chain_point *pt)
{
    const struct hs_chain_input *in = r->in;
    struct hs_chain_pond_day *d = hs_chain_pd(r->out, day, i);
    d->alarms[0] = '\0';
    if (in->alarms == NULL)
        return;
    hc_brine_state s;
    hc_state_clear(&s);
    s.density_ref_kg_m3 = d->density_ref_kg_m3;
    s.baume = d->baume;
    s.concentration_factor = d->cf;
    s.stage = (hc_stage)d->stage;
    s.saturation_index[HC_MIN_HALITE] = pt->si_halite;
    s.saturation_index[HC_MIN_GYPSUM] = pt->si_gypsum;
    s.reference_temperature_c = in->t_ref_c;
    hs_alarm_input ai;
    hs_alarm_input_clear(&ai);
    ai.state = &s;
    ai.depth_m = d->level_m;
    ai.sample_age_s = 0;
    ai.bus_down = 0;
    int64_t t = (int64_t)day * DAY_MS + DAY_MS / 2;
    ai.state_t_ms = t;
    hs_alarm_update(in->alarms, in->ponds[i].name, &ai, t, no_emit, NULL);
    hs_alarm_update(in->alarms, in->ponds[i].name, &ai, t + DAY_MS / 2 - 1, no_emit, NULL);
    size_t used = 0;
    for (size_t k = 0; k < hs_alarm_count(in->alarms); k++) {
        hs_alarm_info info;
        if (hs_alarm_get(in->alarms, k, &info) != 0 || !info.active ||
            strcmp(info.pond, in->ponds[i].name) != 0)
            continue;
        int n = snprintf(d->alarms + used, sizeof d->alarms - used, "%s%s", used ? "," : "",
                         info.rule);
        if (n < 0 || (size_t)n >= sizeof d->alarms - used)
            break;
        used += (size_t)n;
    }
}

/* Why pond i broke a level limit on `day`: its inflows (for low) or
 * outflows (for high) that day. */
static void limit_cause(struct run *r, int day, size_t i, unsigned lim, char *why, size_t len)
{
    const struct hs_chain_input *in = r->in;
    why[0] = '\0';
    if (day < 1 || !(lim & (HS_CHAIN_LEVEL_LOW | HS_CHAIN_LEVEL_HIGH | HS_CHAIN_OVERFLOW)))
        return;
    int low = (lim & HS_CHAIN_LEVEL_LOW) != 0;
    const char *way = low ? "inflow" : "outflow";
    int any = 0;
    for (size_t l = 0; l < in->n_links; l++) {
        const struct hs_chain_link *k = &in->links[l];
        if ((low ? k->dest : k->source) != (int)i)
            continue;
        const struct hs_chain_link_day *x = hs_chain_ld(r->out, day, l);
        char reasons[128];
        hs_transfer_reasons_format(x->reasons & ~(unsigned)HS_XR_TRIGGER_MET, reasons,
                                   sizeof reasons);
        int n;
        if (x->advice == HS_ADVICE_RUN && x->hours >= 24 - 1e-6)
            n = snprintf(why, len, "%s %s at its pump's capacity", way, k->name);
        else if (x->advice == HS_ADVICE_RUN)
            n = snprintf(why, len, "%s %s at the other pond's limit", way, k->name);
        else
            n = snprintf(why, len, "%s %s %s: %s", way, k->name, hs_advice_name(x->advice),
                         reasons);
        if (n < 0 || (size_t)n >= len)
            why[len - 1] = '\0'; /* cut short: still a sentence's start */
        any = 1;
        break;
    }
    if (!any)
        snprintf(why, len, "no %s configured", way);
}

/* The stage of a brine: the daemon's judgement when the models are given
 * (what its stage triggers compare), else the path's at the CF. */
static int stage_of(const struct hs_chain_input *in, const hc_chain_point *pt)
{
    if (in->models != NULL) {
        hc_stage s = hs_stage_at_density_ref(in->models, in->feed_index, pt->density_ref_kg_m3,
                                             in->t_ref_c);
        if (s != HC_STAGE_NONE)
            return s;
    }
    return pt->stage;
}

static int record(struct run *r, int day)
{
    const struct hs_chain_input *in = r->in;
    for (size_t i = 0; i < in->n_ponds; i++) {
        const struct hs_chain_pond_in *p = &in->ponds[i];
        struct hs_chain_pond_day *d = hs_chain_pd(r->out, day, i);
        hc_chain_view v;
        hc_status st = hc_chain_view_of(in->brine, &r->pond[i], &v);
        if (st != HC_OK)
            return fail(r, "pond", p->name, st);
        double area;
        int over;
        st = level_of(p, v.volume_m3, &d->level_m, &area, &over);
        if (st != HC_OK)
            return fail(r, "pond", p->name, st);
        d->volume_m3 = v.volume_m3;
        d->cf = v.cf;
        d->density_ref_kg_m3 = v.point.density_ref_kg_m3;
        d->baume = baume_of(in, d->density_ref_kg_m3);
        d->stage = v.volume_m3 > 0 ? stage_of(in, &v.point) : HC_STAGE_NONE;
        if (day == 0 && p->stage_now_known && p->stage_now >= 0 && p->stage_now < HC_STAGE_COUNT)
            d->stage = p->stage_now; /* one stage computation: the daemon's, now */
        double floor_area = 0;
        (void)hc_shape_at_level(&p->shape, 0, NULL, &floor_area);
        double salt = hc_chain_deposit_kg(in->brine, &r->pond[i]) +
                      (isfinite(p->deposit_start_kg) ? p->deposit_start_kg : 0);
        d->salt_depth_m = floor_area > 0 ? salt / (in->salt_bulk_density_kg_m3 * floor_area) : NAN;
        unsigned lim = 0;
        if (isfinite(p->level_min_m) && d->level_m < p->level_min_m - 1e-9)
            lim |= HS_CHAIN_LEVEL_LOW;
        if (isfinite(p->level_max_m) && d->level_m > p->level_max_m + 1e-9)
            lim |= HS_CHAIN_LEVEL_HIGH;
        if (over)
            lim |= HS_CHAIN_OVERFLOW;
        if (p->role == HS_ROLE_CRYSTALLISER && d->stage >= HC_STAGE_MAGNESIUM_SULFATE)
            lim |= HS_CHAIN_BITTERN_SALTS;
        if (p->role == HS_ROLE_CRYSTALLISER && d->stage < HC_STAGE_HALITE && v.volume_m3 > 0)
            lim |= HS_CHAIN_GYPSUM_IN_CRYSTALLISER;
        d->limits = lim;
        limit_cause(r, day, i, lim, d->why, sizeof d->why);
        predict_alarms(r, day, i, &v.point);
        if (r->out->harvest_day[i] < 0 && isfinite(p->harvest_depth_m) &&
            d->salt_depth_m >= p->harvest_depth_m)
            r->out->harvest_day[i] = day;
    }
    return 0;
}

/* The destination after receiving v of the source: level and reference
 * density. */
static hc_status after(struct run *r, const struct hs_chain_link *l, double v, double *dest_level,
                       double *mix_rho, int *overflow)
{
    const struct hs_chain_input *in = r->in;
    hc_chain_pond src = r->pond[l->source];
    hc_chain_parcel parcel;
    hc_status st = hc_chain_take(in->brine, &src, v, &parcel);
    hc_chain_view mix;
    if (st == HC_OK)
        st = hc_chain_view_with(in->brine, &r->pond[l->dest], &parcel, &mix);
    double area;
    if (st == HC_OK)
        st = level_of(&in->ponds[l->dest], mix.volume_m3, dest_level, &area, overflow);
    *mix_rho = mix.point.density_ref_kg_m3;
    return st;
}

static int within_band(const struct hs_transfer_rule *rule, double rho)
{
    return !((isfinite(rule->dest_density_min_kg_m3) && rho < rule->dest_density_min_kg_m3) ||
             (isfinite(rule->dest_density_max_kg_m3) && rho > rule->dest_density_max_kg_m3));
}

static int dest_ok(const struct hs_chain_link *l, double level, int overflow, double rain_m)
{
    return !overflow &&
           !(isfinite(l->rule.dest_level_max_m) && level > l->rule.dest_level_max_m - rain_m);
}

/* The most the day allows, and the limit that binds (an HS_XR_* bit, 0
 * when the pump's capacity does). */
static int largest_move(struct run *r, const struct hs_chain_link *l, double rain_m,
                        double *v_out, double *mix_rho, unsigned *binding)
{
    const struct hs_chain_input *in = r->in;
    hc_chain_view sv;
    hc_status st = hc_chain_view_of(in->brine, &r->pond[l->source], &sv);
    if (st != HC_OK)
        return fail(r, "transfer", l->name, st);
    double v_hi = l->rated_flow_m3_h * 24.0;
    *binding = 0;
    /* Leave the source the day's evaporation above its minimum, and the
     * destination the day's rain below its maximum, so that the evening
     * still keeps both limits. */
    const struct hs_chain_pond_in *sp = &in->ponds[l->source];
    double margin = isfinite(sp->evap_fresh_mm_day) && sp->evap_fresh_mm_day > 0
                        ? sp->evap_fresh_mm_day / 1000 : 0;
    double v_min = volume_at(sp, l->rule.source_level_min_m + margin);
    double avail = isfinite(v_min) ? sv.volume_m3 - v_min : sv.volume_m3 * 0.999;
    if (avail < v_hi) {
        v_hi = avail > 0 ? avail : 0;
        *binding = HS_XR_SOURCE_LEVEL_LOW;
    }
    double level;
    int over;
    *mix_rho = NAN;
    if (v_hi <= 0) {
        *v_out = 0;
        return 0;
    }
    st = after(r, l, v_hi, &level, mix_rho, &over);
    if (st != HC_OK)
        return fail(r, "transfer", l->name, st);
    int ok = dest_ok(l, level, over, rain_m) && within_band(&l->rule, *mix_rho);
    if (!ok) {
        /* Largest v in [0, v_hi] that keeps the destination's level and
         * band; both move monotonically with v. */
        double lo = 0, hi = v_hi;
        int band_bad = !within_band(&l->rule, *mix_rho);
        *binding = dest_ok(l, level, over, rain_m) ? HS_XR_DEST_DENSITY_BAND : HS_XR_DEST_LEVEL_HIGH;
        double tiny = v_hi * 1e-9, rho_tiny;
        st = after(r, l, tiny, &level, &rho_tiny, &over);
        if (st != HC_OK)
            return fail(r, "transfer", l->name, st);
        if (!dest_ok(l, level, over, rain_m) || (band_bad && !within_band(&l->rule, rho_tiny))) {
            *v_out = 0;
            *mix_rho = rho_tiny;
            return 0;
        }
        for (int i = 0; i < SEARCH_STEPS; i++) {
            double mid = 0.5 * (lo + hi), rho;
            st = after(r, l, mid, &level, &rho, &over);
            if (st != HC_OK)
                return fail(r, "transfer", l->name, st);
            if (dest_ok(l, level, over, rain_m) && within_band(&l->rule, rho))
                lo = mid;
            else
                hi = mid;
        }
        v_hi = lo;
        st = after(r, l, v_hi, &level, mix_rho, &over);
        if (st != HC_OK)
            return fail(r, "transfer", l->name, st);
    }
    *v_out = v_hi;
    return 0;
}

static int run_link(struct run *r, int day, size_t li)
{
    const struct hs_chain_input *in = r->in;
    const struct hs_chain_link *l = &in->links[li];
    struct hs_chain_link_day *out = hs_chain_ld(r->out, day, li);
    memset(out, 0, sizeof *out);
    hc_chain_view sv, dv;
    hc_status st = hc_chain_view_of(in->brine, &r->pond[l->source], &sv);
    if (st == HC_OK)
        st = hc_chain_view_of(in->brine, &r->pond[l->dest], &dv);
    if (st != HC_OK)
        return fail(r, "transfer", l->name, st);
    double v, mix_rho;
    unsigned binding;
    double rain = in->rain_mm != NULL ? in->rain_mm[day - 1] : 0;
    if (largest_move(r, l, rain / 1000, &v, &mix_rho, &binding) != 0)
        return -1;
    double src_level, dst_level, area;
    int over;
    (void)level_of(&in->ponds[l->source], sv.volume_m3, &src_level, &area, &over);
    (void)level_of(&in->ponds[l->dest], dv.volume_m3, &dst_level, &area, &over);
    struct hs_transfer_inputs xin = {
        .now_ms = (int64_t)day * DAY_MS,
        .source_density = {sv.point.density_ref_kg_m3, HS_XQ_GOOD},
        .source_stage = stage_of(in, &sv.point),
        .source_level = {src_level, HS_XQ_GOOD},
        .dest_level = {dst_level, HS_XQ_GOOD},
        .dest_density_after_mixing = {isfinite(mix_rho) ? mix_rho : dv.point.density_ref_kg_m3,
                                      HS_XQ_GOOD},
        .rain = {rain > 0 ? 1 : 0, HS_XQ_GOOD},
        .manual = {0, HS_XQ_ABSENT},
        .run_feedback = {0, HS_XQ_ABSENT},
        .bus_up = 1,
        /* The prediction stands in for the density the rule decides on. */
        .source_method = l->rule.density_method >= 0 ? l->rule.density_method
                                                     : HC_METHOD_COMPOSITION,
    };
    struct hs_transfer_decision d;
    hs_transfer_decide(&l->rule, &r->state[li], &xin, day > 1 ? &r->prev[li] : NULL, &d);
    r->prev[li] = d;
    out->advice = d.advice;
    out->reasons = d.reasons;
    out->mix_density_ref_kg_m3 = dv.point.density_ref_kg_m3;
    if (d.advice != HS_ADVICE_RUN)
        return 0;
    if (!(v > 0)) {
        out->advice = HS_ADVICE_BLOCKED;
        out->reasons |= binding;
        return 0;
    }
    hc_chain_parcel parcel;
    st = hc_chain_take(in->brine, &r->pond[l->source], v, &parcel);
    if (st != HC_OK)
        return fail(r, "transfer", l->name, st);
    hc_chain_add(&r->pond[l->dest], &parcel);
    st = hc_chain_settle(in->brine, &r->pond[l->dest]);
    if (st != HC_OK)
        return fail(r, "transfer", l->name, st);
    out->volume_m3 = v;
    out->hours = v / l->rated_flow_m3_h;
    out->mix_density_ref_kg_m3 = mix_rho;
    if (in->ponds[l->dest].role == HS_ROLE_BITTERN) {
        double be = baume_of(in, sv.point.density_ref_kg_m3);
        r->out->bittern_baume = (r->out->bittern_baume * r->out->bittern_m3 + be * v) /
                                (r->out->bittern_m3 + v);
        r->out->bittern_m3 += v;
    }
    return 0;
}

static int sea_fill(struct run *r)
{
    const struct hs_chain_input *in = r->in;
    for (size_t i = 0; i < in->n_ponds; i++) {
        const struct hs_chain_pond_in *p = &in->ponds[i];
        if (p->role != HS_ROLE_INTAKE || !isfinite(p->level_max_m))
            continue;
        hc_chain_view v;
        hc_status st = hc_chain_view_of(in->brine, &r->pond[i], &v);
        double room = volume_at(p, p->level_max_m) - v.volume_m3;
        if (st != HC_OK || !(room > 0))
            continue;
        hc_chain_parcel sea;
        st = hc_chain_feed_parcel(in->brine, room, &sea);
        if (st != HC_OK)
            return fail(r, "sea intake of", p->name, st);
        hc_chain_add(&r->pond[i], &sea);
        r->out->sea_in_m3 += room;
        r->out->sea_water_kg += sea.water_kg;
        for (size_t k = 0; k < in->brine->n_ions; k++)
            r->out->ion_sea_mol[k] += sea.dissolved_mol[k];
    }
    return 0;
}

static int weather(struct run *r, int day)
{
    const struct hs_chain_input *in = r->in;
    double rh = isfinite(in->relative_humidity) ? in->relative_humidity : 0;
    double rain = in->rain_mm != NULL ? in->rain_mm[day - 1] : 0;
    for (size_t i = 0; i < in->n_ponds; i++) {
        const struct hs_chain_pond_in *p = &in->ponds[i];
        hc_chain_view v;
        hc_status st = hc_chain_view_of(in->brine, &r->pond[i], &v);
        if (st != HC_OK)
            return fail(r, "pond", p->name, st);
        if (!(v.volume_m3 > 0))
            continue;
        double level, area, f = 1;
        int over;
        st = level_of(p, v.volume_m3, &level, &area, &over);
        if (st == HC_OK)
            st = hc_evaporation_activity_factor(v.point.water_activity, rh, &f);
        if (st != HC_OK)
            return fail(r, "pond", p->name, st);
        double e_mm = p->evap_fresh_mm_day * f;
        double done;
        /* 1 mm over 1 m2 is 1 kg of water (HC_WATER_DEPTH_DENSITY). */
        st = hc_chain_weather(in->brine, &r->pond[i], e_mm * area * HC_WATER_DEPTH_DENSITY / 1000,
                              rain * area * HC_WATER_DEPTH_DENSITY / 1000, &done);
        if (st != HC_OK)
            return fail(r, "pond", p->name, st);
        hs_chain_pd(r->out, day, i)->evaporated_mm = done / area;
        r->out->evaporated_kg += done;
        r->out->rain_kg += rain * area * HC_WATER_DEPTH_DENSITY / 1000;
    }
    return 0;
}

/* Densest source first (then by band), so downstream ponds empty first. */
static void link_order(const struct hs_chain_input *in, const hc_chain_pond *p, size_t *order)
{
    double key[512];
    for (size_t i = 0; i < in->n_links; i++) {
        const hc_chain_pond *s = &p[in->links[i].source];
        key[i] = s->water_kg > 0 ? s->feed_water_kg / s->water_kg : 0;
        order[i] = i;
    }
    for (size_t i = 1; i < in->n_links; i++)
        for (size_t j = i; j > 0 && key[order[j]] > key[order[j - 1]]; j--) {
            size_t t = order[j];
            order[j] = order[j - 1];
            order[j - 1] = t;
        }
}

int hs_chain_run(const struct hs_chain_input *in, struct hs_chain_result *out, char *err,
                 size_t errlen)
{
    memset(out, 0, sizeof *out);
    struct run r = {in, out, NULL, NULL, NULL, err, errlen};
    if (in->days < 1 || in->days > HS_CHAIN_MAX_DAYS || in->n_links > 512 ||
        hc_chain_brine_check(in->brine) != HC_OK) {
        snprintf(err, errlen, "chain: bad input (days 1..%d, at most 512 transfers, a path)",
                 HS_CHAIN_MAX_DAYS);
        return -1;
    }
    out->days = in->days;
    out->n_ponds = in->n_ponds;
    out->n_links = in->n_links;
    out->pond = calloc((size_t)(in->days + 1) * (in->n_ponds ? in->n_ponds : 1), sizeof *out->pond);
    out->link = calloc((size_t)in->days * (in->n_links ? in->n_links : 1), sizeof *out->link);
    out->harvest_day = calloc(in->n_ponds ? in->n_ponds : 1, sizeof *out->harvest_day);
    out->end = calloc(in->n_ponds ? in->n_ponds : 1, sizeof *out->end);
    r.state = calloc(in->n_links ? in->n_links : 1, sizeof *r.state);
    r.prev = calloc(in->n_links ? in->n_links : 1, sizeof *r.prev);
    size_t *order = calloc(in->n_links ? in->n_links : 1, sizeof *order);
    int rc = -1;
    if (!out->pond || !out->link || !out->harvest_day || !out->end || !r.state || !r.prev || !order) {
        snprintf(err, errlen, "chain: out of memory");
        goto done;
    }
    r.pond = out->end;
    for (size_t i = 0; i < in->n_ponds; i++) {
        const struct hs_chain_pond_in *p = &in->ponds[i];
        out->harvest_day[i] = -1;
        double v = volume_at(p, p->level_m);
        if (!isfinite(v)) {
            snprintf(err, errlen, "pond %s: level %g m is outside its geometry", p->name,
                     p->level_m);
            goto done;
        }
        hc_status st = hc_chain_pond_fill(in->brine, v, p->density_ref_kg_m3, &r.pond[i]);
        if (st != HC_OK) {
            fail(&r, "pond", p->name, st);
            goto done;
        }
    }
    for (size_t i = 0; i < in->n_links; i++)
        hs_transfer_state_init(&r.state[i]);
    totals(in, r.pond, &out->water_start_kg, out->ion_start_mol);
    if (record(&r, 0) != 0)
        goto done;
    for (int day = 1; day <= in->days; day++) {
        link_order(in, r.pond, order);
        for (size_t k = 0; k < in->n_links; k++)
            if (run_link(&r, day, order[k]) != 0)
                goto done;
        if (in->sea_fill && sea_fill(&r) != 0)
            goto done;
        if (weather(&r, day) != 0 || record(&r, day) != 0)
            goto done;
    }
    totals(in, r.pond, &out->water_end_kg, out->ion_end_mol);
    rc = 0;
done:
    free(r.state);
    free(r.prev);
    free(order);
    if (rc != 0)
        hs_chain_result_free(out);
    return rc;
}

void hs_chain_result_free(struct hs_chain_result *r)
{
    free(r->pond);
    free(r->link);
    free(r->harvest_day);
    free(r->end);
    r->pond = NULL;
    r->link = NULL;
    r->harvest_day = NULL;
    r->end = NULL;
}

int hs_chain_limits_format(unsigned limits, char *buf, size_t len)
{
    static const char *names[] = {"level-low", "level-high", "overflow", "magnesium-salts",
                                  "before-halite"};
    int total = 0;
    if (len > 0)
        buf[0] = '\0';
    for (unsigned i = 0; i < sizeof names / sizeof names[0]; i++) {
        if (!(limits & (1u << i)))
            continue;
        size_t used = (size_t)total < len ? (size_t)total : len;
        int n = snprintf(buf + used, len - used, "%s%s", total ? "," : "", names[i]);
        if (n < 0)
            return n;
        total += n;
    }
    return total;
}
