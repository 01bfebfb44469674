/* The evaporation path as the hydrology's brine curve (hc_brine_curve.h). */
#include "hc_minerals.h"
#include "hc_path_private.h"

/* Returns the number of rows hc_path_curve fills. */
size_t hc_path_curve_rows(const hc_path *path)
{
    return path->rising_count;
}

/* Returns HC_OK, or HC_ERR_ARGUMENT when n is not hc_path_curve_rows(path)
 * or the path is not fractional. */
hc_status hc_path_curve(const hc_path *path, size_t n, double *cf, double *density_kg_m3,
                        double *dissolved, double *deposited, double *water_activity,
                        hc_brine_curve *curve)
{
    if (n != path->rising_count || n < 2 || path->mode != HC_PATH_FRACTIONAL)
        return HC_ERR_ARGUMENT;
    double kg_per_mol[HC_MINERAL_COUNT];
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        kg_per_mol[m] = hc_mineral_molar_mass((hc_mineral)m);
    double per_feed_water = 1.0 / path->feed.water_mass_fraction;
    for (size_t k = 0; k < n; k++) {
        const hc_path_point *p = &path->points[path->rising[k]];
        cf[k] = p->concentration_factor;
        density_kg_m3[k] = p->density_kg_m3;
        dissolved[k] = hc_solute_g_per_kg_water(p->molality) / 1000.0;
        double dep = 0.0;
        for (int m = 0; m < HC_MINERAL_COUNT; m++)
            dep += p->precipitated[m] * per_feed_water * kg_per_mol[m];
        deposited[k] = dep;
        water_activity[k] = p->water_activity;
    }
    curve->n = n;
    curve->cf = cf;
    curve->density_kg_m3 = density_kg_m3;
    curve->dissolved_kg_per_kg_water = dissolved;
    curve->deposited_kg_per_kg_feed_water = deposited;
    curve->water_activity = water_activity;
    return HC_OK;
}
