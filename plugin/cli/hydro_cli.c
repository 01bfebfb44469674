/* Shared plumbing of the hydrology commands (see hydro_cli.h). */
#include "cli/cli_number.h"
#include "cli/hydro_cli.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "hc_feed.h"
#include "hp_state_json.h"
#include "hs_config.h"
#include "hs_hydro_store.h"
#include "hs_store_latest.h"

/* How far back the store is read for the latest state and daily rates. */
#define HISTORY_DAYS 60
#define DEFAULT_T_REF_C 15.0
#define DEFAULT_FEED_SP 35.0
#define DEFAULT_MODULUS 145.0

void hs_hcli_common_init(struct hs_hcli_common *c)
{
    memset(c, 0, sizeof *c);
    c->temperature_c = c->t_ref_c = c->feed_sp = c->fallback_temperature_c = NAN;
}

int hs_hcli_common_option(const char *cmd, struct hs_hcli_common *c, const char *opt,
                          const char *value)
{
    double *dst = NULL;
    if (strcmp(opt, "--config") == 0) {
        c->config_path = value;
        return 1;
    }
    if (strcmp(opt, "--temperature") == 0)
        dst = &c->temperature_c;
    else if (strcmp(opt, "--reference-temperature") == 0)
        dst = &c->t_ref_c;
    else if (strcmp(opt, "--feed-salinity") == 0)
        dst = &c->feed_sp;
    else
        return 0;
    if (hs_cli_number(cmd, opt, value, dst) != 0)
        return -1;
    if (dst != &c->feed_sp && (*dst < -5 || *dst > 80)) {
        fprintf(stderr, "halostage %s: %s %s: outside -5..80 degC\n", cmd, opt, value);
        return -1;
    }
    if (dst == &c->feed_sp && (*dst < 2 || *dst > 42)) {
        fprintf(stderr, "halostage %s: %s %s: a seawater feed has S_P 2..42\n", cmd, opt, value);
        return -1;
    }
    return 1;
}

int hs_hcli_open(const char *cmd, const struct hs_hcli_common *common,
                 struct hs_hcli_context *ctx)
{
    memset(ctx, 0, sizeof *ctx);
    ctx->common = common;
    ctx->t_ref_c = isfinite(common->t_ref_c) ? common->t_ref_c : DEFAULT_T_REF_C;
    if (common->config_path == NULL)
        return 0;
    hs_diag *diag = calloc(1, sizeof *diag);
    if (diag == NULL) {
        fprintf(stderr, "halostage %s: out of memory\n", cmd);
        return 1;
    }
    if (hs_site_load(common->config_path, &ctx->site, diag) != 0) {
        for (unsigned i = 0; i < diag->n; i++)
            fprintf(stderr, "%s\n", diag->msg[i]);
        if (diag->dropped > 0)
            fprintf(stderr, "(%u more problems not shown)\n", diag->dropped);
        free(diag);
        return HS_EXIT_CONFIG;
    }
    free(diag);
    ctx->site_loaded = 1;
    if (!isfinite(common->t_ref_c) && isfinite(ctx->site.site.reference_temperature_c))
        ctx->t_ref_c = ctx->site.site.reference_temperature_c;
    const char *db = ctx->site.site.database;
    if (db[0] != '\0' && access(db, F_OK) == 0) {
        char err[512];
        ctx->store = hs_store_open(db, HS_STORE_READ, NULL, err, sizeof err);
        if (ctx->store == NULL) {
            fprintf(stderr, "halostage %s: %s\n", cmd, err);
            hs_hcli_close(ctx);
            return 1;
        }
    }
    return 0;
}

void hs_hcli_close(struct hs_hcli_context *ctx)
{
    hs_store_close(ctx->store);
    ctx->store = NULL;
    if (ctx->site_loaded)
        hs_site_free(&ctx->site);
    ctx->site_loaded = 0;
}

