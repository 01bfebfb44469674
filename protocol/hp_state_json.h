/* JSON form of a brine state (jansson). Used by `halostage calc` and, as
 * the brine part of the pond-state document, by every pond-state outlet,
 * so they all agree.
 *
 * Error convention: returns NULL when jansson cannot allocate; no errno. */
#ifndef HP_STATE_JSON_H
#define HP_STATE_JSON_H

#include <jansson.h>

#include "hc_state.h"

/* A new JSON object for *state; the caller owns the new reference
 * (json_decref). Numbers that are NaN or infinite become null; stage,
 * next_stage and method are names (a stage of HC_STAGE_NONE is null);
 * `saturation_index` holds only minerals whose index is known (finite);
 * `warnings` is an array of warning names (hc_warning_name), lowest bit
 * first. Besides the core brine fields it carries `baume_modulus`, because
 * a degree Baume means nothing without its modulus, and the standard
 * uncertainties (k = 1) of density, SG, Baume and CF
 * (`density_uncertainty_kg_m3`, `specific_gravity_uncertainty`,
 * `baume_uncertainty`, `concentration_factor_uncertainty`; null when not
 * known), propagated through the method (calc/hc_uncertainty.h). */
json_t *hp_state_to_json(const hc_brine_state *state);

#endif
