/* `halostage forecast`: for a pond, its depth, volume and salt, the net
 * evaporation it achieves, and how many days until it reaches its target
 * density and the next precipitation stage, as a range.
 *
 * Inputs come from the configuration and the store (the daemon's latest
 * state and its daily net evaporation), and any of them can be given on the
 * command line instead, so the command also works without either:
 *   halostage forecast --level 0.62 --density 1112 --temperature 24 \
 *       --area 40000 --side-slope 3 --rate-mm-day 6 --rate-spread 1 \
 *       --target-density 1210
 * The forecast itself is hc_forecast: the pond left closed, evaporating at
 * the recent net rate (slowed as the brine's water activity falls when the
 * air's humidity is known), along the site feed's evaporation path. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "cli/hydro_cli.h"
#include "cli/hydro_opts.h"
#include "hs_hydro.h"
#include "hs_hydro_brine.h"
#include "hs_hydro_json.h"

#define CMD "forecast"

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage forecast --config FILE [--pond NAME] [OPTIONS]\n"
            "       halostage forecast --level M --density KG_M3 --temperature DEGC\n"
            "                          (--area M2 [--side-slope S] | --stage-storage CSV)\n"
            "                          --rate-mm-day E [OPTIONS]\n"
            "\n"
            "Days until a pond reaches its target density and its next precipitation\n"
            "stage, from the recent net evaporation and its day-to-day spread, along\n"
            "the feed's evaporation path. The pond is taken as left closed (no\n"
            "transfers). Options given here replace what the configuration or the\n"
            "store would give.\n"
            "\n"
            "  --config FILE            site configuration (ponds, geometry, targets, feed)\n"
            "  --pond NAME              one pond (default: every pond of the config)\n"
            "  --level M                brine depth above the pond floor [m]\n"
            "  --density KG_M3          brine density at --temperature [kg/m3]\n"
            "  --temperature DEGC       brine temperature [degC]\n"
            "  --area M2                floor area [m2] ...\n"
            "  --side-slope S           ... with dikes sloped S horizontal per 1 vertical\n"
            "  --crest M                dike crest above the floor [m] (default 10)\n"
            "  --stage-storage CSV      or a level_m,volume_m3[,area_m2] table\n"
            "  --rate-mm-day E          net evaporation [mm/day]\n"
            "  --rate-spread S          its day-to-day spread (one s.d.) [mm/day]\n"
            "  --target-density KG_M3   target at the reference temperature [kg/m3]\n"
            "  --target-cf CF           or a target concentration factor (against the feed)\n"
            "  --reference-temperature DEGC   for the target density (default 15)\n"
            "  --humidity RH            air relative humidity 0..1: slow the rate as the\n"
            "                           brine's water activity falls (Salhotra et al. 1985)\n"
            "  --pan-mm-day E           pan evaporation, for the expected brine rate\n"
            "  --feed-salinity SP       feed of reference seawater at S_P (default 35)\n"
            "  --crystalliser           report the salt deposited\n"
            "  --json                   one JSON object per pond\n");
}

struct request {
    struct hs_cli_pond pond;
    struct hs_hcli_common common;
    double rate_mm_day, rate_spread_mm_day, target_kg_m3, target_cf, humidity, pan_mm_day;
    int crystalliser;
    const char *only_pond;
};

/* 0 ok, 2 usage (printed), 3 help shown. */
static int parse(int argc, char **argv, struct request *rq)
{
    hs_hopt_pond_init(&rq->pond, "");
    hs_hcli_common_init(&rq->common);
    rq->rate_mm_day = rq->rate_spread_mm_day = rq->target_kg_m3 = rq->target_cf = NAN;
    rq->humidity = rq->pan_mm_day = NAN;
    rq->crystalliser = 0;
    rq->only_pond = NULL;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            usage(stdout);
            return 3;
        }
        if (strcmp(a, "--json") == 0) {
            rq->common.json = 1;
            continue;
        }
        if (strcmp(a, "--crystalliser") == 0) {
            rq->crystalliser = 1;
            continue;
        }
        if (strncmp(a, "--", 2) != 0) {
            fprintf(stderr, "halostage " CMD ": unexpected argument '%s' (see --help)\n", a);
            return 2;
        }
        const char *v = hs_cli_value(CMD, argc, argv, &i);
        if (v == NULL)
            return 2;
        int rc = hs_hcli_common_option(CMD, &rq->common, a, v);
        if (rc == 0)
            rc = hs_hopt_pond_option(CMD, a, &rq->pond, a + 2, v);
        if (rc != 0) {
            if (rc < 0)
                return 2;
            continue;
        }
        double *num = NULL;
        if (strcmp(a, "--rate-mm-day") == 0)
            num = &rq->rate_mm_day;
        else if (strcmp(a, "--rate-spread") == 0)
            num = &rq->rate_spread_mm_day;
        else if (strcmp(a, "--target-density") == 0)
            num = &rq->target_kg_m3;
        else if (strcmp(a, "--target-cf") == 0)
            num = &rq->target_cf;
        else if (strcmp(a, "--humidity") == 0)
            num = &rq->humidity;
        else if (strcmp(a, "--pan-mm-day") == 0)
            num = &rq->pan_mm_day;
        else if (strcmp(a, "--pond") == 0) {
            rq->only_pond = v;
            continue;
        } else {
            fprintf(stderr, "halostage " CMD ": unknown option '%s' (see --help)\n", a);
            return 2;
        }
        int nrc = hs_cli_number(CMD, a, v, num);
        if (nrc != 0)
            return HS_CLI_EXIT(nrc);
    }
    if (isfinite(rq->humidity) && (rq->humidity < 0 || rq->humidity >= 1)) {
        fprintf(stderr, "halostage " CMD ": --humidity must be in 0..1 (a fraction, not %%)\n");
        return 2;
    }
    if (isfinite(rq->target_cf) && rq->target_cf < 1) {
        fprintf(stderr, "halostage " CMD ": --target-cf must be at least 1 (the feed)\n");
        return 2;
    }
    if (isfinite(rq->target_cf) && isfinite(rq->target_kg_m3)) {
        fprintf(stderr, "halostage " CMD ": give --target-density or --target-cf, not both\n");
        return 2;
    }
    if (isfinite(rq->rate_spread_mm_day) && rq->rate_spread_mm_day < 0) {
        fprintf(stderr, "halostage " CMD ": --rate-spread must not be negative\n");
        return 2;
    }
    if (isfinite(rq->pan_mm_day) && rq->pan_mm_day < 0) {
        fprintf(stderr, "halostage " CMD ": --pan-mm-day must not be negative\n");
        return 2;
    }
    return 0;
}

