/* History store: the 1-minute rollups, one table per UTC day.
 *
 * rollup_minute_<day> (day = t_ms / 86400000) holds that day's minutes in
 * time order (key t_ms, series_id): a batch of minutes is appended to its
 * last pages, and retention drops a whole day's table, which writes a few
 * freelist pages, where deleting the rows would write every page of the
 * day twice (WAL and checkpoint), about 15 MB a day for the demo site.
 * The view "rollup" shows the minutes of the last HS_MINUTE_VIEW_DAYS days
 * and the hours in one shape (series_id, step_s, t_ms, n, vmin, vsum, vmax,
 * worst) for readers with the sqlite3 shell; it is rebuilt when a day's
 * table comes or goes. Writer only, except hs_minutes_days. */
#include <inttypes.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_store_private.h"

#define DAY_MS HS_MINUTE_DAY_MS

void hs_minutes_name(char *buf, size_t len, int64_t day)
{
    snprintf(buf, len, "rollup_minute_%" PRId64, day);
}

int hs_minutes_days(hs_store *st, int64_t from_day, int64_t to_day, int64_t **days,
                    size_t *n)
{
    sqlite3_stmt *s = NULL;
    *days = NULL;
    *n = 0;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT d FROM (SELECT CAST(substr(name, 15) AS INTEGER) AS d"
                           " FROM sqlite_master WHERE type = 'table'"
                           " AND name GLOB 'rollup_minute_[0-9]*') WHERE d >= ?1 AND d <= ?2"
                           " ORDER BY d",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "listing the days of 1-minute rollups");
    sqlite3_bind_int64(s, 1, from_day);
    sqlite3_bind_int64(s, 2, to_day);
    size_t cap = 0;
    int rc;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        if (*n == cap) {
            size_t grown = cap ? cap * 2 : 64;
            int64_t *p = realloc(*days, grown * sizeof *p);
            if (p == NULL) {
                sqlite3_finalize(s);
                free(*days);
                *days = NULL;
                *n = 0;
                return hs_store_fail(st, "out of memory listing the days of rollups");
            }
            *days = p;
            cap = grown;
        }
        (*days)[(*n)++] = sqlite3_column_int64(s, 0);
    }
    sqlite3_finalize(s);
    if (rc != SQLITE_DONE) {
        free(*days);
        *days = NULL;
        *n = 0;
        return hs_store_fail_db(st, "listing the days of 1-minute rollups");
    }
    return 0;
}

int hs_minutes_view(hs_store *st)
{
    int64_t *days = NULL;
    size_t n = 0;
    if (hs_minutes_days(st, INT64_MIN, INT64_MAX, &days, &n) != 0)
        return -1;
    size_t first = n > HS_MINUTE_VIEW_DAYS ? n - HS_MINUTE_VIEW_DAYS : 0;
    size_t cap = 256 + (n - first) * 128;
    char *sql = malloc(cap);
    if (sql == NULL) {
        free(days);
        return hs_store_fail(st, "out of memory building the rollup view");
    }
    size_t used = (size_t)snprintf(sql, cap,
                                   "DROP VIEW IF EXISTS rollup;"
                                   "CREATE VIEW rollup(series_id, step_s, t_ms, n, vmin, vsum,"
                                   " vmax, worst) AS");
    for (size_t i = first; i < n; i++)
        used += (size_t)snprintf(sql + used, cap - used,
                                 " SELECT series_id, 60, t_ms, n, vmin, vsum, vmax, worst"
                                 " FROM rollup_minute_%" PRId64 " UNION ALL",
                                 days[i]);
    snprintf(sql + used, cap - used,
             " SELECT series_id, 3600, t_ms, n, vmin, vsum, vmax, worst FROM rollup_hour;");
    free(days);
    int rc = hs_store_exec(st, sql);
    free(sql);
    return rc;
}

int hs_minutes_exists(hs_store *st, int64_t day, int *exists)
{
    int64_t *days = NULL;
    size_t n = 0;
    if (hs_minutes_days(st, day, day, &days, &n) != 0)
        return -1;
    free(days);
    *exists = n > 0;
    return 0;
}

int hs_minutes_ensure(hs_store *st, int64_t day)
{
    if (st->minutes_day_ok == day)
        return 0;
    if (day < 0)
        return hs_store_fail(st, "a 1-minute rollup before 1970");
    int exists;
    if (hs_minutes_exists(st, day, &exists) != 0)
        return -1;
    if (!exists) {
        char name[64], sql[512];
        hs_minutes_name(name, sizeof name, day);
        snprintf(sql, sizeof sql,
                 "CREATE TABLE %s(t_ms INTEGER NOT NULL, series_id INTEGER NOT NULL,"
                 " n INTEGER NOT NULL, vmin REAL, vsum REAL, vmax REAL, worst INTEGER NOT NULL,"
                 " PRIMARY KEY(t_ms, series_id)) STRICT, WITHOUT ROWID",
                 name);
        if (hs_store_exec(st, sql) != 0 || hs_minutes_view(st) != 0)
            return -1;
    }
    st->minutes_day_ok = day;
    return 0;
}

