/* Hydrology's view of the brine model: the site's evaporation path
 * (hc_path) as a CF-indexed hc_brine_curve for the balance and the
 * forecast, the brine's composition at a density for the transfer planner,
 * and hc_brine_density as the planner's density callback.
 *
 * Error convention: 0 on success, -1 with a message in err on failure;
 * hs_brine_density_cb returns an hc_status. Memory: a curve owns its
 * arrays (hs_brine_curve_free, safe on a zeroed curve). */
#ifndef HS_HYDRO_BRINE_H
#define HS_HYDRO_BRINE_H

#include <stddef.h>

#include "hc_brine_curve.h"
#include "hc_ion.h"
#include "hc_path.h"
#include "hc_status.h"

struct hs_brine_curve {
    hc_brine_curve view;
    double *cf, *density_kg_m3, *dissolved, *deposited, *water_activity;
};

/* Samples every step of the path. Density and the deposit are made
 * non-decreasing (running maximum): the first absorbs the solver's last-digit
 * wiggles on the halite plateau, the second treats solids as staying
 * behind, as they do in a pond chain. The deposit counts each mineral's
 * formula mass including its water of crystallisation, per kg of the
 * feed's water. */
int hs_brine_curve_from_path(const hc_path *path, struct hs_brine_curve *out, char *err,
                             size_t errlen);
void hs_brine_curve_free(struct hs_brine_curve *c);

/* Molar masses of the model's ions [kg/mol], indexed by hc_ion. */
void hs_ion_molar_masses(double mm_kg_mol[HC_ION_COUNT]);

/* The path brine of density rho at t_c: molalities [mol/kg water] and CF.
 * Densities off the path are clamped to its ends and reported in *warnings
 * (may be NULL) with HC_WARN_BELOW_FEED or HC_WARN_BEYOND_PATH. */
hc_status hs_brine_at_density(const hc_path *path, double rho_kg_m3, double t_c,
                              double molality[HC_ION_COUNT], double *cf, unsigned *warnings);

/* hc_density_fn over hc_brine_density; n_ions must be HC_ION_COUNT; ctx unused. */
hc_status hs_brine_density_cb(const double *molality, size_t n_ions, double t_c, void *ctx,
                              double *rho_kg_m3);

#endif
