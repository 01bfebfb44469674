/* `halostage chain`: from the latest pond states in the history, a
 * day-by-day schedule of transfers for the whole chain, and what every
 * pond would do meanwhile (hs_chain.h says what the rule optimises). The
 * evaporation is, in order: --evaporation-mm-day (fresh water, every pond);
 * the Penman open-water estimate from --air-min/--air-max/--humidity/--wind
 * and --solar or --sunshine; else each pond's recent achieved net rate from
 * the store. Every pond's rate is scaled by its brine's water activity
 * (Salhotra et al. 1985) as it concentrates. Advice only. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "cli/hydro_cli.h"
#include "hc_balance.h"
#include "hc_penman.h"
#include "hs_chain.h"
#include "hs_chain_json.h"
#include "hs_chain_plan.h"
#include "hs_chain_site.h"
#include "hs_feed_model.h"
#include "hs_hydro_brine.h"
#include "hs_hydro_store.h"
#include "hs_weather.h"

#define CMD "chain"
#define DEFAULT_DAYS 7

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage chain --config FILE [--days N] [--evaporation-mm-day X]\n"
            "                       [--rain-mm DAY:MM,...] [--json] [OPTIONS]\n"
            "\n"
            "A day-by-day schedule of transfers for the whole chain, from the latest\n"
            "pond states in the history: per day and transfer the volume and pumping\n"
            "hours; per day and pond the level, density at the reference temperature,\n"
            "degree Baume, stage and the limits it would break. Advice only: it never\n"
            "runs a pump. Check it against the ponds before acting on it.\n"
            "\n"
            "  --config FILE            site configuration (its store gives the states)\n"
            "  --days N                 days to plan, 1..366 (default 7)\n"
            "  --evaporation-mm-day X   fresh-water evaporation, every pond [mm/day]\n"
            "  --rain-mm DAY:MM,...     rain on given days (day 1 is today)\n"
            "  --air-min C --air-max C --humidity RH --wind M_S (--solar MJ_M2 | --sunshine H)\n"
            "                           the day's weather: Penman open-water evaporation\n"
            "  --humidity RH            air relative humidity 0..1 (brine factor)\n"
            "  --default-flow M3_H      pump flow where none is configured (default 500)\n"
            "  --harvest-depth M        crystalliser salt depth to harvest at (default 0.10)\n"
            "  --no-sea-intake          do not top the intake up from the sea\n"
            "  --reference-temperature DEGC   for densities and degree Baume\n"
            "  --json                   the schedule as one JSON object\n");
}

struct request {
    struct hs_hcli_common common;
    int days, sea;
    double evap, humidity, flow, harvest;
    double air_min, air_max, wind, solar, sunshine;
    double rain[HS_CHAIN_MAX_DAYS];
    const char *rain_text;
};

static int parse_rain(struct request *rq)
{
    char buf[4096];
    snprintf(buf, sizeof buf, "%s", rq->rain_text);
    char *save = NULL;
    for (char *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        char *end;
        long day = strtol(tok, &end, 10);
        double mm = NAN;
        if (*end == ':')
            mm = strtod(end + 1, &end);
        if (*end != '\0' || day < 1 || day > rq->days || !(mm >= 0) || !isfinite(mm)) {
            fprintf(stderr, "halostage " CMD ": --rain-mm: '%s' is not DAY:MM with DAY in "
                            "1..%d and MM >= 0\n", tok, rq->days);
            return 2;
        }
        rq->rain[day - 1] += mm;
    }
    return 0;
}

static int parse(int argc, char **argv, struct request *rq)
{
    memset(rq, 0, sizeof *rq);
    hs_hcli_common_init(&rq->common);
    rq->days = DEFAULT_DAYS;
    rq->sea = 1;
    rq->evap = rq->humidity = rq->air_min = rq->air_max = rq->wind = NAN;
    rq->solar = rq->sunshine = NAN;
    rq->flow = HS_CHAIN_DEFAULT_FLOW_M3_H;
    rq->harvest = HS_CHAIN_DEFAULT_HARVEST_M;
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
        if (strcmp(a, "--no-sea-intake") == 0) {
            rq->sea = 0;
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
        if (rc < 0)
            return 2;
        if (rc > 0)
            continue;
        if (strcmp(a, "--rain-mm") == 0) {
            rq->rain_text = v;
            continue;
        }
        double *num = NULL, days = NAN;
        if (strcmp(a, "--days") == 0)
            num = &days;
        else if (strcmp(a, "--evaporation-mm-day") == 0)
            num = &rq->evap;
        else if (strcmp(a, "--humidity") == 0)
            num = &rq->humidity;
        else if (strcmp(a, "--default-flow") == 0)
            num = &rq->flow;
        else if (strcmp(a, "--harvest-depth") == 0)
            num = &rq->harvest;
        else if (strcmp(a, "--air-min") == 0)
            num = &rq->air_min;
        else if (strcmp(a, "--air-max") == 0)
            num = &rq->air_max;
        else if (strcmp(a, "--wind") == 0)
            num = &rq->wind;
        else if (strcmp(a, "--solar") == 0)
            num = &rq->solar;
        else if (strcmp(a, "--sunshine") == 0)
            num = &rq->sunshine;
        else {
            fprintf(stderr, "halostage " CMD ": unknown option '%s' (see --help)\n", a);
            return 2;
        }
        int nrc = hs_cli_number(CMD, a, v, num);
        if (nrc != 0)
            return HS_CLI_EXIT(nrc);
        if (num == &days) {
            if (days < 1 || days > HS_CHAIN_MAX_DAYS || days != floor(days)) {
                fprintf(stderr, "halostage " CMD ": --days must be a whole number 1..%d\n",
                        HS_CHAIN_MAX_DAYS);
                return 2;
            }
            rq->days = (int)days;
        }
    }
    if (rq->common.config_path == NULL) {
        fprintf(stderr, "halostage " CMD ": --config FILE is needed (ponds, transfers, store)\n");
        return 2;
    }
    if (isfinite(rq->humidity) && (rq->humidity < 0 || rq->humidity >= 1)) {
        fprintf(stderr, "halostage " CMD ": --humidity must be in 0..1 (a fraction, not %%)\n");
        return 2;
    }
    if (!(rq->flow > 0) || !(rq->harvest > 0) || (isfinite(rq->evap) && rq->evap < 0)) {
        fprintf(stderr, "halostage " CMD ": --default-flow and --harvest-depth must be positive, "
                        "--evaporation-mm-day not negative\n");
        return 2;
    }
    if (rq->rain_text != NULL)
        return parse_rain(rq);
    return 0;
}

/* The Penman estimate when the weather options are all there: 1, 0 when
 * none was given, -1 (printed) when some are missing or wrong. */
