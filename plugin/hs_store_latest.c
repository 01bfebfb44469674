/* See hs_store_latest.h. Plain statements (prepared per call): these run a
 * few times per status display, not per sample. */
#include <stdio.h>
#include <string.h>

#include "hs_store_latest.h"
#include "hs_store_private.h"

struct found {
    hs_state_row *out;
    int n;
};

static void keep_row(void *ctx, const hs_state_row *row)
{
    struct found *f = ctx;
    *f->out = *row;
    f->out->pond = NULL; /* the caller knows the pond; the string dies here */
    f->n++;
}

int hs_store_latest_state(hs_store *st, const char *pond, hs_state_row *out)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT max(t_ms) FROM pond_state WHERE pond_id ="
                           " (SELECT id FROM pond WHERE name = ?1)",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "latest state");
    sqlite3_bind_text(s, 1, pond, -1, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s);
    if (rc != SQLITE_ROW) {
        sqlite3_finalize(s);
        return hs_store_fail_db(st, "latest state");
    }
    if (sqlite3_column_type(s, 0) == SQLITE_NULL) {
        sqlite3_finalize(s);
        return 1;
    }
    int64_t t = sqlite3_column_int64(s, 0);
    sqlite3_finalize(s);
    struct found f = {out, 0};
    if (hs_store_states(st, pond, t, t + 1, keep_row, &f) < 0)
        return -1;
    return f.n > 0 ? 0 : 1;
}

int hs_store_latest_transfer(hs_store *st, const char *transfer, hs_transfer_row *out)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT t_ms, advice, reasons, actuated FROM transfer_decision"
                           " WHERE transfer = ?1 ORDER BY t_ms DESC, id DESC LIMIT 1",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "latest transfer");
    sqlite3_bind_text(s, 1, transfer, -1, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s);
    if (rc == SQLITE_DONE) {
        sqlite3_finalize(s);
        return 1;
    }
    if (rc != SQLITE_ROW) {
        sqlite3_finalize(s);
        return hs_store_fail_db(st, "latest transfer");
    }
    out->t_ms = sqlite3_column_int64(s, 0);
    const unsigned char *a = sqlite3_column_text(s, 1), *r = sqlite3_column_text(s, 2);
    snprintf(out->advice, sizeof out->advice, "%s", a ? (const char *)a : "");
    snprintf(out->reasons, sizeof out->reasons, "%s", r ? (const char *)r : "[]");
    out->actuated = sqlite3_column_int(s, 3);
    sqlite3_finalize(s);
    return 0;
}

int hs_store_latest_sample(hs_store *st, const char *signal, hs_point *out,
                           int64_t *last_good_ms)
{
    sqlite3_stmt *s = NULL;
    /* both through the (series_id, t_ms) index, newest first */
    if (sqlite3_prepare_v2(st->db,
                           "SELECT t_ms, value, quality, reason, code FROM sample WHERE"
                           " series_id = (SELECT id FROM series WHERE name = ?1)"
                           " ORDER BY t_ms DESC LIMIT 1",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "latest sample");
    sqlite3_bind_text(s, 1, signal, -1, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s);
    if (rc == SQLITE_DONE) {
        sqlite3_finalize(s);
        return 1;
    }
    if (rc != SQLITE_ROW) {
        sqlite3_finalize(s);
        return hs_store_fail_db(st, "latest sample");
    }
    memset(out, 0, sizeof *out);
    out->t_ms = sqlite3_column_int64(s, 0);
    out->min = out->mean = out->max = hs_col_num(s, 1);
    out->count = 1;
    out->worst = (hs_quality)sqlite3_column_int(s, 2);
    const char *why = (const char *)sqlite3_column_text(s, 3);
    snprintf(out->reason, sizeof out->reason, "%s", why ? why : "");
    out->code = sqlite3_column_int(s, 4);
    sqlite3_finalize(s);
    *last_good_ms = 0;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT max(t_ms) FROM sample WHERE series_id ="
                           " (SELECT id FROM series WHERE name = ?1) AND quality = 0",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "latest good sample");
    sqlite3_bind_text(s, 1, signal, -1, SQLITE_TRANSIENT);
    if (sqlite3_step(s) == SQLITE_ROW && sqlite3_column_type(s, 0) != SQLITE_NULL)
        *last_good_ms = sqlite3_column_int64(s, 0);
    sqlite3_finalize(s);
    return 0;
}
