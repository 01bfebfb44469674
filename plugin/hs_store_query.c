/* History store: read queries for operators' views (history, export). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hs_store_private.h"

/* The state field named after "POND:" in series, or NULL for a signal. */
static const char *state_field(const char *series, char *pond, size_t pond_len)
{
    const char *colon = strrchr(series, ':');
    if (colon == NULL || (size_t)(colon - series) >= pond_len)
        return NULL;
    for (int i = 0; hs_store_state_fields[i] != NULL; i++)
        if (strcmp(colon + 1, hs_store_state_fields[i]) == 0) {
            memcpy(pond, series, (size_t)(colon - series));
            pond[colon - series] = '\0';
            return hs_store_state_fields[i];
        }
    return NULL;
}

static int lookup_series(hs_store *st, const char *name, int64_t *id)
{
    sqlite3_stmt *s = hs_store_stmt(st, SQL_SERIES_GET);
    if (s == NULL)
        return -1;
    sqlite3_bind_text(s, 1, name, -1, SQLITE_STATIC);
    int rc = sqlite3_step(s);
    if (rc == SQLITE_ROW)
        *id = sqlite3_column_int64(s, 0);
    sqlite3_reset(s);
    if (rc == SQLITE_ROW)
        return 0;
    if (rc == SQLITE_DONE)
        return hs_store_fail(st, "no series '%s' in the store", name);
    return hs_store_fail_db(st, "looking up a series");
}

static int emit_points(hs_store *st, sqlite3_stmt *s, int raw, hs_point_fn fn, void *ctx)
{
    int rc, n = 0;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        hs_point p = {0};
        p.t_ms = sqlite3_column_int64(s, 0);
        if (raw) {
            p.min = p.mean = p.max = hs_col_num(s, 1);
            p.count = 1;
            p.worst = (hs_quality)sqlite3_column_int(s, 2);
            if (sqlite3_column_count(s) > 4) {
                const char *why = (const char *)sqlite3_column_text(s, 3);
                snprintf(p.reason, sizeof p.reason, "%s", why ? why : "");
                p.code = sqlite3_column_int(s, 4);
            }
        } else {
            p.min = hs_col_num(s, 1);
            p.mean = hs_col_num(s, 2);
            p.max = hs_col_num(s, 3);
            p.count = sqlite3_column_int64(s, 4);
            p.worst = (hs_quality)sqlite3_column_int(s, 5);
        }
        fn(ctx, &p);
        n++;
    }
    int ok = rc == SQLITE_DONE ? n : hs_store_fail_db(st, "reading history");
    sqlite3_finalize(s);
    return ok;
}

/* Rollup rows come in time order (primary key); buckets of step_ms are
 * combined here rather than by GROUP BY, which would sort them again. */
static int emit_combined(hs_store *st, sqlite3_stmt *s, int64_t step_ms, hs_point_fn fn,
                         void *ctx)
{
    int rc, n = 0, open = 0;
    hs_point acc = {0};
    double sum = 0.0;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        int64_t t = sqlite3_column_int64(s, 0);
        int64_t bucket = t / step_ms * step_ms;
        int64_t cnt = sqlite3_column_int64(s, 4);
        double lo = hs_col_num(s, 1), total = hs_col_num(s, 2), hi = hs_col_num(s, 3);
        hs_quality worst = (hs_quality)sqlite3_column_int(s, 5);
        if (open && bucket != acc.t_ms) {
            acc.mean = acc.count ? sum / (double)acc.count : NAN;
            fn(ctx, &acc);
            n++;
            open = 0;
        }
        if (!open) {
            acc = (hs_point){.t_ms = bucket, .min = lo, .max = hi, .count = 0, .worst = worst};
            sum = 0.0;
            open = 1;
        }
        acc.min = fmin(acc.min, lo);
        acc.max = fmax(acc.max, hi);
        acc.count += cnt;
        sum += total;
        if (worst > acc.worst)
            acc.worst = worst;
    }
    if (rc == SQLITE_DONE && open) {
        acc.mean = acc.count ? sum / (double)acc.count : NAN;
        fn(ctx, &acc);
        n++;
    }
    int ok = rc == SQLITE_DONE ? n : hs_store_fail_db(st, "reading history");
    sqlite3_finalize(s);
    return ok;
}

/* The query of a series' rollups: its hours (when ?4 = 3600) and its
 * minutes from ?5 in the day tables that overlap [from_ms, until_ms).
 * Malloc'd; NULL with the error set. */