static int penman(const struct request *rq, const hs_site *site, double *e_mm)
{
    int any = isfinite(rq->air_min) || isfinite(rq->air_max) || isfinite(rq->wind) ||
              isfinite(rq->solar) || isfinite(rq->sunshine);
    if (!any)
        return 0;
    time_t now = time(NULL);
    struct tm tm;
    gmtime_r(&now, &tm);
    hc_weather_day w = {rq->air_min, rq->air_max, rq->humidity, rq->wind, rq->solar,
                        rq->sunshine, site->site.latitude_deg, tm.tm_yday + 1,
                        site->site.elevation_m};
    hc_penman_result r;
    hc_status st = hc_penman_open_water(&w, &r);
    if (st != HC_OK) {
        fprintf(stderr, "halostage " CMD ": Penman evaporation needs --air-min, --air-max, "
                        "--humidity, --wind and --solar (or --sunshine): %s\n",
                hc_status_text(st));
        return -1;
    }
    *e_mm = r.evaporation_mm_day;
    return 1;
}

static void print_evaporation(const struct hs_chain_evaporation *ev)
{
    if (isfinite(ev->penman_mm_day))
        printf("Penman open-water evaporation (Shuttleworth 1993; FAO-56 terms): %.2f mm/day%s\n",
               ev->penman_mm_day, strcmp(ev->source, "weather") == 0
                                      ? " from the latest complete day of the site's weather"
                                      : "");
    if (ev->fit.pairs > 0)
        printf("fit to the achieved net evaporation: factor %.3f, rms %.2f mm/day, R2 %.2f "
               "(%d pond-days)%s\n", ev->fit.factor, ev->fit.rms_mm_day, ev->fit.r2,
               ev->fit.pairs, ev->calibrated ? ", applied" : "");
    else if (ev->weather_days > 0)
        printf("fit to the achieved net evaporation: none yet (no overlapping days)\n");
}