size_t hs_hcli_pond_count(const struct hs_hcli_context *ctx)
{
    return ctx->site_loaded ? ctx->site.n_ponds : 0;
}

const char *hs_hcli_pond_name(const struct hs_hcli_context *ctx, size_t i)
{
    return ctx->site_loaded && i < ctx->site.n_ponds ? ctx->site.ponds[i].name : "";
}

/* ---- the store's history of one pond ---------------------------------- */

static int read_history(const char *cmd, struct hs_hcli_context *ctx, const char *pond,
                        struct hs_hydro_history *h)
{
    if (ctx->store == NULL) {
        hs_hydro_history_read(NULL, pond, 0, 0, h); /* fills the unknowns */
        return 0;
    }
    int64_t now = (int64_t)time(NULL) * 1000;
    if (hs_hydro_history_read(ctx->store, pond, now, HISTORY_DAYS, h) != 0) {
        fprintf(stderr, "halostage %s: %s\n", cmd, hs_store_error(ctx->store));
        return 1;
    }
    return 0;
}

/* ---- the pond's feed and its evaporation path ------------------------- */

static int pick_feed(const char *cmd, struct hs_hcli_context *ctx, const hs_pond *p,
                     hc_feed *feed)
{
    const struct hs_hcli_common *c = ctx->common;
    int idx = -1;
    if (!isfinite(c->feed_sp) && p != NULL)
        idx = p->feed_index >= 0 ? p->feed_index : ctx->site.site.feed_index;
    hc_status st;
    if (idx < 0) {
        st = hc_feed_seawater(isfinite(c->feed_sp) ? c->feed_sp : DEFAULT_FEED_SP, feed);
    } else {
        const hs_feed *f = &ctx->site.feeds[idx];
        hc_feed_analysis a;
        memset(&a, 0, sizeof a);
        a.unit = HC_FEED_G_PER_KG;
        a.density_kg_m3 = NAN;
        a.conc[HC_ION_NA] = f->g_kg[HS_ION_NA];
        a.conc[HC_ION_K] = f->g_kg[HS_ION_K];
        a.conc[HC_ION_MG] = f->g_kg[HS_ION_MG];
        a.conc[HC_ION_CA] = f->g_kg[HS_ION_CA];
        a.conc[HC_ION_CL] = f->g_kg[HS_ION_CL];
        a.conc[HC_ION_SO4] = f->g_kg[HS_ION_SO4];
        a.conc[HC_ION_HCO3] = f->g_kg[HS_ION_HCO3];
        a.conc[HC_ION_CO3] = f->g_kg[HS_ION_CO3];
        a.br = f->g_kg[HS_ION_BR];
        a.sr = f->g_kg[HS_ION_SR];
        for (int i = 0; i < HC_ION_COUNT; i++)
            if (isnan(a.conc[i]))
                a.conc[i] = 0;
        if (isnan(a.br))
            a.br = 0;
        if (isnan(a.sr))
            a.sr = 0;
        st = hc_feed_from_analysis(f->name, &a, feed);
        if (st != HC_OK) {
            fprintf(stderr, "%s:%d: [feed %s]: %s\n", ctx->site.path, f->line, f->name,
                    hc_status_text(st));
            return HS_EXIT_CONFIG;
        }
    }
    if (st != HC_OK) {
        fprintf(stderr, "halostage %s: feed: %s\n", cmd, hc_status_text(st));
        return 1;
    }
    return 0;
}

static int build_model(const char *cmd, double t_c, struct hs_hcli_model *m)
{
    hc_status st = hc_path_build(&m->feed, t_c, HC_PATH_FRACTIONAL, &m->path);
    if (st != HC_OK) {
        fprintf(stderr, "halostage %s: evaporation path of feed %s at %.1f degC: %s\n", cmd,
                m->feed.name, t_c, hc_status_text(st));
        m->path = NULL;
        return 1;
    }
    char err[256];
    if (hs_brine_curve_from_path(m->path, &m->curve, err, sizeof err) != 0) {
        fprintf(stderr, "halostage %s: %s\n", cmd, err);
        return 1;
    }
    return 0;
}