int hs_minutes_drop_before(hs_store *st, int64_t cut_ms)
{
    /* whole days only: a day goes once its last minute is before the cut */
    int64_t last = cut_ms / DAY_MS - 1;
    if (cut_ms < 0)
        return 0;
    int64_t *days = NULL;
    size_t n = 0;
    if (hs_minutes_days(st, INT64_MIN, last, &days, &n) != 0)
        return -1;
    int rc = 0;
    for (size_t i = 0; i < n && rc == 0; i++) {
        char name[64], sql[128];
        hs_minutes_name(name, sizeof name, days[i]);
        snprintf(sql, sizeof sql, "DROP TABLE %s", name);
        if (days[i] == st->minutes_day_ok || days[i] == st->minute_add_day)
            hs_minutes_forget(st); /* no statement may hold a table being dropped */
        rc = hs_store_exec(st, sql);
    }
    free(days);
    if (rc == 0 && n > 0)
        rc = hs_minutes_view(st);
    return rc;
}

int hs_minutes_split_old(hs_store *st)
{
    /* schema 8: the minutes of the old series-ordered table, day by day
     * (the days are read first: no table is created under a running read) */
    sqlite3_stmt *s = NULL;
    int64_t *days = NULL;
    size_t n = 0, cap = 0;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT DISTINCT t_ms / 86400000 FROM rollup_minute_old ORDER BY 1", -1,
                           &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading the old 1-minute rollups");
    int rc;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        if (n == cap) {
            size_t grown = cap ? cap * 2 : 64;
            int64_t *p = realloc(days, grown * sizeof *p);
            if (p == NULL)
                break;
            days = p;
            cap = grown;
        }
        days[n++] = sqlite3_column_int64(s, 0);
    }
    sqlite3_finalize(s);
    if (rc != SQLITE_DONE) {
        free(days);
        return rc == SQLITE_ROW ? hs_store_fail(st, "out of memory splitting the rollups")
                                : hs_store_fail_db(st, "reading the old 1-minute rollups");
    }
    int failed = 0;
    for (size_t i = 0; i < n && !failed; i++) {
        char name[64], sql[512];
        hs_minutes_name(name, sizeof name, days[i]);
        snprintf(sql, sizeof sql,
                 "INSERT INTO %s(t_ms, series_id, n, vmin, vsum, vmax, worst)"
                 " SELECT t_ms, series_id, n, vmin, vsum, vmax, worst FROM rollup_minute_old"
                 " WHERE t_ms >= %" PRId64 " AND t_ms < %" PRId64 " ORDER BY t_ms, series_id",
                 name, days[i] * DAY_MS, (days[i] + 1) * DAY_MS);
        failed = hs_minutes_ensure(st, days[i]) != 0 || hs_store_exec(st, sql) != 0;
    }
    free(days);
    st->minutes_day_ok = INT64_MIN;
    if (failed)
        return -1;
    return hs_store_exec(st, "DROP TABLE rollup_minute_old") != 0 ? -1 : hs_minutes_view(st);
}

void hs_minutes_forget(hs_store *st)
{
    sqlite3_finalize(st->minute_add);
    st->minute_add = NULL;
    st->minute_add_day = st->minutes_day_ok = INT64_MIN;
}

sqlite3_stmt *hs_minutes_add_stmt(hs_store *st, int64_t minute_ms)
{
    int64_t day = minute_ms / DAY_MS;
    if (hs_minutes_ensure(st, day) != 0)
        return NULL;
    if (st->minute_add != NULL && st->minute_add_day == day) {
        sqlite3_reset(st->minute_add);
        sqlite3_clear_bindings(st->minute_add);
        return st->minute_add;
    }
    sqlite3_finalize(st->minute_add);
    st->minute_add = NULL;
    char name[64], sql[512];
    hs_minutes_name(name, sizeof name, day);
    snprintf(sql, sizeof sql,
             "INSERT INTO %s(series_id, t_ms, n, vmin, vsum, vmax, worst)"
             " VALUES(?1, ?2, ?3, ?4, ?5, ?6, ?7) ON CONFLICT(t_ms, series_id) DO UPDATE SET"
             " n = n + excluded.n, vmin = min(vmin, excluded.vmin),"
             " vsum = vsum + excluded.vsum, vmax = max(vmax, excluded.vmax),"
             " worst = max(worst, excluded.worst)",
             name);
    if (sqlite3_prepare_v3(st->db, sql, -1, SQLITE_PREPARE_PERSISTENT, &st->minute_add, NULL) !=
        SQLITE_OK) {
        hs_store_fail_db(st, "preparing a 1-minute rollup");
        sqlite3_finalize(st->minute_add);
        st->minute_add = NULL;
        return NULL;
    }
    st->minute_add_day = day;
    return st->minute_add;
}