static char *minutes_sql(hs_store *st, int64_t from_ms, int64_t until_ms)
{
    int64_t *days = NULL;
    size_t n = 0;
    if (until_ms > from_ms &&
        hs_minutes_days(st, from_ms / HS_MINUTE_DAY_MS, (until_ms - 1) / HS_MINUTE_DAY_MS,
                        &days, &n) != 0)
        return NULL;
    if (n > HS_MINUTE_READ_DAYS) {
        free(days);
        hs_store_fail(st, "1-minute steps read at most %d days at once; take a step of whole "
                          "hours for a longer span", HS_MINUTE_READ_DAYS);
        return NULL;
    }
    size_t cap = 256 + n * 160, used;
    char *sql = malloc(cap);
    if (sql == NULL) {
        free(days);
        hs_store_fail(st, "out of memory reading history");
        return NULL;
    }
    used = (size_t)snprintf(sql, cap, "SELECT t_ms, vmin, vsum, vmax, n, worst FROM rollup_hour"
                                      " WHERE ?4 = 3600 AND series_id = ?3 AND t_ms >= ?1"
                                      " AND t_ms < ?2");
    for (size_t i = 0; i < n; i++)
        used += (size_t)snprintf(sql + used, cap - used,
                                 " UNION ALL SELECT t_ms, vmin, vsum, vmax, n, worst"
                                 " FROM rollup_minute_%lld WHERE series_id = ?3"
                                 " AND t_ms >= ?5 AND t_ms < ?2",
                                 (long long)days[i]);
    snprintf(sql + used, cap - used, " ORDER BY 1");
    free(days);
    return sql;
}

int hs_store_history(hs_store *st, const char *series, int64_t since_ms, int64_t until_ms,
                     int64_t step_ms, hs_point_fn fn, void *ctx)
{
    char pond[256], sql[512];
    int64_t id = 0;
    sqlite3_stmt *s = NULL;
    if (step_ms < 0 || (step_ms > 0 && step_ms % HS_MINUTE_MS != 0))
        return hs_store_fail(st, "history step must be raw (0) or whole minutes");
    if (hs_store_flush(st) != 0 || lookup_series(st, series, &id) != 0)
        return -1;
    if (step_ms == 0) {
        const char *field = state_field(series, pond, sizeof pond);
        if (field != NULL) {
            snprintf(sql, sizeof sql,
                     "SELECT ps.t_ms, ps.%s, ps.quality FROM pond_state ps"
                     " JOIN pond p ON p.id = ps.pond_id WHERE p.name = ?3"
                     " AND ps.t_ms >= ?1 AND ps.t_ms < ?2 ORDER BY ps.t_ms",
                     field);
        } else {
            snprintf(sql, sizeof sql, "SELECT t_ms, value, quality, reason, code FROM sample"
                                      " WHERE series_id = ?3 AND t_ms >= ?1 AND t_ms < ?2"
                                      " ORDER BY t_ms");
        }
        if (sqlite3_prepare_v2(st->db, sql, -1, &s, NULL) != SQLITE_OK)
            return hs_store_fail_db(st, "reading history");
        if (field != NULL)
            sqlite3_bind_text(s, 3, pond, -1, SQLITE_STATIC);
        else
            sqlite3_bind_int64(s, 3, id);
    } else {
        /* Hour steps read the hour rollups, and the minute rollups of the
         * hours not folded yet (from rollup_hour_done_ms), so the hours of
         * the day in progress are shown too. Minutes are in one table per
         * day, in time order: a range of each day's key, filtered by series. */
        int step_s = step_ms % HS_HOUR_MS == 0 ? 3600 : 60;
        int64_t minutes_from = since_ms;
        if (step_s == 3600) {
            int64_t hour_done;
            if (hs_store_meta_get(st, "rollup_hour_done_ms", 0, &hour_done) != 0)
                return -1;
            if (hour_done > minutes_from)
                minutes_from = hour_done;
        }
        /* twice: the writer may drop a day past retention between the
         * listing of the days and the query */
        int prc = SQLITE_ERROR;
        for (int attempt = 0; attempt < 2 && prc != SQLITE_OK; attempt++) {
            char *q = minutes_sql(st, minutes_from < 0 ? 0 : minutes_from, until_ms);
            if (q == NULL)
                return -1;
            prc = sqlite3_prepare_v2(st->db, q, -1, &s, NULL);
            free(q);
        }
        if (prc != SQLITE_OK)
            return hs_store_fail_db(st, "reading history");
        sqlite3_bind_int64(s, 5, minutes_from);
        sqlite3_bind_int64(s, 3, id);
        sqlite3_bind_int(s, 4, step_s);
        sqlite3_bind_int64(s, 1, since_ms);
        sqlite3_bind_int64(s, 2, until_ms);
        return emit_combined(st, s, step_ms, fn, ctx);
    }
    sqlite3_bind_int64(s, 1, since_ms);
    sqlite3_bind_int64(s, 2, until_ms);
    return emit_points(st, s, 1, fn, ctx);
}

static hc_stage stage_col(sqlite3_stmt *s, int col)
{
    const char *name = (const char *)sqlite3_column_text(s, col);
    int v = name ? hc_stage_from_name(name) : HC_STAGE_NONE;
    return v < 0 ? HC_STAGE_NONE : (hc_stage)v;
}

static hc_method method_col(sqlite3_stmt *s, int col)
{
    const char *name = (const char *)sqlite3_column_text(s, col);
    for (int m = 0; name && m < HC_METHOD_COUNT; m++)
        if (strcmp(name, hc_method_name((hc_method)m)) == 0)
            return (hc_method)m;
    return HC_METHOD_NONE;
}

