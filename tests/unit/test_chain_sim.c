/* Prediction test: the chain schedule against the pond-chain simulator.
 * The simulator's model (tests/sim/sim_model.c, compiled in so that it can
 * be stepped without its Modbus servers) runs 3 simulated days with every
 * pump off; each pond's achieved net evaporation is its depth change, as
 * the daemon's balance would find it. From the simulator's state then, the
 * chain plans 7 days (with the simulator's known rain as the forecast);
 * the simulator then runs those 7 days with its pump coils switched by the
 * schedule (on at the start of each day for the scheduled hours: actuated
 * in the simulator only), and each pond's level and density at the
 * reference temperature are compared with the prediction at the end of
 * every day. Goal: level within 2 cm, density within 3 kg/m3 (a
 * tolerance set for this project, no source). The simulator's physics are
 * simpler and partly different (evaporation by depth, mixing by volume):
 * the errors measure how far the chain's model carries, and are printed. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "../sim/sim_model.c"

#include "hs_chain.h"
#include "hs_chain_site.h"
#include "hs_config.h"

#define DAY_S 86400.0
#define STEP_S 60.0
#define LEVEL_GOAL_M 0.02
#define DENSITY_GOAL_KG_M3 3.0

/* Four ponds with vertical walls (the simulator's geometry), each transfer
 * at the simulator's pump rate: 50 mm of source depth an hour, i.e. 0.05 m/h
 * times the source's floor area. Bands are narrow so that triggers fire
 * within the week. */
static const char *site_text =
    "[site]\nname = sim-chain\nlatitude = 37.5\nreference_temperature = 20 C\n"
    "baume_modulus = 145\n"
    "[bus plc]\ntype = tcp\nhost = 127.0.0.1\nport = 1502\n"
    "[pond c3]\nrole = concentrator\nnext = store\ndensity_in = 1150 kg/m3\n"
    "density_out = 1166 kg/m3\nlevel_min = 0.15 m\nlevel_max = 0.45 m\nfreeboard = 0.75 m\n"
    "area = 8 ha\n"
    "[pond store]\nrole = brine-store\nnext = x1\ndensity_in = 1168 kg/m3\n"
    "density_out = 1174 kg/m3\nlevel_min = 0.5 m\nlevel_max = 1.4 m\nfreeboard = 2.0 m\n"
    "area = 2 ha\n"
    "[pond x1]\nrole = crystalliser\nnext = bittern\ndensity_in = 1200 kg/m3\n"
    "density_out = 1236 kg/m3\nlevel_min = 0.1 m\nlevel_max = 0.35 m\nfreeboard = 0.6 m\n"
    "area = 1 ha\n"
    "[pond bittern]\nrole = bittern\ndensity_in = 1230 kg/m3\ndensity_out = 1320 kg/m3\n"
    "level_min = 0.2 m\nlevel_max = 1.5 m\nfreeboard = 2.0 m\narea = 1 ha\n"
    "[signal c3.pump-run]\nbus = plc\naddress = 1\ntype = uint16\n"
    "[signal store.pump-run]\nbus = plc\naddress = 2\ntype = uint16\n"
    "[signal x1.pump-run]\nbus = plc\naddress = 3\ntype = uint16\n"
    "[transfer c3-to-store]\nsource = c3\ndestination = store\nrated_flow = 4000\n"
    "[transfer store-to-x1]\nsource = store\ndestination = x1\nrated_flow = 1000\n"
    "[transfer x1-drain]\nsource = x1\ndestination = bittern\nrated_flow = 500\n";

struct fixture {
    char path[64];
    sim s;
    struct hs_chain_tables tables;
    struct hs_chain_site cs;
};

static int setup(void **state)
{
    struct fixture *f = calloc(1, sizeof *f);
    if (f == NULL)
        return -1;
    snprintf(f->path, sizeof f->path, "/tmp/hs-chain-sim-XXXXXX");
    int fd = mkstemp(f->path);
    if (fd < 0 || write(fd, site_text, strlen(site_text)) != (ssize_t)strlen(site_text))
        return -1;
    close(fd);
    hs_diag *diag = calloc(1, sizeof *diag);
    int rc = diag ? hs_site_load(f->path, &f->s.site, diag) : -1;
    for (unsigned i = 0; diag && rc != 0 && i < diag->n; i++)
        fprintf(stderr, "%s\n", diag->msg[i]);
    free(diag);
    if (rc != 0)
        return -1;
    pthread_mutex_init(&f->s.lock, NULL);
    f->s.seed = 7;
    f->s.sim_time_s = 3 * 3600.0; /* past the simulator's first shower */
    if (sim_model_init(&f->s) != 0)
        return -1;
    char err[256];
    const hc_path *path = hs_paths_for(&f->s.paths, f->s.site.site.feed_index);
    if (!path || hs_chain_tables_from_path(path, 20.0, &f->tables, err, sizeof err) != 0 ||
        hs_chain_site_build(&f->s.site, 500.0, &f->cs, err, sizeof err) != 0) {
        fprintf(stderr, "%s\n", err);
        return -1;
    }
    *state = f;
    return 0;
}

