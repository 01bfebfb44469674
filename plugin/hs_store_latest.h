/* The newest rows the operator's status view needs, read without scanning
 * history: a pond's latest state and a transfer's latest decision. Part of
 * the store layer (same error convention: 0 found, 1 none, -1 error with
 * hs_store_error()). */
#ifndef HS_STORE_LATEST_H
#define HS_STORE_LATEST_H

#include <stddef.h>
#include <stdint.h>

#include "hs_store.h"

/* The latest state row of pond into *out (strings valid until the next call
 * on st). */
int hs_store_latest_state(hs_store *st, const char *pond, hs_state_row *out);

typedef struct {
    int64_t t_ms;
    char advice[16];
    char reasons[512]; /* the JSON array as stored */
    int actuated;
} hs_transfer_row;

int hs_store_latest_transfer(hs_store *st, const char *transfer, hs_transfer_row *out);

/* The newest raw sample of signal "POND.QUANTITY" (with its reason) into
 * *out, and the time of its newest good sample into *last_good_ms (0: none
 * in the raw history). */
int hs_store_latest_sample(hs_store *st, const char *signal, hs_point *out,
                           int64_t *last_good_ms);

#endif
