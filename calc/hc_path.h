/* The evaporation path of a site's feed water: what is dissolved, what has
 * deposited and how saturated each mineral is, from the feed to bischofite.
 *
 * Built once per site (hc_path_build allocates; about 2 ms, see make bench)
 * and then read per sample without allocation (microseconds).
 * Water is removed in steps of 2 % of the remaining liquid water (a
 * geometric grid in ln W); at each step the brine is brought to equilibrium
 * with the minerals by hc_equilibrate (damped Newton on mass action and mass
 * balance; HMW84 Pitzer activities).
 *  - HC_PATH_FRACTIONAL: solids leave the brine as they form, as in a pond
 *    chain where each pond's deposit stays behind.
 *  - HC_PATH_EQUILIBRIUM: solids stay in contact and may redissolve.
 * The onset of each mineral is interpolated between steps from the trend of
 * its saturation index.
 *
 * Quantities: CF = initial water mass / remaining liquid water mass (not a
 * volume ratio). water_removed_fraction = water evaporated / initial water.
 * Precipitated amounts are cumulative, mol per kg of feed solution.
 * Carbonate: the feed's alkalinity is kept and the brine stays open to a
 * fixed CO2 pressure (air, 10^-3.4 atm, unless set); CaCO3 forms as
 * aragonite by default (calcite with HC_MINERALS_CALCITE), which makes the
 * carbonate stage (hc_carbonate.h, hc_minerals.h).
 * Error convention: hc_status (HC_OK = 0). Pure apart from hc_path_build's
 * allocation (freed by hc_path_free). A built path is read-only and may be
 * shared between threads. */
#ifndef HC_PATH_H
#define HC_PATH_H

#include <stddef.h>

#include "hc_brine_curve.h"
#include "hc_calibration.h"
#include "hc_feed.h"
#include "hc_ion.h"
#include "hc_mineral.h"
#include "hc_state.h"
#include "hc_status.h"

typedef enum { HC_PATH_FRACTIONAL, HC_PATH_EQUILIBRIUM } hc_path_mode;

/* Saturation index CaCO3 must reach before it first deposits. Seawater is
 * already supersaturated with aragonite (this model: SI +0.49 at CF 1;
 * surface ocean Omega(aragonite) 3 to 4, from memory) yet deposits none:
 * nucleation needs more. The value places the onset where field brines
 * show it, CF 1.5 to 2 (DOMAIN sec. 7 [S]); it is fitted to that, not a
 * published constant. Once formed, CaCO3 stays at equilibrium. */
#define HC_CACO3_ONSET_SI 0.9

typedef struct hc_path hc_path;

typedef struct {
    double concentration_factor;    /* [1] */
    double water_removed_fraction;  /* evaporated / initial water [1] */
    double molality[HC_ION_COUNT];  /* [mol/kg water]; HCO3/CO3 as speciated at the
                                       path's pCO2, CaCO3(aq) and MgCO3(aq) counted
                                       in Ca, Mg and CO3 */
    double precipitated[HC_MINERAL_COUNT]; /* cumulative [mol per kg feed solution];
                                               equilibrium mode: solids present */
    double saturation_index[HC_MINERAL_COUNT]; /* log10(IAP/K); -HUGE_VAL if an ion is absent */
    double water_activity;          /* [1] */
    double ionic_strength;          /* [mol/kg] */
    double osmotic_coefficient;     /* [1] */
    double density_kg_m3;           /* at the path temperature [kg/m3] */
    double salinity_g_kg;           /* dissolved salts per kg brine [g/kg] */
    double ph;                      /* -log10 a(H+) at the path's pCO2; NaN without alkalinity */
    double alkalinity;              /* carbonate alkalinity [eq/kg water] */
} hc_path_point;

typedef struct {
    hc_mineral mineral;
    double concentration_factor;   /* [1] */
    double water_removed_fraction; /* [1] */
    double density_kg_m3;          /* at the path temperature [kg/m3] */
    double specific_gravity;       /* at 60/60 degF (15.556 degC) [1] */
    double baume;                  /* modulus 145 from that SG [deg Be] */
    double water_activity;         /* [1] */
} hc_path_onset;

/* Options beyond the required arguments; zero-initialise for the defaults. */
typedef struct {
    unsigned mineral_flags; /* HC_MINERALS_* (anhydrite is off by default) */
    double step;            /* ln W step; 0 gives 0.02 */
    double max_cf;          /* stop beyond this CF (1..1e5); 0 gives 2000 */
    double log_p_co2;       /* log10 pCO2 [atm], -8..0; 0 gives HC_LOG_PCO2_AIR (-3.4);
                               1 atm itself cannot be asked for (no pond sees it) */
    double caco3_onset_si;  /* CaCO3 nucleation SI (< 2); 0 gives HC_CACO3_ONSET_SI;
                               negative: plain equilibrium from the feed on */
} hc_path_options;

/* Builds the path of `feed` at t_c [degC]. *out is allocated on success
 * (caller frees with hc_path_free) and untouched on failure.
 * HC_ERR_ARGUMENT (bad mode or options), HC_ERR_TEMPERATURE_RANGE,
 * HC_ERR_NOT_FINITE, HC_ERR_NO_CONVERGENCE (the very first steps fail),
 * HC_ERR_DOMAIN (out of memory), else HC_OK. A path that stops early (the
 * solver failing late) is still returned; hc_path_complete() says so. */