/* ---- one pond ----------------------------------------------------------- */

/* Configuration first, then what the command line gave. */
static void merge_pond(struct hs_cli_pond *own, const hs_pond *p, const struct hs_cli_pond *cli)
{
    if (p != NULL) {
        own->area_m2 = p->floor_area_m2;
        own->side_slope = p->side_slope;
        own->crest_m = isfinite(p->freeboard_m) ? p->freeboard_m : NAN;
        snprintf(own->stage_storage, sizeof own->stage_storage, "%s", p->stage_storage);
        if (own->stage_storage[0] != '\0')
            own->area_m2 = NAN;
        own->min_level_m = p->level_min_m;
        own->max_level_m = p->level_max_m;
        own->band_low_kg_m3 = p->density_in_kg_m3;
        own->band_high_kg_m3 = p->density_out_kg_m3;
    }
    if (cli == NULL)
        return;
    if (cli->stage_storage[0] != '\0') {
        snprintf(own->stage_storage, sizeof own->stage_storage, "%s", cli->stage_storage);
        own->area_m2 = NAN;
    }
    if (isfinite(cli->area_m2)) {
        own->area_m2 = cli->area_m2;
        own->stage_storage[0] = '\0';
    }
#define TAKE(f) do { if (isfinite(cli->f)) own->f = cli->f; } while (0)
    TAKE(side_slope);
    TAKE(crest_m);
    TAKE(level_m);
    TAKE(density_kg_m3);
    TAKE(min_level_m);
    TAKE(max_level_m);
    TAKE(band_low_kg_m3);
    TAKE(band_high_kg_m3);
#undef TAKE
}

int hs_hcli_pond_view(const char *cmd, struct hs_hcli_context *ctx, const char *name,
                      const struct hs_cli_pond *cli, int want_target, double target_kg_m3,
                      double rate_mm_day, double rate_spread_mm_day,
                      struct hs_hcli_pond_view *pv)
{
    memset(pv, 0, sizeof *pv);
    snprintf(pv->name, sizeof pv->name, "%s", name);
    snprintf(pv->label, sizeof pv->label, "%s%s", name[0] ? "pond " : "the pond", name);
    hs_hopt_pond_init(&pv->own, name);
    pv->pond = &pv->own;
    pv->target_kg_m3 = target_kg_m3;
    pv->reference_temperature_c = ctx->t_ref_c;
    pv->cf_target = pv->cf_next_stage = NAN;
    pv->rate_mm_day = rate_mm_day;
    pv->rate_spread_mm_day = rate_spread_mm_day;
    hc_state_clear(&pv->state);

    const hs_pond *p = NULL;
    if (ctx->site_loaded) {
        int idx = hs_site_pond(&ctx->site, name);
        if (idx < 0) {
            char hint[200];
            fprintf(stderr, "halostage %s: no pond '%s' in %s%s\n", cmd, name, ctx->site.path,
                    hs_site_pond_hint(&ctx->site, name, hint, sizeof hint));
            return 2;
        }
        p = &ctx->site.ponds[idx];
        pv->crystalliser = p->role == HS_ROLE_CRYSTALLISER;
        if (want_target && !isfinite(pv->target_kg_m3))
            pv->target_kg_m3 = p->density_out_kg_m3;
    }
    merge_pond(&pv->own, p, cli);

