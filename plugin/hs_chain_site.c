/* The chain schedule's inputs from a site (see hs_chain_site.h). */
#include "hs_chain_site.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_ion.h"
#include "hs_conf_transfer.h"
#include "hs_hydro_brine.h"
#include "hs_pond_shape.h"

int hs_chain_tables_from_path(const hc_path *path, double t_ref_c, struct hs_chain_tables *t,
                              char *err, size_t errlen)
{
    memset(t, 0, sizeof *t);
    size_t n = hc_path_step_count(path);
    t->cf = calloc(n ? n : 1, sizeof *t->cf);
    t->rho = calloc(n ? n : 1, sizeof *t->rho);
    t->rho_ref = calloc(n ? n : 1, sizeof *t->rho_ref);
    t->aw = calloc(n ? n : 1, sizeof *t->aw);
    t->mol = calloc((n ? n : 1) * HC_ION_COUNT, sizeof *t->mol);
    t->si_halite = calloc(n ? n : 1, sizeof *t->si_halite);
    t->si_gypsum = calloc(n ? n : 1, sizeof *t->si_gypsum);
    if (!t->cf || !t->rho || !t->rho_ref || !t->aw || !t->mol || !t->si_halite || !t->si_gypsum) {
        snprintf(err, errlen, "chain: out of memory");
        hs_chain_tables_free(t);
        return -1;
    }
    size_t rows = 0;
    for (size_t i = 0; i < n; i++) {
        const hc_path_point *p = hc_path_step(path, i);
        if (rows > 0 && !(p->concentration_factor > t->cf[rows - 1]))
            continue;
        double rho_ref;
        /* The same composition at the reference temperature. */
        if (hs_brine_density_cb(p->molality, HC_ION_COUNT, t_ref_c, NULL, &rho_ref) != HC_OK ||
            !isfinite(p->density_kg_m3) || !isfinite(p->water_activity))
            break; /* the density model's range ends: so does the table */
        t->cf[rows] = p->concentration_factor;
        t->rho[rows] = p->density_kg_m3;
        t->rho_ref[rows] = rho_ref;
        t->aw[rows] = p->water_activity;
        /* -HUGE_VAL (an ion absent) is kept as a very low index. */
        t->si_halite[rows] = fmax(p->saturation_index[HC_MIN_HALITE], -99.0);
        t->si_gypsum[rows] = fmax(p->saturation_index[HC_MIN_GYPSUM], -99.0);
        for (int k = 0; k < HC_ION_COUNT; k++)
            t->mol[rows * HC_ION_COUNT + (size_t)k] = p->molality[k];
        rows++;
    }
    if (rows < 2) {
        snprintf(err, errlen, "chain: the feed's evaporation path is too short");
        hs_chain_tables_free(t);
        return -1;
    }
    hs_ion_molar_masses(t->molar_mass);
    hc_chain_brine *b = &t->view;
    b->n = rows;
    b->cf = t->cf;
    b->density_kg_m3 = t->rho;
    b->density_ref_kg_m3 = t->rho_ref;
    b->water_activity = t->aw;
    b->si_halite = t->si_halite;
    b->si_gypsum = t->si_gypsum;
    b->n_ions = HC_ION_COUNT;
    b->molality = t->mol;
    b->molar_mass_kg_mol = t->molar_mass;
    for (int s = 0; s < HC_STAGE_COUNT; s++)
        b->stage_cf[s] = s == HC_STAGE_SEAWATER ? 1.0 : hc_path_stage_cf(path, (hc_stage)s);
    return 0;
}

void hs_chain_tables_free(struct hs_chain_tables *t)
{
    free(t->cf);
    free(t->rho);
    free(t->rho_ref);
    free(t->aw);
    free(t->mol);
    free(t->si_halite);
    free(t->si_gypsum);
    memset(t, 0, sizeof *t);
}

/* Every timing rule off (a day's step), never actuating: advice only. */
static void advisory(struct hs_transfer_rule *rule)
{
    rule->min_on_ms = rule->min_off_ms = rule->max_run_ms = 0;
    rule->actuate = 0;
    rule->has_manual = 0;
    rule->has_feedback = 0;
}

