/* The evaporation path and brine density as hydrology uses them (see
 * hs_hydro_brine.h). */
#include "hs_hydro_brine.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_minerals.h"

void hs_ion_molar_masses(double mm[HC_ION_COUNT])
{
    for (int i = 0; i < HC_ION_COUNT; i++)
        mm[i] = hc_ion_molar_mass((hc_ion)i) / 1000.0; /* [g/mol] -> [kg/mol] */
}

void hs_brine_curve_free(struct hs_brine_curve *c)
{
    if (c == NULL)
        return;
    free(c->cf);
    free(c->density_kg_m3);
    free(c->dissolved);
    free(c->deposited);
    free(c->water_activity);
    memset(c, 0, sizeof *c);
}

/* Error convention: 0 / -1 with err (see header). */
int hs_brine_curve_from_path(const hc_path *path, struct hs_brine_curve *out, char *err,
                             size_t errlen)
{
    memset(out, 0, sizeof *out);
    size_t n = path != NULL ? hc_path_step_count(path) : 0;
    const hc_feed *feed = path != NULL ? hc_path_feed(path) : NULL;
    if (n < 2 || feed == NULL || !(feed->water_mass_fraction > 0)) {
        snprintf(err, errlen, "evaporation path has too few steps for hydrology");
        return -1;
    }
    struct hs_brine_curve c;
    memset(&c, 0, sizeof c);
    c.cf = calloc(n, sizeof *c.cf);
    c.density_kg_m3 = calloc(n, sizeof *c.density_kg_m3);
    c.dissolved = calloc(n, sizeof *c.dissolved);
    c.deposited = calloc(n, sizeof *c.deposited);
    c.water_activity = calloc(n, sizeof *c.water_activity);
    if (!c.cf || !c.density_kg_m3 || !c.dissolved || !c.deposited || !c.water_activity) {
        hs_brine_curve_free(&c);
        snprintf(err, errlen, "out of memory");
        return -1;
    }
    double mineral_mass[HC_MINERAL_COUNT];
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        mineral_mass[m] = hc_mineral_molar_mass((hc_mineral)m);
    size_t rows = 0;
    for (size_t i = 0; i < n; i++) {
        const hc_path_point *p = hc_path_step(path, i);
        if (p == NULL || !isfinite(p->density_kg_m3) || !isfinite(p->concentration_factor))
            break; /* a path that stopped early: keep what is sound */
        if (rows > 0 && !(p->concentration_factor > c.cf[rows - 1]))
            continue;
        /* Solids per kg of feed solution -> per kg of the feed's water [kg/kg]. */
        double dep = 0;
        for (int m = 0; m < HC_MINERAL_COUNT; m++)
            if (p->precipitated[m] > 0)
                dep += p->precipitated[m] * mineral_mass[m];
        dep /= feed->water_mass_fraction;
        c.cf[rows] = p->concentration_factor;
        c.density_kg_m3[rows] = p->density_kg_m3;
        c.dissolved[rows] = hc_solute_g_per_kg_water(p->molality) / 1000.0;
        c.deposited[rows] = dep;
        c.water_activity[rows] = p->water_activity;
        if (rows > 0) {
            if (c.density_kg_m3[rows] < c.density_kg_m3[rows - 1])
                c.density_kg_m3[rows] = c.density_kg_m3[rows - 1];
            if (c.deposited[rows] < c.deposited[rows - 1])
                c.deposited[rows] = c.deposited[rows - 1];
        }
        rows++;
    }
    c.view = (hc_brine_curve){rows, c.cf, c.density_kg_m3, c.dissolved, c.deposited,
                              c.water_activity};
    size_t bad = 0;
    hc_status st = hc_curve_check(&c.view, &bad);
    if (st != HC_OK) {
        snprintf(err, errlen, "evaporation path unusable for hydrology at step %zu: %s", bad,
                 hc_status_text(st));
        hs_brine_curve_free(&c);
        return -1;
    }
    *out = c;
    return 0;
}

hc_status hs_brine_at_density(const hc_path *path, double rho, double t_c,
                              double molality[HC_ION_COUNT], double *cf, unsigned *warnings)
{
    unsigned w1 = 0, w2 = 0;
    hc_status st = hc_path_cf_at_density(path, rho, t_c, cf, &w1);
    if (st != HC_OK)
        return st;
    hc_path_point p;
    st = hc_path_point_at_cf(path, *cf, &p, &w2);
    if (st != HC_OK)
        return st;
    memcpy(molality, p.molality, sizeof p.molality);
    if (warnings != NULL)
        *warnings = w1 | w2;
    return HC_OK;
}

hc_status hs_brine_density_cb(const double *molality, size_t n_ions, double t_c, void *ctx,
                              double *rho)
{
    (void)ctx;
    if (n_ions != HC_ION_COUNT)
        return HC_ERR_ARGUMENT;
    return hc_brine_density(molality, t_c, rho);
}
