/* History store: rollups, retention and checkpoints (writer only).
 * Rollups keep n, min, sum, max and worst quality per bucket, so buckets
 * merge exactly (mean = sum / n) whether folded once or in pieces. */
#include <stdio.h>
#include <string.h>

#include "hs_store_private.h"

/* Rows later than this after a minute's end are not folded into it. */
#define FOLD_GRACE_MS INT64_C(5000)

#define UPSERT_TAIL(key) \
    " ON CONFLICT(" key ") DO UPDATE SET n = n + excluded.n," \
    " vmin = min(vmin, excluded.vmin), vsum = vsum + excluded.vsum," \
    " vmax = max(vmax, excluded.vmax), worst = max(worst, excluded.worst)"

static int run_range(hs_store *st, const char *sql, int64_t a, int64_t b)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, sql, -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "preparing maintenance");
    sqlite3_bind_int64(s, 1, a);
    sqlite3_bind_int64(s, 2, b);
    int rc = sqlite3_step(s);
    sqlite3_finalize(s);
    return rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, "running maintenance");
}

/* Earliest raw time (sample or state), or -1 when there is none. */
static int earliest_raw(hs_store *st, int64_t *out)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, "SELECT min(t) FROM (SELECT min(t_ms) AS t FROM sample"
                                   " UNION ALL SELECT min(t_ms) FROM pond_state)",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "finding the first sample");
    int rc = sqlite3_step(s);
    *out = rc == SQLITE_ROW && sqlite3_column_type(s, 0) != SQLITE_NULL
               ? sqlite3_column_int64(s, 0) : -1;
    sqlite3_finalize(s);
    return rc == SQLITE_ROW ? 0 : hs_store_fail_db(st, "finding the first sample");
}

/* Raw rows of [from, to) not counted yet, into one day's minutes. */
static int fold_minutes_of_day(hs_store *st, int64_t day, int64_t from, int64_t to)
{
    char table[64], sql[1024];
    if (hs_minutes_ensure(st, day) != 0)
        return -1;
    hs_minutes_name(table, sizeof table, day);
    snprintf(sql, sizeof sql,
             "INSERT INTO %s(series_id, t_ms, n, vmin, vsum, vmax, worst)"
             " SELECT series_id, (t_ms / 60000) * 60000, count(value), min(value),"
             " total(value), max(value), max(quality) FROM sample"
             " WHERE t_ms >= ?1 AND t_ms < ?2 AND value IS NOT NULL AND rolled = 0"
             " GROUP BY series_id, t_ms / 60000" UPSERT_TAIL("t_ms, series_id"),
             table);
    if (run_range(st, sql, from, to) != 0)
        return -1;
    for (int i = 0; hs_store_state_fields[i] != NULL; i++) {
        const char *f = hs_store_state_fields[i];
        snprintf(sql, sizeof sql,
                 "INSERT INTO %s(series_id, t_ms, n, vmin, vsum, vmax, worst)"
                 " SELECT s.id, (ps.t_ms / 60000) * 60000, count(ps.%s), min(ps.%s),"
                 " total(ps.%s), max(ps.%s), max(ps.quality) FROM pond_state ps"
                 " JOIN pond p ON p.id = ps.pond_id JOIN series s ON s.name = p.name || ':%s'"
                 " WHERE ps.t_ms >= ?1 AND ps.t_ms < ?2 AND ps.%s IS NOT NULL"
                 " AND ps.rolled = 0 GROUP BY s.id, ps.t_ms / 60000"
                 UPSERT_TAIL("t_ms, series_id"),
                 table, f, f, f, f, f, f);
        if (run_range(st, sql, from, to) != 0)
            return -1;
    }
    return 0;
}

static int fold_minutes(hs_store *st, int64_t from, int64_t to)
{
    if (from < 0) /* no minute before 1970 */
        from = 0;
    for (int64_t day = from / HS_MINUTE_DAY_MS; day * HS_MINUTE_DAY_MS < to; day++) {
        int64_t a = day * HS_MINUTE_DAY_MS, b = a + HS_MINUTE_DAY_MS;
        if (fold_minutes_of_day(st, day, a > from ? a : from, b < to ? b : to) != 0)
            return -1;
    }
    return 0;
}

static int fold_hours(hs_store *st, int64_t from, int64_t to)
{
    /* Hour by hour: the minutes of one hour are a time range of their
     * day's table, and grouping them by series sorts a few thousand rows
     * in memory (a day at once spilled about 7 MB to a temporary file).
     * The hours go in series by series, all in the caller's transaction. */
    char table[64], sql[768];
    for (int64_t h = from; h < to; h += HS_HOUR_MS) {
        int exists;
        if (hs_minutes_exists(st, h / HS_MINUTE_DAY_MS, &exists) != 0)
            return -1;
        if (!exists)
            continue;
        hs_minutes_name(table, sizeof table, h / HS_MINUTE_DAY_MS);
        snprintf(sql, sizeof sql,
                 "INSERT INTO rollup_hour(series_id, t_ms, n, vmin, vsum, vmax, worst)"
                 " SELECT series_id, (t_ms / 3600000) * 3600000, sum(n), min(vmin),"
                 " total(vsum), max(vmax), max(worst) FROM %s"
                 " WHERE t_ms >= ?1 AND t_ms < ?2 GROUP BY series_id, t_ms / 3600000"
                 " ORDER BY series_id" UPSERT_TAIL("series_id, t_ms"),
                 table);
        if (run_range(st, sql, h, h + HS_HOUR_MS) != 0)
            return -1;
    }
    return 0;
}

