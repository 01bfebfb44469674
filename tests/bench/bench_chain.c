/* Speed of `halostage chain` on the demo site: a 30-day schedule of the
 * nine ponds and their transfers, (a) everything the command computes
 * (the brine models with their stage onsets every 5 degC, tables, the
 * schedule with the site's alarm rules) and (b) the schedule alone. Ponds
 * start mid-band and mid-level (the store read is left out: bench_store
 * times it). Best of several rounds. Goal: under 1 s. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "hs_chain.h"
#include "hs_chain_site.h"
#include "hs_config.h"
#include "hs_alarm_site.h"
#include "hs_brine_eval.h"

#define ROUNDS 5
#define DAYS 30

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + ts.tv_nsec * 1e-9;
}

/* One schedule; with everything, the setup too. -1 on failure. */
static double once(int everything, hs_site *site, hs_brine_models **models_io,
                   struct hs_chain_tables *tables, struct hs_chain_site *cs)
{
    char err[256];
    double t0 = now_s();
    if (everything) {
        hs_chain_site_free(cs);
        hs_chain_tables_free(tables);
        hs_brine_models_free(*models_io);
        *models_io = NULL;
        if (hs_brine_models_build(site, models_io) != 0)
            return -1;
        const hc_path *path = hs_brine_models_path(*models_io, site->site.feed_index);
        if (hs_chain_tables_from_path(path, 20.0, tables, err, sizeof err) != 0 ||
            hs_chain_site_build(site, 500.0, cs, err, sizeof err) != 0)
            return -1;
        for (size_t i = 0; i < cs->n_ponds; i++) {
            const hs_pond *p = &site->ponds[i];
            cs->ponds[i].level_m = 0.5 * (p->level_min_m + p->level_max_m);
            cs->ponds[i].density_ref_kg_m3 = 0.5 * (p->density_in_kg_m3 + p->density_out_kg_m3);
            cs->ponds[i].evap_fresh_mm_day = 6.0;
            cs->ponds[i].harvest_depth_m = 0.1;
        }
    }
    double rain[DAYS] = {0};
    rain[4] = 15;
    hs_alarm_engine *alarms = hs_alarm_new(1);
    if (alarms == NULL)
        return -1;
    hs_alarm_site_rules(site, alarms);
    struct hs_chain_input in = {&tables->view, cs->n_ponds, cs->ponds, cs->n_links, cs->links,
                                DAYS, rain, 0.6, 1, 20.0, 145.0, 2165.0, alarms, *models_io,
                                site->site.feed_index};
    struct hs_chain_result r;
    int rc = hs_chain_run(&in, &r, err, sizeof err);
    hs_chain_result_free(&r);
    hs_alarm_free(alarms);
    return rc == 0 ? now_s() - t0 : -1;
}

int main(void)
{
    hs_site site;
    hs_diag *diag = calloc(1, sizeof *diag);
    if (diag == NULL || hs_site_load("config/demo.ini", &site, diag) != 0) {
        fprintf(stderr, "bench_chain: config/demo.ini does not load\n");
        return 1;
    }
    free(diag);
    struct hs_chain_tables tables = {0};
    struct hs_chain_site cs = {0};
    hs_brine_models *models = NULL;
    double all = INFINITY, sched = INFINITY;
    for (int k = 0; k < ROUNDS; k++) {
        double a = once(1, &site, &models, &tables, &cs);
        double s = once(0, &site, &models, &tables, &cs);
        if (a < 0 || s < 0) {
            fprintf(stderr, "bench_chain: the schedule failed\n");
            return 1;
        }
        all = fmin(all, a);
        sched = fmin(sched, s);
    }
    printf("chain, demo site, %d days, %zu ponds, %zu transfers:\n", DAYS, cs.n_ponds, cs.n_links);
    printf("  models + tables + schedule: %7.2f ms (goal < 1000 ms)\n", all * 1e3);
    printf("  schedule alone:            %8.2f ms\n", sched * 1e3);
    hs_chain_site_free(&cs);
    hs_chain_tables_free(&tables);
    hs_brine_models_free(models);
    hs_site_free(&site);
    return 0;
}