static void print_days(const char *what, double lo, double mid, double hi)
{
    if (!isfinite(lo) && !isfinite(hi) && isnan(lo) && isnan(hi)) {
        printf("%-24s unknown\n", what);
        return;
    }
    if (lo == 0 && hi == 0) {
        printf("%-24s reached\n", what);
        return;
    }
    char a[32], b[32], c[32];
    snprintf(a, sizeof a, isfinite(lo) ? "%.0f" : "never", lo);
    snprintf(b, sizeof b, isfinite(mid) ? "%.0f" : "never", mid);
    snprintf(c, sizeof c, isfinite(hi) ? "%.0f" : "never", hi);
    printf("%-24s %s days (range %s to %s)\n", what, b, a, c);
}

static void print_text(const struct hs_hcli_pond_view *pv, const struct hs_hydro_report *r)
{
    const hc_brine_state *s = &pv->state;
    if (pv->name[0] != '\0')
        printf("pond %s\n", pv->name);
    printf("%-24s %.3f m, %.0f m3 over %.0f m2\n", "depth, volume, area", r->depth_m,
           r->volume_m3, r->area_m2);
    printf("%-24s %.1f kg/m3 at %.1f degC, CF %.2f, stage %s, next %s\n", "brine",
           s->density_kg_m3, s->temperature_c, s->concentration_factor,
           hc_stage_name(s->stage), hc_stage_name(s->next_stage));
    printf("%-24s %.1f t\n", "dissolved salt", r->dissolved_salt_t);
    if (isfinite(r->deposited_salt_t))
        printf("%-24s %.1f t\n", "salt deposited", r->deposited_salt_t);
    if (isfinite(r->net_evaporation_mm_day))
        printf("%-24s %.2f mm/day (%.2f to %.2f)%s\n", "net evaporation",
               r->net_evaporation_mm_day, r->net_evaporation_low_mm_day,
               r->net_evaporation_high_mm_day,
               r->rate_days > 0 ? " from the store's daily balances" : "");
    else
        printf("%-24s unknown (no history; give --rate-mm-day)\n", "net evaporation");
    if (isfinite(r->expected_evaporation_mm_day))
        printf("%-24s %.2f mm/day (pan x coefficient x water activity)\n",
               "expected evaporation", r->expected_evaporation_mm_day);
    if (isfinite(pv->target_kg_m3) || isfinite(pv->cf_target)) {
        char what[64];
        if (isfinite(pv->target_kg_m3))
            snprintf(what, sizeof what, "to %.1f kg/m3", pv->target_kg_m3);
        else
            snprintf(what, sizeof what, "to CF %.2f", pv->cf_target);
        print_days(what, r->days_to_target_low, r->days_to_target_expected,
                   r->days_to_target_high);
    }
    if (s->next_stage != HC_STAGE_NONE) {
        char what[64];
        snprintf(what, sizeof what, "to %s", hc_stage_name(s->next_stage));
        print_days(what, r->days_to_next_stage_low, r->days_to_next_stage_expected,
                   r->days_to_next_stage_high);
    }
    if (r->density_drift)
        printf("warning: the density sensor disagrees with the water and salt balance "
               "(balance says %.1f kg/m3): check its calibration\n", r->balance_density_kg_m3);
}

