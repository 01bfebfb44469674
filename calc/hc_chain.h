/* One pond of a chain, day by day: its liquid water, the moles of every
 * dissolved ion, the moles deposited on its floor, and a conservative
 * tracer (the feed water the brine came from) whose ratio to the liquid
 * water is the concentration factor CF. Evaporation and rain change the
 * water; transfers move parcels of liquid brine; after each change the
 * brine is brought onto the site's fractional evaporation path: an ion
 * beyond the path's molality at the new CF deposits, and nothing
 * redissolves (a pond chain's deposits stay behind). Every step moves
 * amounts from one account to another, so water and every ion are
 * conserved by construction (to rounding).
 *
 * Approximations: a mix of two brines is placed on the path by its tracer
 * CF (exact for ions that have not deposited; for the others the mix is
 * undersaturated, as mixing a saturated with a less concentrated brine
 * is); water of crystallisation is not taken from the water account (ions
 * only deposit); density comes from the path at the CF.
 *
 * Units: water and masses [kg], amounts [mol], volume [m3], level [m],
 * density [kg/m3], evaporation and rain [mm] over a pond's wetted area.
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure.
 * Pure: no I/O, no allocation; tables belong to the caller. */
#ifndef HC_CHAIN_H
#define HC_CHAIN_H

#include <stddef.h>

#include "hc_geometry.h"
#include "hc_mixing.h"
#include "hc_state.h"
#include "hc_status.h"

/* The site's fractional evaporation path as tables against CF. */
typedef struct {
    size_t n;                          /* rows >= 2, first at CF 1 (the feed) */
    const double *cf;                  /* strictly increasing [1] */
    const double *density_kg_m3;       /* at the ponds' temperature: for volumes */
    const double *density_ref_kg_m3;   /* at the reference temperature: for decisions */
    const double *water_activity;      /* [1] */
    const double *si_halite;           /* saturation index log10(IAP/K); NULL: unknown */
    const double *si_gypsum;           /* the same for gypsum; NULL: unknown */
    size_t n_ions;                     /* <= HC_MIX_MAX_IONS */
    const double *molality;            /* n x n_ions, row-major [mol/kg water] */
    const double *molar_mass_kg_mol;   /* n_ions */
    double stage_cf[HC_STAGE_COUNT];   /* CF at which each stage begins; NaN: never */
} hc_chain_brine;

/* What a pond holds. */
typedef struct {
    double water_kg;                      /* liquid water */
    double feed_water_kg;                 /* tracer: CF = feed_water / water */
    double dissolved_mol[HC_MIX_MAX_IONS];
    double deposited_mol[HC_MIX_MAX_IONS];
} hc_chain_pond;

/* A parcel of liquid brine on its way between ponds. */
typedef struct {
    double water_kg;
    double feed_water_kg;
    double dissolved_mol[HC_MIX_MAX_IONS];
} hc_chain_parcel;

/* The path brine at cf: densities, water activity, molalities (row
 * interpolated linearly in ln CF; clamped to the table's ends). */
typedef struct {
    double cf;
    double density_kg_m3, density_ref_kg_m3, water_activity;
    double si_halite, si_gypsum;       /* NaN when the table has none */
    double molality[HC_MIX_MAX_IONS];
    hc_stage stage;
} hc_chain_point;

hc_status hc_chain_brine_check(const hc_chain_brine *b);
hc_status hc_chain_point_at(const hc_chain_brine *b, double cf, hc_chain_point *out);
/* The latest stage begun at cf (seawater before any). */
hc_stage hc_chain_stage_at(const hc_chain_brine *b, double cf);

/* A pond holding volume v of the path brine of density rho_ref (at the
 * reference temperature), with nothing deposited yet. */
hc_status hc_chain_pond_fill(const hc_chain_brine *b, double v_m3, double rho_ref_kg_m3,
                             hc_chain_pond *out);
/* The feed itself (CF 1): volume v of it as a parcel (the sea intake). */
hc_status hc_chain_feed_parcel(const hc_chain_brine *b, double v_m3, hc_chain_parcel *out);

/* What the pond's liquid looks like: CF, mass, volume, and the path point. */
typedef struct {
    double cf, mass_kg, volume_m3;
    hc_chain_point point;
} hc_chain_view;
hc_status hc_chain_view_of(const hc_chain_brine *b, const hc_chain_pond *p, hc_chain_view *out);
/* The same for a pond with a parcel added (nothing changed). */
hc_status hc_chain_view_with(const hc_chain_brine *b, const hc_chain_pond *p,
                             const hc_chain_parcel *add, hc_chain_view *out);

/* Takes volume v of the pond's liquid brine (deposits stay): every liquid
 * account shrinks by the same fraction v / V. v > V is HC_ERR_DOMAIN. */
hc_status hc_chain_take(const hc_chain_brine *b, hc_chain_pond *p, double v_m3,
                        hc_chain_parcel *out);
void hc_chain_add(hc_chain_pond *p, const hc_chain_parcel *in);

/* Removes evaporated water and adds rain [kg] (evaporation is capped at
 * all but 1e-6 of the water: a pond cannot evaporate dry in this model;
 * *evaporated_kg says what was removed), then deposits what the path says
 * can no longer stay dissolved. */
hc_status hc_chain_weather(const hc_chain_brine *b, hc_chain_pond *p, double evaporate_kg,
                           double rain_kg, double *evaporated_kg);
/* Deposits every ion beyond the path's molality at the pond's CF. */
hc_status hc_chain_settle(const hc_chain_brine *b, hc_chain_pond *p);

/* Mass of the deposits [kg] (ions only). */
double hc_chain_deposit_kg(const hc_chain_brine *b, const hc_chain_pond *p);

#endif