static void print_text(const struct hs_chain_input *in, const struct hs_chain_result *r,
                       const char *source)
{
    printf("chain schedule, %d days from the latest states; evaporation: %s; densities at "
           "%.1f degC\n", r->days, source, in->t_ref_c);
    printf("advice only: check levels and densities on the ground before moving brine.\n");
    for (int d = 1; d <= r->days; d++) {
        printf("\nday %d%s\n", d, in->rain_mm && in->rain_mm[d - 1] > 0 ? " (rain)" : "");
        for (size_t l = 0; l < r->n_links; l++) {
            const struct hs_chain_link_day *x = hs_chain_ld(r, d, l);
            char why[256];
            hs_transfer_reasons_format(x->reasons & ~(unsigned)HS_XR_TRIGGER_MET, why, sizeof why);
            if (x->advice == HS_ADVICE_RUN)
                printf("  %-20s run %9.0f m3 %5.1f h  -> %.1f kg/m3\n", in->links[l].name,
                       x->volume_m3, x->hours, x->mix_density_ref_kg_m3);
            else
                printf("  %-20s %-7s %s\n", in->links[l].name, hs_advice_name(x->advice), why);
        }
        for (size_t i = 0; i < r->n_ponds; i++) {
            const struct hs_chain_pond_day *p = hs_chain_pd(r, d, i);
            char lim[128];
            hs_chain_limits_format(p->limits, lim, sizeof lim);
            printf("  pond %-10s %6.3f m %7.1f kg/m3 %5.1f Be  %-17s", in->ponds[i].name,
                   p->level_m, p->density_ref_kg_m3, p->baume, hc_stage_name((hc_stage)p->stage));
            if (in->ponds[i].role == HS_ROLE_CRYSTALLISER)
                printf(" salt %.3f m", p->salt_depth_m);
            printf("%s%s", lim[0] ? "  LIMIT " : "", lim);
            printf("%s%s\n", p->alarms[0] ? "  alarms " : "", p->alarms);
        }
    }
    printf("\n");
    int broken = 0;
    for (int d = 1; d <= r->days; d++)
        for (size_t i = 0; i < r->n_ponds; i++) {
            const struct hs_chain_pond_day *p = hs_chain_pd(r, d, i);
            if (!p->limits)
                continue;
            char lim[128];
            hs_chain_limits_format(p->limits, lim, sizeof lim);
            if (!broken++)
                printf("limits the schedule does not keep:\n");
            printf("  day %-3d %-10s %-16s %s\n", d, in->ponds[i].name, lim, p->why);
        }
    for (size_t i = 0; i < r->n_ponds; i++)
        if (in->ponds[i].role == HS_ROLE_CRYSTALLISER) {
            if (r->harvest_day[i] >= 0)
                printf("harvest: %s reaches %.2f m of salt on day %d\n", in->ponds[i].name,
                       in->ponds[i].harvest_depth_m, r->harvest_day[i]);
            else
                printf("harvest: %s does not reach %.2f m of salt within %d days\n",
                       in->ponds[i].name, in->ponds[i].harvest_depth_m, r->days);
        }
    if (r->bittern_m3 > 0)
        printf("bittern: %.0f m3 at %.1f Be\n", r->bittern_m3, r->bittern_baume);
    else
        printf("bittern: none\n");
    double wr, ir;
    hs_chain_balance_residuals(in, r, &wr, &ir);
    printf("balance: evaporated %.0f t, rain %.0f t, sea intake %.0f m3; residual water %.1e, "
           "ions %.1e (relative)\n", r->evaporated_kg / 1000, r->rain_kg / 1000, r->sea_in_m3, wr, ir);
}

int hs_cmd_chain(int argc, char **argv)
{
    struct request rq;
    int rc = parse(argc, argv, &rq);
    if (rc != 0)
        return rc == 3 ? 0 : rc;
    struct hs_hcli_context ctx;
    rc = hs_hcli_open(CMD, &rq.common, &ctx);
    if (rc != 0)
        return rc;
    struct hs_chain_options o;
    hs_chain_options_default(&o, ctx.t_ref_c);
    o.days = rq.days;
    o.evaporation_mm_day = rq.evap;
    o.relative_humidity = rq.humidity;
    o.default_flow_m3_h = rq.flow;
    o.harvest_depth_m = rq.harvest;
    o.sea_fill = rq.sea;
    o.rain_mm = rq.rain;
    if (penman(&rq, &ctx.site, &o.penman_mm_day) < 0) {
        hs_hcli_close(&ctx);
        return 2;
    }
    struct hs_chain_plan plan;
    char err[512];
    int64_t now = (int64_t)time(NULL) * 1000;
    rc = 1;
    if (hs_chain_plan_make(&ctx.site, NULL, ctx.store, now, &o, &plan, err, sizeof err) != 0) {
        fprintf(stderr, "halostage " CMD ": %s\n", err);
        hs_hcli_close(&ctx);
        return 1;
    }
    if (rq.common.json) {
        json_t *j = hs_chain_plan_json(&plan, ctx.site.site.name, now);
        char *text = j ? json_dumps(j, JSON_COMPACT | JSON_REAL_PRECISION(10)) : NULL;
        json_decref(j);
        if (text == NULL) {
            fprintf(stderr, "halostage " CMD ": out of memory\n");
            goto done;
        }
        puts(text);
        free(text);
    } else {
        print_evaporation(&plan.evaporation);
        print_text(&plan.in, &plan.result, plan.evaporation.source);
    }
    rc = 0;
done:
    hs_chain_plan_free(&plan);
    hs_hcli_close(&ctx);
    return rc;
}
