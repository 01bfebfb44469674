/* The hydrology fields of a pond's state as JSON, to merge into the brine
 * state object (MQTT state, `halostaged --once`, `halostage forecast`):
 *   depth_m, area_m2, volume_m3, dissolved_salt_t, deposited_salt_t,
 *   net_evaporation_mm_day, net_evaporation_range_mm_day {low, expected,
 *   high}, net_evaporation_days, expected_evaporation_mm_day,
 *   days_to_target {low, expected, high},
 *   days_to_next_stage {low, expected, high},
 *   balance_density_kg_m3, calibration_drift (bool).
 * `expected` is at the window's mean rate; low and high at its ends.
 * Unknown numbers are null; a day count is also null when the target is
 * not reached at that rate (no net evaporation, or the brine stalls).
 * Error convention: 0 on success, -1 when jansson cannot allocate (obj may
 * then hold some of the fields). */
#ifndef HS_HYDRO_JSON_H
#define HS_HYDRO_JSON_H

#include <jansson.h>

#include "hs_hydro.h"
#include "hs_store.h"

int hs_hydro_report_to_json(const struct hs_hydro_report *r, json_t *obj);

/* The store's columns of the same figures (days_to_next_stage at the mean
 * rate). Never fails; r NULL gives all unknown. */
void hs_hydro_report_to_extra(const struct hs_hydro_report *r, hs_pond_extra *x);

#endif
