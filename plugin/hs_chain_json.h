/* The chain schedule as one JSON document (for `halostage chain --json`
 * and for publishing). Memory: returns a new reference (caller decrefs),
 * NULL when out of memory. */
#ifndef HS_CHAIN_JSON_H
#define HS_CHAIN_JSON_H

#include <jansson.h>

#include "hs_chain.h"

json_t *hs_chain_to_json(const struct hs_chain_input *in, const struct hs_chain_result *r);

/* Largest relative imbalance of water and of any ion over the schedule. */
void hs_chain_balance_residuals(const struct hs_chain_input *in, const struct hs_chain_result *r,
                                double *water_rel, double *ion_rel);

#endif
