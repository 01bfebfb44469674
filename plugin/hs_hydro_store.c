/* A pond's hydrology history from the store (see hs_hydro_store.h). */
#include "hs_hydro_store.h"

#include <math.h>
#include <string.h>

#define DAY_MS 86400000LL

/* Keeps the newest usable state and one rate per UTC day. */
static void take_row(void *arg, const hs_state_row *row)
{
    struct hs_hydro_history *h = arg;
    if (row->quality <= HS_QUALITY_UNCERTAIN && isfinite(row->state.density_kg_m3)) {
        h->have_state = 1;
        h->depth_m = row->extra.depth_m;
        h->density_kg_m3 = row->state.density_kg_m3;
        h->temperature_c = row->state.temperature_c;
    }
    if (isfinite(row->extra.deposited_salt_t))
        h->deposited_salt_t = row->extra.deposited_salt_t;
    double r = row->extra.net_evaporation_mm_day;
    if (!isfinite(r))
        return;
    int64_t d = row->t_ms / DAY_MS;
    if (h->n > 0 && h->day[h->n - 1] == d) {
        h->rate[h->n - 1] = r;
        return;
    }
    if (h->n == HS_HYDRO_MAX_DAYS) {
        memmove(h->day, h->day + 1, (HS_HYDRO_MAX_DAYS - 1) * sizeof h->day[0]);
        memmove(h->rate, h->rate + 1, (HS_HYDRO_MAX_DAYS - 1) * sizeof h->rate[0]);
        h->n--;
    }
    h->day[h->n] = d;
    h->rate[h->n] = r;
    h->n++;
}

int hs_hydro_history_read(hs_store *st, const char *pond, int64_t now_ms, int days,
                          struct hs_hydro_history *out)
{
    memset(out, 0, sizeof *out);
    out->depth_m = out->density_kg_m3 = out->temperature_c = NAN;
    out->deposited_salt_t = NAN;
    if (st == NULL || pond == NULL)
        return -1;
    if (days < 1)
        days = 1;
    if (days > HS_HYDRO_MAX_DAYS)
        days = HS_HYDRO_MAX_DAYS;
    return hs_store_states(st, pond, now_ms - days * DAY_MS, now_ms + DAY_MS, take_row, out) < 0
               ? -1
               : 0;
}
