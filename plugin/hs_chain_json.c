/* The chain schedule as JSON (see hs_chain_json.h). */
#include "hs_chain_json.h"

#include <math.h>
#include <string.h>

#include "hc_state.h"

static json_t *num(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static json_t *names(unsigned bits, const char *(*name)(unsigned), unsigned nbits)
{
    json_t *a = json_array();
    for (unsigned i = 0; a != NULL && i < nbits; i++)
        if (bits & (1u << i)) {
            const char *n = name(1u << i);
            if (n != NULL)
                json_array_append_new(a, json_string(n));
        }
    return a;
}

/* "a,b" -> ["a", "b"]. */
static json_t *split(const char *list)
{
    json_t *a = json_array();
    const char *p = list;
    while (a != NULL && *p != '\0') {
        size_t n = strcspn(p, ",");
        json_array_append_new(a, json_stringn(p, n));
        p += n + (p[n] == ',');
    }
    return a;
}

static const char *limit_name(unsigned bit)
{
    static char buf[32];
    hs_chain_limits_format(bit, buf, sizeof buf);
    return buf[0] ? buf : NULL;
}

void hs_chain_balance_residuals(const struct hs_chain_input *in, const struct hs_chain_result *r,
                                double *water_rel, double *ion_rel)
{
    double change = r->water_end_kg - r->water_start_kg;
    double flows = r->rain_kg + r->sea_water_kg - r->evaporated_kg;
    double scale = fmax(r->water_start_kg, r->evaporated_kg);
    *water_rel = scale > 0 ? fabs(change - flows) / scale : 0;
    *ion_rel = 0;
    for (size_t k = 0; k < in->brine->n_ions; k++) {
        double s = fmax(r->ion_start_mol[k], r->ion_end_mol[k]);
        if (s > 0) {
            double e = fabs(r->ion_end_mol[k] - r->ion_start_mol[k] - r->ion_sea_mol[k]) / s;
            if (e > *ion_rel)
                *ion_rel = e;
        }
    }
}

static json_t *pond_day(const struct hs_chain_input *in, const struct hs_chain_result *r, int d,
                        size_t i)
{
    const struct hs_chain_pond_day *p = hs_chain_pd(r, d, i);
    return json_pack("{s:s, s:o, s:o, s:o, s:o, s:o, s:s, s:o, s:o, s:o, s:o, s:s}", "pond",
                     in->ponds[i].name, "level_m", num(p->level_m), "volume_m3",
                     num(p->volume_m3), "density_ref_kg_m3", num(p->density_ref_kg_m3), "baume",
                     num(p->baume), "concentration_factor", num(p->cf), "stage",
                     hc_stage_name((hc_stage)p->stage), "evaporated_mm", num(p->evaporated_mm),
                     "salt_depth_m", num(p->salt_depth_m), "limits",
                     names(p->limits, limit_name, 8), "alarms", split(p->alarms), "why", p->why);
}

static json_t *link_day(const struct hs_chain_input *in, const struct hs_chain_result *r, int d,
                        size_t l)
{
    const struct hs_chain_link_day *x = hs_chain_ld(r, d, l);
    const struct hs_chain_link *k = &in->links[l];
    return json_pack("{s:s, s:s, s:s, s:b, s:s, s:o, s:o, s:o, s:o}", "transfer", k->name,
                     "source", in->ponds[k->source].name, "destination",
                     in->ponds[k->dest].name, "configured", k->configured, "advice",
                     hs_advice_name((hs_advice)x->advice), "reasons",
                     names(x->reasons, hs_transfer_reason_name, HS_XR_BITS), "volume_m3",
                     num(x->volume_m3), "hours", num(x->hours), "destination_density_ref_kg_m3",
                     num(x->mix_density_ref_kg_m3));
}

json_t *hs_chain_to_json(const struct hs_chain_input *in, const struct hs_chain_result *r)
{
    json_t *days = json_array(), *harvest = json_object(), *broken = json_array();
    json_t *start = json_array();
    if (!days || !harvest || !broken || !start)
        goto oom;
    for (size_t i = 0; i < r->n_ponds; i++)
        json_array_append_new(start, pond_day(in, r, 0, i));
    for (int d = 1; d <= r->days; d++) {
        json_t *ponds = json_array(), *links = json_array();
        for (size_t i = 0; ponds && i < r->n_ponds; i++) {
            json_array_append_new(ponds, pond_day(in, r, d, i));
            unsigned lim = hs_chain_pd(r, d, i)->limits;
            for (unsigned b = 0; b < 8; b++)
                if (lim & (1u << b))
                    json_array_append_new(broken, json_pack("{s:i, s:s, s:s, s:s}", "day", d,
                                                            "pond", in->ponds[i].name, "limit",
                                                            limit_name(1u << b), "why",
                                                            hs_chain_pd(r, d, i)->why));
        }
        for (size_t l = 0; links && l < r->n_links; l++)
            json_array_append_new(links, link_day(in, r, d, l));
        json_array_append_new(days, json_pack("{s:i, s:o, s:o}", "day", d, "transfers",
                                              links ? links : json_null(), "ponds",
                                              ponds ? ponds : json_null()));
    }
    for (size_t i = 0; i < r->n_ponds; i++)
        if (in->ponds[i].role == HS_ROLE_CRYSTALLISER)
            json_object_set_new(harvest, in->ponds[i].name,
                                r->harvest_day[i] >= 0 ? json_integer(r->harvest_day[i])
                                                       : json_null());
    double wr, ir;
    hs_chain_balance_residuals(in, r, &wr, &ir);
    json_t *balance = json_pack(
        "{s:o, s:o, s:o, s:o, s:o, s:o, s:o}", "water_start_kg", num(r->water_start_kg),
        "water_end_kg", num(r->water_end_kg), "evaporated_kg", num(r->evaporated_kg), "rain_kg",
        num(r->rain_kg), "sea_water_kg", num(r->sea_water_kg), "water_residual_relative",
        num(wr), "ion_residual_relative", num(ir));
    json_t *o = json_pack("{s:b, s:i, s:f, s:o, s:o, s:o, s:o, s:{s:o, s:o}, s:o, s:o}",
                          "advice_only", 1, "days_planned", r->days, "reference_temperature_c",
                          in->t_ref_c, "start", start, "days", days, "harvest_day", harvest,
                          "limits_not_kept", broken, "bittern", "volume_m3", num(r->bittern_m3),
                          "baume", num(r->bittern_m3 > 0 ? r->bittern_baume : NAN),
                          "sea_intake_m3", num(r->sea_in_m3), "balance",
                          balance ? balance : json_null());
    return o;
oom:
    json_decref(days);
    json_decref(harvest);
    json_decref(broken);
    json_decref(start);
    return NULL;
}