int hs_store_states(hs_store *st, const char *pond, int64_t since_ms, int64_t until_ms,
                    hs_state_fn fn, void *ctx)
{
    sqlite3_stmt *s = NULL;
    if (hs_store_flush(st) != 0)
        return -1;
    if (sqlite3_prepare_v2(
            st->db,
            "SELECT ps.t_ms, p.name, ps.quality, density_kg_m3, temperature_c,"
            " practical_salinity, salinity_g_kg, specific_gravity, reference_temperature_c,"
            " baume, baume_modulus, concentration_factor, stage, next_stage,"
            " next_stage_density_kg_m3, si_gypsum, si_halite, water_activity, method, warnings,"
            " depth_m, volume_m3, dissolved_salt_t, deposited_salt_t, net_evaporation_mm_day,"
            " days_to_target_low, days_to_target_high, days_to_next_stage,"
            " density_uncertainty_kg_m3, sg_uncertainty, baume_uncertainty, cf_uncertainty"
            " FROM pond_state ps JOIN pond p ON p.id = ps.pond_id"
            " WHERE ps.t_ms >= ?1 AND ps.t_ms < ?2 AND (?3 IS NULL OR p.name = ?3)"
            " ORDER BY ps.t_ms, p.name",
            -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading pond states");
    sqlite3_bind_int64(s, 1, since_ms);
    sqlite3_bind_int64(s, 2, until_ms);
    if (pond)
        sqlite3_bind_text(s, 3, pond, -1, SQLITE_STATIC);
    else
        sqlite3_bind_null(s, 3);
    int rc, n = 0;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        hs_state_row r;
        hc_state_clear(&r.state);
        r.t_ms = sqlite3_column_int64(s, 0);
        r.pond = (const char *)sqlite3_column_text(s, 1);
        r.quality = (hs_quality)sqlite3_column_int(s, 2);
        r.state.density_kg_m3 = hs_col_num(s, 3);
        r.state.temperature_c = hs_col_num(s, 4);
        r.state.practical_salinity = hs_col_num(s, 5);
        r.state.salinity_g_kg = hs_col_num(s, 6);
        r.state.specific_gravity = hs_col_num(s, 7);
        r.state.reference_temperature_c = hs_col_num(s, 8);
        r.state.baume = hs_col_num(s, 9);
        r.state.baume_modulus = hs_col_num(s, 10);
        r.state.concentration_factor = hs_col_num(s, 11);
        r.state.stage = stage_col(s, 12);
        r.state.next_stage = stage_col(s, 13);
        r.state.next_stage_density_kg_m3 = hs_col_num(s, 14);
        /* not stored: the density at the reference temperature follows from
         * SG t_ref/t_ref = rho(t_ref) / rho_w(t_ref) (hc_baume.h), water by
         * Laliberte & Cooper 2004 eq. 8 as the live states use [kg/m3] */
        r.state.density_ref_kg_m3 = r.state.specific_gravity *
                                    hc_water_density_lc(r.state.reference_temperature_c);
        r.state.saturation_index[HC_MIN_GYPSUM] = hs_col_num(s, 15);
        r.state.saturation_index[HC_MIN_HALITE] = hs_col_num(s, 16);
        r.state.water_activity = hs_col_num(s, 17);
        r.state.method = method_col(s, 18);
        r.state.warnings = (unsigned)sqlite3_column_int64(s, 19);
        r.extra.depth_m = hs_col_num(s, 20);
        r.extra.volume_m3 = hs_col_num(s, 21);
        r.extra.dissolved_salt_t = hs_col_num(s, 22);
        r.extra.deposited_salt_t = hs_col_num(s, 23);
        r.extra.net_evaporation_mm_day = hs_col_num(s, 24);
        r.extra.days_to_target_low = hs_col_num(s, 25);
        r.extra.days_to_target_high = hs_col_num(s, 26);
        r.extra.days_to_next_stage = hs_col_num(s, 27);
        r.state.density_uncertainty_kg_m3 = hs_col_num(s, 28);
        r.state.sg_uncertainty = hs_col_num(s, 29);
        r.state.baume_uncertainty = hs_col_num(s, 30);
        r.state.cf_uncertainty = hs_col_num(s, 31);
        fn(ctx, &r);
        n++;
    }
    int ok = rc == SQLITE_DONE ? n : hs_store_fail_db(st, "reading pond states");
    sqlite3_finalize(s);
    return ok;
}

int hs_store_ponds(hs_store *st, void (*fn)(void *ctx, const char *pond), void *ctx)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, "SELECT name FROM pond ORDER BY name", -1, &s, NULL) !=
        SQLITE_OK)
        return hs_store_fail_db(st, "listing ponds");
    int rc, n = 0;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        fn(ctx, (const char *)sqlite3_column_text(s, 0));
        n++;
    }
    int ok = rc == SQLITE_DONE ? n : hs_store_fail_db(st, "listing ponds");
    sqlite3_finalize(s);
    return ok;
}