/* Raw rows go only once they are folded into the minutes (minute_done). */
static int delete_past_retention(hs_store *st, int64_t now_ms, int64_t minute_done,
                                 int64_t hour_done)
{
    /* ... and minutes only once they are folded into the hours */
    int64_t minute_cut = now_ms - st->opt.minute_retention_ms;
    if (minute_cut > hour_done)
        minute_cut = hour_done;
    int64_t raw_cut = now_ms - st->opt.raw_retention_ms;
    if (raw_cut > minute_done)
        raw_cut = minute_done;
    if (run_range(st, "DELETE FROM sample WHERE t_ms < ?1 AND ?2 = ?2", raw_cut, 0) != 0 ||
        run_range(st, "DELETE FROM pond_state WHERE t_ms < ?1 AND ?2 = ?2", raw_cut, 0) != 0 ||
        (st->full_rate_window_ms > 0 &&
         run_range(st, "DELETE FROM sample WHERE thin = 1 AND t_ms < ?1 AND ?2 = ?2",
                   now_ms - st->full_rate_window_ms, 0) != 0) ||
        run_range(st, "DELETE FROM command_seen WHERE t_ms < ?1 AND ?2 = ?2",
                  now_ms - INT64_C(30) * 86400000, 0) != 0 ||
        hs_minutes_drop_before(st, minute_cut) != 0 ||
        run_range(st, "DELETE FROM rollup_hour WHERE series_id IN (SELECT id FROM series)"
                      " AND t_ms < ?1 AND ?2 = ?2",
                  now_ms - st->opt.hour_retention_ms, 0) != 0)
        return -1;
    return 0;
}

int hs_store_maintain(hs_store *st, int64_t now_ms)
{
    if (st->mode != HS_STORE_WRITE)
        return hs_store_fail(st, "maintenance needs the writer");
    if (hs_store_flush(st) != 0 || hs_store_batch_begin(st) != 0)
        return -1;
    int64_t minute_done, hour_done, first;
    if (hs_store_meta_get(st, "rollup_minute_done_ms", -1, &minute_done) != 0 ||
        hs_store_meta_get(st, "rollup_hour_done_ms", -1, &hour_done) != 0)
        goto fail;
    if (minute_done < 0) {
        if (earliest_raw(st, &first) != 0)
            goto fail;
        if (first < 0) /* nothing stored yet */
            return hs_store_flush(st);
        minute_done = first / HS_MINUTE_MS * HS_MINUTE_MS;
    }
    if (hour_done < 0) /* hours start where the first minutes start */
        hour_done = minute_done / HS_HOUR_MS * HS_HOUR_MS;
    int64_t minute_to = (now_ms - FOLD_GRACE_MS) / HS_MINUTE_MS * HS_MINUTE_MS;
    if (minute_to > minute_done) {
        if (fold_minutes(st, minute_done, minute_to) != 0 ||
            hs_store_meta_set(st, "rollup_minute_done_ms", minute_to) != 0)
            goto fail;
        minute_done = minute_to;
    }
    /* Hours wait until hour_fold_every_ms of them are complete: reads of
     * hour steps take the minutes from rollup_hour_done_ms meanwhile. */
    int64_t hour_to = minute_done / HS_HOUR_MS * HS_HOUR_MS;
    if (hour_to > hour_done && hour_to - hour_done >= st->opt.hour_fold_every_ms) {
        if (fold_hours(st, hour_done, hour_to) != 0)
            goto fail;
        hour_done = hour_to;
    }
    if (hs_store_meta_set(st, "rollup_hour_done_ms", hour_done))
        goto fail;
    /* Retention, at most every retention_every_ms: each delete touches the
     * first page of every series. */
    if (st->opt.retention_every_ms <= 0 || st->retention_done_ms == 0 ||
        now_ms - st->retention_done_ms >= st->opt.retention_every_ms) {
        if (delete_past_retention(st, now_ms, minute_done, hour_done) != 0)
            goto fail;
        st->retention_done_ms = now_ms;
    }
    /* No checkpoint here: SQLite's automatic one (HS_STORE_WAL_PAGES) copies
     * a page rewritten by many batches to the file once, not once a pass. */
    return hs_store_flush(st);
fail:
    {
        char keep[sizeof st->err];
        memcpy(keep, st->err, sizeof keep);
        hs_store_exec(st, "ROLLBACK");
        hs_minutes_forget(st); /* a day's table made in the batch is gone */
        st->in_batch = 0;
        st->outbox_rows = -1;
        memcpy(st->err, keep, sizeof keep);
    }
    return -1;
}

int hs_store_checkpoint(hs_store *st, int truncate)
{
    if (hs_store_flush(st) != 0)
        return -1;
    int rc = sqlite3_wal_checkpoint_v2(st->db, NULL,
                                       truncate ? SQLITE_CHECKPOINT_TRUNCATE
                                                : SQLITE_CHECKPOINT_PASSIVE,
                                       NULL, NULL);
    /* A busy reader only postpones a checkpoint; that is not an error. */
    if (rc != SQLITE_OK && rc != SQLITE_BUSY && rc != SQLITE_LOCKED)
        return hs_store_fail_db(st, "checkpointing the WAL");
    return 0;
}