static int teardown(void **state)
{
    struct fixture *f = *state;
    hs_chain_site_free(&f->cs);
    hs_chain_tables_free(&f->tables);
    sim_model_free(&f->s);
    hs_site_free(&f->s.site);
    pthread_mutex_destroy(&f->s.lock);
    unlink(f->path);
    free(f);
    return 0;
}

static void set_pump(sim *s, int pond, int on)
{
    const hs_signal *run = hs_site_signal(&s->site, pond, HS_Q_PUMP_RUN);
    assert_non_null(run);
    sim_device *d = sim_device_find(s, run->bus_index, run->point.unit_id);
    assert_non_null(d);
    d->map->tab_bits[run->point.address] = on ? 1 : 0;
}

/* Steps the simulator for dt seconds in STEP_S steps. */
static void advance(sim *s, double dt)
{
    while (dt > 1e-9) {
        double h = dt < STEP_S ? dt : STEP_S;
        sim_model_step(s, h);
        dt -= h;
    }
}

static double density_ref_of(const struct fixture *f, double cf)
{
    hc_chain_point pt;
    assert_int_equal(hc_chain_point_at(&f->tables.view, cf, &pt), HC_OK);
    return pt.density_ref_kg_m3;
}

static void schedule_follows_simulator_for_7_days(void **state)
{
    struct fixture *f = *state;
    sim *s = &f->s;
    size_t n = s->site.n_ponds;
    /* Three days closed: the achieved net evaporation of every pond. */
    double depth0[8];
    for (size_t i = 0; i < n; i++)
        depth0[i] = s->ponds[i].depth_m;
    advance(s, 3 * DAY_S);
    for (size_t i = 0; i < n; i++) {
        struct hs_chain_pond_in *p = &f->cs.ponds[i];
        double achieved = (depth0[i] - s->ponds[i].depth_m) / 3 * 1000; /* [mm/day] */
        hc_chain_point pt;
        assert_int_equal(hc_chain_point_at(&f->tables.view, s->ponds[i].cf, &pt), HC_OK);
        p->level_m = s->ponds[i].depth_m;
        p->density_ref_kg_m3 = pt.density_ref_kg_m3;
        /* The achieved rate is the brine's; back to fresh water (RH 0). */
        p->evap_fresh_mm_day = achieved / pt.water_activity;
        p->harvest_depth_m = 0.1;
    }
    /* The simulator's shower of hour 240 (8 mm) falls on day 7. */
    double rain[7] = {0, 0, 0, 0, 0, 0, 8.0};
    struct hs_chain_input in = {&f->tables.view, n, f->cs.ponds, f->cs.n_links, f->cs.links,
                                7, rain, NAN, 0, 20.0, 145.0, 2165.0, NULL, NULL, -1};
    struct hs_chain_result r;
    char err[256];
    assert_int_equal(hs_chain_run(&in, &r, err, sizeof err), 0);
    double worst_level = 0, worst_rho = 0, moved = 0;
    for (int d = 1; d <= 7; d++) {
        /* Each transfer's pump on for its scheduled hours from the day's start. */
        double hours[16] = {0};
        for (size_t l = 0; l < r.n_links; l++) {
            hours[l] = hs_chain_ld(&r, d, l)->hours;
            moved += hs_chain_ld(&r, d, l)->volume_m3;
        }
        double done = 0;
        for (;;) {
            double next = DAY_S;
            for (size_t l = 0; l < r.n_links; l++) {
                double off = hours[l] * 3600;
                set_pump(s, f->cs.links[l].source, off > done);
                if (off > done && off < next)
                    next = off;
            }
            advance(s, next - done);
            done = next;
            if (done >= DAY_S)
                break;
        }
        for (size_t i = 0; i < n; i++) {
            const struct hs_chain_pond_day *p = hs_chain_pd(&r, d, i);
            double e_level = fabs(p->level_m - s->ponds[i].depth_m);
            double e_rho = fabs(p->density_ref_kg_m3 - density_ref_of(f, s->ponds[i].cf));
            printf("day %d %-8s level %.4f (sim %.4f)  density %.2f (sim %.2f)\n", d,
                   f->cs.ponds[i].name, p->level_m, s->ponds[i].depth_m, p->density_ref_kg_m3,
                   density_ref_of(f, s->ponds[i].cf));
            worst_level = fmax(worst_level, e_level);
            worst_rho = fmax(worst_rho, e_rho);
        }
    }
    printf("chain vs simulator, 7 days: worst level error %.1f mm, worst density error "
           "%.2f kg/m3; %.0f m3 moved\n", worst_level * 1000, worst_rho, moved);
    assert_true(moved > 0); /* the schedule did pump */
    assert_true(worst_level <= LEVEL_GOAL_M);
    assert_true(worst_rho <= DENSITY_GOAL_KG_M3);
    hs_chain_result_free(&r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(schedule_follows_simulator_for_7_days),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
