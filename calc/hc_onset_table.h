/* Where each precipitation stage begins, as a function of temperature: the
 * onset CF of every stage on evaporation paths built at a few temperatures
 * (for example every 5 degC from 0 to 45), read per sample by linear
 * interpolation in temperature. The gypsum onset of reference seawater moves
 * from CF 2.7 at 0 degC to 4.2 at 45 degC in this model (hc_path), so a
 * summer pond's stage, next stage and days to next stage come from its own
 * temperature, not from the 25 degC path.
 *
 * The brine's composition, density and CF still come from one path (the
 * caller's, usually 25 degC): the table moves only the stage boundaries.
 * Past an onset the composition of paths at other temperatures differs a
 * little (what has deposited differs); that is not modelled here.
 *
 * Memory: the table is plain data (no pointers); hc_onset_table_build
 * allocates only while it builds (each path is built and freed), so reading
 * it never allocates. Error convention: hc_status (HC_OK = 0). */
#ifndef HC_ONSET_TABLE_H
#define HC_ONSET_TABLE_H

#include <stddef.h>

#include "hc_feed.h"
#include "hc_ion.h"
#include "hc_path.h"
#include "hc_state.h"
#include "hc_status.h"

#define HC_ONSET_TABLE_MAX 16

typedef struct {
    size_t n;                                     /* temperatures, 1..HC_ONSET_TABLE_MAX */
    double t_c[HC_ONSET_TABLE_MAX];               /* increasing [degC] */
    double stage_cf[HC_ONSET_TABLE_MAX][HC_STAGE_COUNT]; /* onset CF [1]; NaN never reached */
    /* the onset brine of each stage on that temperature's path [mol/kg water] */
    double molality[HC_ONSET_TABLE_MAX][HC_STAGE_COUNT][HC_ION_COUNT];
} hc_onset_table;

/* Builds the paths of feed at t_c[0..n-1] (increasing, each -2..50 degC;
 * mode and options as hc_path_build_ex; options may be NULL) and keeps
 * their stage onsets. About one path build per temperature (13 to 31 ms
 * each with carbonate, make bench). A temperature whose path fails is
 * left out; HC_ERR_NO_CONVERGENCE when none is left. HC_ERR_ARGUMENT for
 * n == 0, n > HC_ONSET_TABLE_MAX or temperatures not increasing. */
hc_status hc_onset_table_build(const hc_feed *feed, const double *t_c, size_t n,
                               hc_path_mode mode, const hc_path_options *options,
                               hc_onset_table *out);

/* The same from paths already built (each path's own temperature; in
 * increasing order). For tests and for callers that keep the paths. */
hc_status hc_onset_table_from_paths(const hc_path *const *paths, size_t n, hc_onset_table *out);

/* Onset CF of every stage at t_c, linear in temperature between the two
 * table temperatures around it, the end values outside the table. A stage
 * reached at one neighbour only takes that neighbour's CF when t_c is
 * nearer to it, else NaN. */
void hc_onset_table_at(const hc_onset_table *table, double t_c, double stage_cf[HC_STAGE_COUNT]);

/* Stage at cf and t_c (the latest stage begun) and the next one
 * (HC_STAGE_NONE past the last), as hc_path_stage_at_cf does for one path. */
hc_stage hc_onset_table_stage(const hc_onset_table *table, double cf, double t_c, hc_stage *next);

/* Composition of the brine at which `stage` begins at t_c: the onset brines
 * of the two table temperatures around t_c, interpolated linearly.
 * HC_ERR_ARGUMENT when the stage is not reached there, else HC_OK. */
hc_status hc_onset_table_brine(const hc_onset_table *table, hc_stage stage, double t_c,
                               double molality[HC_ION_COUNT]);

/* Sets state->stage, next_stage, next_stage_density_kg_m3 (at
 * state->temperature_c) and next_stage_density_ref_kg_m3 (at
 * state->reference_temperature_c) from the table at the state's own
 * temperature (the next stage's brine as that temperature's paths have
 * it). Leaves the state as it is without a finite CF or temperature. */
void hc_onset_table_restage(const hc_onset_table *table, hc_brine_state *state);

/* Stage judged at the reference temperature by density, as a brine master
 * judges it with a hydrometer: the latest stage whose onset brine at t_ref_c
 * (hc_onset_table_brine) is no denser at t_ref_c than rho_ref_kg_m3.
 * Decisions use this, not a CF (past halite a CF is uncertain).
 * HC_STAGE_NONE without a finite density. */
hc_stage hc_onset_table_stage_ref(const hc_onset_table *table, double rho_ref_kg_m3,
                                  double t_ref_c);

#endif
