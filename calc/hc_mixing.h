/* Mixing brines and planning a transfer between two ponds.
 *
 * Mixing conserves the mass of water and the amount of every ion; the
 * density of the mix comes from its composition through a density model
 * (the caller's, e.g. hc_brine_density), never from averaging densities.
 * The ion set is the caller's: n ions with their molar masses, so this
 * module needs no knowledge of the thermodynamic model's ion list.
 *
 * Units: molality [mol/kg water], molar mass [kg/mol], masses [kg],
 * volumes [m3], density [kg/m3], temperature [degC], level [m].
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure. */
#ifndef HC_MIXING_H
#define HC_MIXING_H

#include <stddef.h>

#include "hc_geometry.h"
#include "hc_status.h"

#define HC_MIX_MAX_IONS 16

/* Density of a brine of the given molalities at t_c; ctx is the caller's. */
typedef hc_status (*hc_density_fn)(const double *molality, size_t n_ions, double t_c, void *ctx,
                                   double *rho_kg_m3);

/* An amount of brine: water and moles of each ion. */
typedef struct {
    size_t n_ions;
    double water_kg;
    double mol[HC_MIX_MAX_IONS];
} hc_brine_amount;

/* The amount in volume v of a brine of density rho and molalities m:
 * brine mass rho v = W (1 + sum m_i M_i), so W = rho v / (1 + sum m_i M_i)
 * and n_i = m_i W. */
hc_status hc_amount_from_volume(const double *molality, const double *molar_mass_kg_mol,
                                size_t n_ions, double v_m3, double rho_kg_m3,
                                hc_brine_amount *out);

/* a + b (water and each ion add). */
hc_status hc_amount_mix(const hc_brine_amount *a, const hc_brine_amount *b, hc_brine_amount *out);

/* Molalities n_i / W and the total mass W (1 + sum m_i M_i). */
hc_status hc_amount_molality(const hc_brine_amount *a, const double *molar_mass_kg_mol,
                             double *molality, double *mass_kg);

/* One pond in a plan. */
typedef struct {
    const hc_pond_shape *shape;
    double level_m;          /* now */
    const double *molality;  /* n_ions values */
    double density_kg_m3;    /* measured now, at t_c */
    double min_level_m;      /* interlock: pump must not draw below; NaN: none */
    double max_level_m;      /* interlock: must not fill above; NaN: none */
    double band_low_kg_m3;   /* interlock: density band; NaN: none */
    double band_high_kg_m3;
} hc_plan_pond;

/* Interlock findings, as bits. */
enum {
    HC_PLAN_SOURCE_BELOW_MIN = 1u << 0, /* source would fall below its minimum level */
    HC_PLAN_DEST_ABOVE_MAX = 1u << 1,   /* destination would rise above its maximum level */
    HC_PLAN_DEST_OUT_OF_BAND = 1u << 2, /* the mix leaves the destination's density band */
    HC_PLAN_SOURCE_SHORT = 1u << 3,     /* the source holds less brine than needed */
    HC_PLAN_UNREACHABLE = 1u << 4       /* no volume of the source gives the target */
};

typedef struct {
    const hc_plan_pond *source;
    const hc_plan_pond *dest;
    size_t n_ions;
    const double *molar_mass_kg_mol;
    double t_c;
    hc_density_fn density;
    void *density_ctx;
    double target_density_kg_m3;
    double tolerance_kg_m3; /* bisection stops within this of the target (e.g. 0.01) */
} hc_plan_input;

typedef struct {
    double volume_m3;              /* source brine to move */
    double mix_density_kg_m3;      /* destination density after mixing, from composition */
    double mix_molality[HC_MIX_MAX_IONS];
    double source_level_after_m;
    double dest_level_after_m;
    double dest_volume_after_m3;   /* mix mass / mix density at t_c */
    double mix_mass_kg;            /* brine in the destination after mixing */
    unsigned interlocks;           /* HC_PLAN_* bits */
} hc_plan_result;

/* Finds the volume of source brine that, mixed into the destination,
 * gives the target density (bisection on the volume; the mix density is
 * monotone between the two brines' densities). The levels after come from
 * each pond's shape. HC_OK with interlock bits when a limit would be
 * crossed (the volume is still what the target needs); HC_ERR_DOMAIN with
 * HC_PLAN_UNREACHABLE when the target does not lie between the two
 * densities (then every figure of out is NaN). */
hc_status hc_plan_transfer(const hc_plan_input *in, hc_plan_result *out);

#endif
