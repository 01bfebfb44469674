/* A pond's hydrology history from the store: its latest usable state
 * (depth, density, temperature), one net-evaporation figure per UTC day
 * (the last the daemon recorded that day) and the salt deposited so far,
 * so that the daemon after a restart, and `halostage forecast`, start from
 * what is known rather than from nothing.
 * Note: the daemon records the window's mean rate, so the day-to-day spread
 * read back is smaller than that of the raw daily balances.
 * Error convention: 0 on success, -1 on a store error (hs_store_error). */
#ifndef HS_HYDRO_STORE_H
#define HS_HYDRO_STORE_H

#include <stdint.h>

#include "hs_hydro.h"
#include "hs_store.h"

struct hs_hydro_history {
    int have_state;
    double depth_m, density_kg_m3, temperature_c;
    int64_t day[HS_HYDRO_MAX_DAYS];  /* UTC day numbers of rate[], oldest first */
    double rate[HS_HYDRO_MAX_DAYS];  /* [mm/day] */
    int n;
    double deposited_salt_t;         /* latest recorded; NaN if none */
};

/* Reads the last `days` days (at most HS_HYDRO_MAX_DAYS) before now_ms. */
int hs_hydro_history_read(hs_store *st, const char *pond, int64_t now_ms, int days,
                          struct hs_hydro_history *out);

#endif