static int covered(const hs_site *site, int src, int dst)
{
    for (size_t i = 0; i < site->n_transfers; i++)
        if (site->transfers[i].source_index == src && site->transfers[i].dest_index == dst)
            return 1;
    return 0;
}

int hs_chain_site_build(const hs_site *site, double default_flow, struct hs_chain_site *out,
                        char *err, size_t errlen)
{
    memset(out, 0, sizeof *out);
    size_t np = site->n_ponds, nl_max = site->n_transfers + site->n_ponds;
    out->ponds = calloc(np ? np : 1, sizeof *out->ponds);
    out->tables = calloc(np ? np : 1, sizeof *out->tables);
    out->links = calloc(nl_max ? nl_max : 1, sizeof *out->links);
    if (!out->ponds || !out->tables || !out->links) {
        snprintf(err, errlen, "chain: out of memory");
        hs_chain_site_free(out);
        return -1;
    }
    out->n_ponds = np;
    for (size_t i = 0; i < np; i++) {
        const hs_pond *p = &site->ponds[i];
        struct hs_chain_pond_in *c = &out->ponds[i];
        snprintf(c->name, sizeof c->name, "%s", p->name);
        c->role = p->role;
        c->level_min_m = p->level_min_m;
        c->level_max_m = p->level_max_m;
        c->level_m = c->density_ref_kg_m3 = c->evap_fresh_mm_day = NAN;
        c->harvest_depth_m = NAN;
        c->deposit_start_kg = 0;
        int loaded = 0;
        int rc = hs_pond_shape_of(p, &out->tables[i], &loaded, &c->shape, err, errlen);
        if (rc != 0) {
            if (rc > 0)
                snprintf(err, errlen, "%s:%d: [pond %s]: the chain needs its area or a "
                         "stage_storage table", site->path, p->line, p->name);
            hs_chain_site_free(out);
            return -1;
        }
    }
    size_t nl = 0;
    for (size_t i = 0; i < site->n_transfers; i++) {
        const hs_transfer_conf *t = &site->transfers[i];
        if (t->source_index < 0 || t->dest_index < 0)
            continue;
        struct hs_chain_link *l = &out->links[nl++];
        snprintf(l->name, sizeof l->name, "%s", t->name);
        l->source = t->source_index;
        l->dest = t->dest_index;
        hs_conf_transfer_rule(site, t, &l->rule);
        advisory(&l->rule);
        l->rated_flow_m3_h = isfinite(t->rated_flow_m3_h) && t->rated_flow_m3_h > 0
                                 ? t->rated_flow_m3_h : default_flow;
        l->configured = 1;
    }
    for (size_t i = 0; i < np; i++) {
        const hs_pond *p = &site->ponds[i];
        if (p->next_index < 0 || covered(site, (int)i, p->next_index) ||
            !isfinite(p->density_out_kg_m3))
            continue;
        const hs_pond *d = &site->ponds[p->next_index];
        struct hs_chain_link *l = &out->links[nl++];
        snprintf(l->name, sizeof l->name, "%.20s-to-%.20s", p->name, d->name);
        l->source = (int)i;
        l->dest = p->next_index;
        hs_transfer_rule_defaults(&l->rule);
        l->rule.start_density_kg_m3 = p->density_out_kg_m3;
        l->rule.source_level_min_m = p->level_min_m;
        l->rule.dest_level_max_m = d->level_max_m;
        l->rule.dest_density_min_kg_m3 = d->density_in_kg_m3;
        advisory(&l->rule);
        l->rated_flow_m3_h = default_flow;
        l->configured = 0;
    }
    out->n_links = nl;
    return 0;
}

void hs_chain_site_free(struct hs_chain_site *s)
{
    if (s->tables != NULL)
        for (size_t i = 0; i < s->n_ponds; i++)
            hs_stage_table_free(&s->tables[i]);
    free(s->tables);
    free(s->ponds);
    free(s->links);
    memset(s, 0, sizeof *s);
}