hc_status hc_path_build(const hc_feed *feed, double t_c, hc_path_mode mode, hc_path **out);
hc_status hc_path_build_ex(const hc_feed *feed, double t_c, hc_path_mode mode,
                           const hc_path_options *options, hc_path **out);
void hc_path_free(hc_path *path);

/* Read-only views. */
size_t hc_path_step_count(const hc_path *path);
const hc_path_point *hc_path_step(const hc_path *path, size_t i); /* NULL past the end */
double hc_path_temperature(const hc_path *path);
hc_path_mode hc_path_mode_of(const hc_path *path);
const hc_feed *hc_path_feed(const hc_path *path);
/* 1 when the path reached bischofite. A feed without enough magnesium
 * never does, and a calcium-chloride brine leaves the model's minerals. */
int hc_path_complete(const hc_path *path);
/* Largest amount of `mineral` present at any step [mol per kg feed]. */
double hc_path_max_precipitated(const hc_path *path, hc_mineral mineral);

/* Onsets in order of CF; returns how many there are (copies at most max). */
size_t hc_path_onsets(const hc_path *path, hc_path_onset *out, size_t max);
/* CF at which `stage` begins; NaN when the path never reaches it. */
double hc_path_stage_cf(const hc_path *path, hc_stage stage);
/* Stage at a CF (the latest stage begun) and the next one (HC_STAGE_NONE past bischofite). */
hc_stage hc_path_stage_at_cf(const hc_path *path, double cf, hc_stage *next);

/* The path interpolated (linearly in ln CF) at cf. cf below 1 or beyond the
 * last step is clamped, and *warnings (may be NULL) gets HC_WARN_BELOW_FEED or
 * HC_WARN_BEYOND_PATH. HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, else HC_OK. */
hc_status hc_path_point_at_cf(const hc_path *path, double cf, hc_path_point *out,
                              unsigned *warnings);

/* CF of the path brine whose density at t_c is rho_kg_m3: the first CF
 * that reaches it (past epsomite the model density dips by up to 0.25 %
 * while kainite forms, so a few densities occur twice). Densities below the
 * feed's or above the path's highest give the end CF and a warning bit.
 * HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE, else HC_OK. */
hc_status hc_path_cf_at_density(const hc_path *path, double rho_kg_m3, double t_c, double *cf,
                                unsigned *warnings);

/* Full brine state of the path brine at cf, measured at t_c, with the
 * specific gravity at t_ref_c/t_ref_c and degree Baume of modulus
 * baume_modulus (145 for the US scale). method is left HC_METHOD_COMPOSITION.
 * HC_ERR_NOT_FINITE, HC_ERR_ARGUMENT (modulus <= 0), HC_ERR_TEMPERATURE_RANGE,
 * else HC_OK. */
hc_status hc_path_state_from_cf(const hc_path *path, double cf, double t_c, double t_ref_c,
                                double baume_modulus, hc_brine_state *out);
/* The same from a density at t_c (method HC_METHOD_DENSITY_INPUT; callers
 * with a densitometer or hydrostatic pair set their own method). */
hc_status hc_path_state_from_density(const hc_path *path, double rho_kg_m3, double t_c,
                                     double t_ref_c, double baume_modulus,
                                     hc_brine_state *out);
/* The same from conductivity: through the site calibration when cal is not
 * NULL (HC_METHOD_SITE_CALIBRATION), else through hc_brine_conductivity
 * (HC_METHOD_BRINE_CONDUCTIVITY, HC_WARN_BRINE_MODEL). From 90 % of the
 * halite-onset CF on, HC_WARN_CONDUCTIVITY_WEAK and HC_WARN_DENSITY_PREFERRED. */
hc_status hc_path_state_from_conductivity(const hc_path *path, double cond_ms_cm, double t_c,
                                          double t_ref_c, double baume_modulus,
                                          const hc_calibration *cal, hc_brine_state *out);

/* Conductivity [mS/cm] of the path brine at cf and t_c [degC] by the
 * built-in brine model as hc_path_state_from_conductivity inverts it:
 * hc_brine_conductivity anchored to PSS-78 at S_P 42 (scaled to PSS-78's
 * conductivity there, the scale fading linearly in ln CF to none at twice
 * that CF), so that readings crossing S_P 42 move the state continuously.
 * HC_ERR_* of hc_path_point_at_cf and hc_brine_conductivity, else HC_OK. */
hc_status hc_path_model_conductivity(const hc_path *path, double cf, double t_c,
                                     double *cond_ms_cm);

/* The fractional path as the hydrology's brine curve (hc_brine_curve.h):
 * the points whose density rises (those density lookups use), with CF,
 * density at the path temperature, dissolved salt [kg per kg water],
 * deposit [kg of minerals, water of crystallisation included, per kg of
 * feed water] and water activity. The caller owns the five arrays, each of
 * hc_path_curve_rows(path) doubles; *curve points into them.
 * HC_ERR_ARGUMENT when n differs or the path is in equilibrium mode (its
 * solids can redissolve; a pond chain is fractional), else HC_OK. */
size_t hc_path_curve_rows(const hc_path *path);
hc_status hc_path_curve(const hc_path *path, size_t n, double *cf, double *density_kg_m3,
                        double *dissolved, double *deposited, double *water_activity,
                        hc_brine_curve *curve);

#endif