    struct hs_hydro_history h;
    int rc = read_history(cmd, ctx, name, &h);
    if (rc != 0)
        return rc;
    if (!isfinite(pv->own.level_m))
        pv->own.level_m = h.depth_m;
    int stored = !isfinite(pv->own.density_kg_m3) && !isfinite(ctx->common->temperature_c);
    if (!isfinite(pv->own.density_kg_m3))
        pv->own.density_kg_m3 = h.density_kg_m3;
    for (int i = 0; i < h.n; i++)
        pv->rates[i] = h.rate[i];
    pv->n_rates = h.n;
    pv->deposited_salt_t = h.deposited_salt_t;
    double t_c = isfinite(ctx->common->temperature_c) ? ctx->common->temperature_c
                                                       : h.temperature_c;
    if (!isfinite(t_c))
        t_c = ctx->common->fallback_temperature_c;
    if (!isfinite(t_c)) {
        fprintf(stderr, "halostage %s: %s: the brine temperature is unknown "
                        "(no state in the store; give --temperature)\n", cmd, pv->label);
        return 2;
    }
    rc = hs_hopt_pond_finish(cmd, pv->label, &pv->own);
    if (rc != 0)
        return 2;
    rc = pick_feed(cmd, ctx, p, &pv->model.feed);
    if (rc == 0)
        rc = build_model(cmd, t_c, &pv->model);
    if (rc != 0)
        return rc;

    double modulus = ctx->site_loaded && isfinite(ctx->site.site.baume_modulus)
                         ? ctx->site.site.baume_modulus
                         : DEFAULT_MODULUS;
    hc_status st = hc_path_state_from_density(pv->model.path, pv->own.density_kg_m3, t_c,
                                              ctx->t_ref_c, modulus, &pv->state);
    if (st != HC_OK) {
        fprintf(stderr, "halostage %s: %s: density %g kg/m3 at %g degC: %s\n", cmd, pv->label,
                pv->own.density_kg_m3, t_c, hc_status_text(st));
        return 1;
    }
    if (isfinite(pv->target_kg_m3)) {
        unsigned w = 0;
        double cf;
        st = hc_path_cf_at_density(pv->model.path, pv->target_kg_m3, ctx->t_ref_c, &cf, &w);
        if (st == HC_OK && !(w & (HC_WARN_BELOW_FEED | HC_WARN_BEYOND_PATH)))
            pv->cf_target = cf;
        else
            fprintf(stderr, "halostage %s: %s: target %g kg/m3 at %g degC is not on the "
                            "feed's evaporation path\n",
                    cmd, pv->label, pv->target_kg_m3, ctx->t_ref_c);
    }
    /* One stage computation: for the brine the daemon stored, its stage is
     * the daemon's (the state every outlet shows), not a second lookup. */
    hs_state_row row;
    if (stored && ctx->store != NULL && hs_store_latest_state(ctx->store, name, &row) == 0 &&
        row.state.stage != HC_STAGE_NONE) {
        pv->state.stage = row.state.stage;
        pv->state.next_stage = row.state.next_stage;
    }
    if (pv->state.next_stage != HC_STAGE_NONE)
        pv->cf_next_stage = hc_path_stage_cf(pv->model.path, pv->state.next_stage);
    return 0;
}

void hs_hcli_pond_view_free(struct hs_hcli_pond_view *pv)
{
    hs_hopt_pond_free(&pv->own);
    hs_brine_curve_free(&pv->model.curve);
    hc_path_free(pv->model.path);
    pv->model.path = NULL;
}

json_t *hs_hcli_state_json(const struct hs_hcli_pond_view *pv)
{
    json_t *o = hp_state_to_json(&pv->state);
    if (o == NULL)
        return NULL;
    int rc = json_object_set_new(o, "pond", pv->name[0] ? json_string(pv->name) : json_null());
    rc |= json_object_set_new(o, "target_density_kg_m3",
                              isfinite(pv->target_kg_m3) ? json_real(pv->target_kg_m3)
                                                         : json_null());
    rc |= json_object_set_new(o, "target_concentration_factor",
                              isfinite(pv->cf_target) ? json_real(pv->cf_target) : json_null());
    rc |= json_object_set_new(o, "feed", json_string(pv->model.feed.name));
    if (rc != 0) {
        json_decref(o);
        return NULL;
    }
    return o;
}