static int forecast_one(const struct request *rq, const struct hs_hcli_pond_view *pv)
{
    const struct hs_hcli_model *model = &pv->model;
    struct hs_hydro_config cfg;
    hs_hydro_config_default(&cfg);
    cfg.shape = pv->pond->shape;
    cfg.crystalliser = pv->crystalliser;
    cfg.relative_humidity = rq->humidity;
    cfg.pan_mm_day = rq->pan_mm_day;
    struct hs_hydro h;
    if (hs_hydro_init(&h, &cfg) != 0) {
        fprintf(stderr, "halostage " CMD ": %s: unusable geometry\n", pv->label);
        return 1;
    }
    if (pv->n_rates > 0 || isfinite(pv->deposited_salt_t))
        hs_hydro_seed(&h, pv->rates, pv->n_rates,
                      isfinite(pv->deposited_salt_t) ? 1000 * pv->deposited_salt_t : 0);
    struct hs_hydro_sample smp = {0, pv->pond->level_m, pv->state.density_kg_m3,
                                  pv->state.salinity_g_kg, pv->state.concentration_factor,
                                  pv->state.water_activity};
    if (hs_hydro_sample(&h, &smp, &model->curve.view) != 0) {
        fprintf(stderr, "halostage " CMD ": %s: level %g m is outside the pond's geometry\n",
                pv->label, pv->pond->level_m);
        return 1;
    }
    struct hs_hydro_report r;
    hs_hydro_report(&h, &model->curve.view, pv->cf_target, pv->cf_next_stage, pv->rate_mm_day,
                    pv->rate_spread_mm_day, &r);
    if (!rq->common.json) {
        print_text(pv, &r);
        printf("\n");
        return 0;
    }
    json_t *o = hs_hcli_state_json(pv);
    if (o == NULL || hs_hydro_report_to_json(&r, o) != 0) {
        json_decref(o);
        fprintf(stderr, "halostage " CMD ": out of memory\n");
        return 1;
    }
    char *text = json_dumps(o, JSON_COMPACT | JSON_REAL_PRECISION(10));
    json_decref(o);
    if (text == NULL)
        return 1;
    puts(text);
    free(text);
    return 0;
}

int hs_cmd_forecast(int argc, char **argv)
{
    struct request rq;
    int rc = parse(argc, argv, &rq);
    if (rc != 0) {
        hs_hopt_pond_free(&rq.pond);
        return rc == 3 ? 0 : rc;
    }
    if (rq.common.config_path == NULL && !isfinite(rq.pond.area_m2) &&
        rq.pond.stage_storage[0] == '\0' && !isfinite(rq.pond.density_kg_m3)) {
        fprintf(stderr, "halostage " CMD ": give --config FILE (every pond of the site, from "
                        "its history) or describe one pond by hand (--area, --level, --density, "
                        "--temperature, ...; see --help)\n");
        hs_hopt_pond_free(&rq.pond);
        return 2;
    }
    struct hs_hcli_context ctx;
    rc = hs_hcli_open(CMD, &rq.common, &ctx);
    if (rc != 0) {
        hs_hopt_pond_free(&rq.pond);
        return rc;
    }
    int worst = 0, done = 0;
    for (size_t i = 0; i < hs_hcli_pond_count(&ctx) || (i == 0 && !ctx.site_loaded); i++) {
        struct hs_hcli_pond_view pv;
        const char *name = ctx.site_loaded ? hs_hcli_pond_name(&ctx, i) : "";
        if (rq.only_pond != NULL && ctx.site_loaded && strcmp(name, rq.only_pond) != 0)
            continue;
        rc = hs_hcli_pond_view(CMD, &ctx, name, &rq.pond, 1, rq.target_kg_m3, rq.rate_mm_day,
                               rq.rate_spread_mm_day, &pv);
        if (rc == 0 && isfinite(rq.target_cf)) {
            pv.target_kg_m3 = NAN;
            pv.cf_target = rq.target_cf;
        }
        if (rc == 0) {
            pv.crystalliser = pv.crystalliser || rq.crystalliser;
            rc = forecast_one(&rq, &pv);
        }
        hs_hcli_pond_view_free(&pv);
        if (rc > worst)
            worst = rc;
        done++;
        if (!ctx.site_loaded)
            break;
    }
    if (rq.only_pond != NULL && ctx.site_loaded && done == 0) {
        char hint[200];
        fprintf(stderr, "halostage " CMD ": no pond '%s' in %s%s\n", rq.only_pond,
                rq.common.config_path,
                hs_site_pond_hint(&ctx.site, rq.only_pond, hint, sizeof hint));
        worst = 2;
    }
    hs_hcli_close(&ctx);
    hs_hopt_pond_free(&rq.pond);
    return worst;
}
