/* History store: batched writes of samples, pond states, the alarm journal,
 * transfer decisions and hydrometer readings, and their plain readers. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_store_private.h"

/* Pond-state fields that get series and rollups (names as the columns). */
const char *const hs_store_state_fields[] = {
    "density_kg_m3", "baume", "temperature_c", "concentration_factor", "specific_gravity",
    "depth_m", "volume_m3", "density_uncertainty_kg_m3", NULL,
};
_Static_assert(sizeof hs_store_state_fields / sizeof hs_store_state_fields[0] ==
                   HS_STORE_STATE_FIELDS + 1,
               "HS_STORE_STATE_FIELDS counts hs_store_state_fields");

static int bind_text_or_null(sqlite3_stmt *s, int col, const char *text)
{
    return text ? sqlite3_bind_text(s, col, text, -1, SQLITE_TRANSIENT) : sqlite3_bind_null(s, col);
}

static int step_write(hs_store *st, sqlite3_stmt *s, const char *what)
{
    int rc = sqlite3_step(s);
    sqlite3_reset(s);
    if (rc != SQLITE_DONE)
        return hs_store_fail_db(st, what);
    return hs_store_wrote(st);
}

int hs_store_add_sample(hs_store *st, const char *signal, int64_t t_ms, double value,
                        hs_quality quality)
{
    return hs_store_add_sample_why(st, signal, t_ms, value, quality, NULL, 0);
}

int hs_store_add_rollup(hs_store *st, const char *signal, int64_t minute_ms, int64_t n,
                        double vmin, double vsum, double vmax, hs_quality worst)
{
    if (n <= 0)
        return 0;
    if (hs_store_batch_begin(st) != 0)
        return -1;
    int64_t id = hs_store_series_id(st, signal);
    if (id < 0)
        return -1;
    int64_t minute = minute_ms / HS_MINUTE_MS * HS_MINUTE_MS;
    sqlite3_stmt *s = hs_minutes_add_stmt(st, minute);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, id);
    sqlite3_bind_int64(s, 2, minute);
    sqlite3_bind_int64(s, 3, n);
    hs_bind_num(s, 4, vmin);
    hs_bind_num(s, 5, vsum);
    hs_bind_num(s, 6, vmax);
    sqlite3_bind_int(s, 7, (int)worst);
    return step_write(st, s, "adding a rollup");
}

int hs_store_add_sample_why(hs_store *st, const char *signal, int64_t t_ms, double value,
                            hs_quality quality, const char *reason, int code)
{
    return hs_store_add_sample_rolled(st, signal, t_ms, value, quality, reason, code, 0);
}

int hs_store_add_sample_rolled(hs_store *st, const char *signal, int64_t t_ms, double value,
                               hs_quality quality, const char *reason, int code, int flags)
{
    if (signal == NULL || *signal == '\0' || (unsigned)quality >= HS_QUALITY_COUNT)
        return hs_store_fail(st, "sample: empty signal name or invalid quality");
    if (hs_store_batch_begin(st) != 0)
        return -1;
    int64_t id = hs_store_series_id(st, signal);
    if (id < 0)
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_SAMPLE_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, id);
    sqlite3_bind_int64(s, 2, t_ms);
    hs_bind_num(s, 3, value);
    sqlite3_bind_int(s, 4, (int)quality);
    if (reason != NULL && *reason != '\0')
        sqlite3_bind_text(s, 5, reason, (int)strnlen(reason, HS_REASON_MAX - 1), SQLITE_TRANSIENT);
    else
        sqlite3_bind_null(s, 5);
    if (code != 0)
        sqlite3_bind_int(s, 6, code);
    else
        sqlite3_bind_null(s, 6);
    sqlite3_bind_int(s, 7, (flags & HS_SAMPLE_ROLLED) != 0);
    sqlite3_bind_int(s, 8, (flags & HS_SAMPLE_THIN) != 0);
    return step_write(st, s, "adding a sample");
}

/* Creates the rolled-up series of a pond the first time it is seen. */
static int ensure_state_series(hs_store *st, const char *pond)
{
    char name[256];
    for (int i = 0; hs_store_state_fields[i] != NULL; i++) {
        if ((size_t)snprintf(name, sizeof name, "%s:%s", pond, hs_store_state_fields[i]) >=
            sizeof name)
            return hs_store_fail(st, "pond name too long: '%s'", pond);
        if (hs_store_series_id(st, name) < 0)
            return -1;
    }
    return 0;
}

double hs_store_state_value(const hc_brine_state *b, const hs_pond_extra *x, int field)
{
    switch (field) { /* in the order of hs_store_state_fields */
    case 0: return b->density_kg_m3;
    case 1: return b->baume;
    case 2: return b->temperature_c;
    case 3: return b->concentration_factor;
    case 4: return b->specific_gravity;
    case 5: return x ? x->depth_m : NAN;
    case 6: return x ? x->volume_m3 : NAN;
    case 7: return b->density_uncertainty_kg_m3;
    default: return NAN;
    }
}

int hs_store_add_state(hs_store *st, const char *pond, int64_t t_ms, const hc_brine_state *b,
                       const hs_pond_extra *extra, hs_quality quality)
{
    return hs_store_add_state_rolled(st, pond, t_ms, b, extra, quality, 0);
}

int hs_store_add_state_rolled(hs_store *st, const char *pond, int64_t t_ms,
                              const hc_brine_state *b, const hs_pond_extra *extra,
                              hs_quality quality, int rolled)
{
    if (pond == NULL || *pond == '\0' || b == NULL || (unsigned)quality >= HS_QUALITY_COUNT)
        return hs_store_fail(st, "state: empty pond name or invalid quality");
    hs_pond_extra none;
    if (extra == NULL) {
        hs_pond_extra_clear(&none);
        extra = &none;
    }
    if (hs_store_batch_begin(st) != 0)
        return -1;
    int64_t known = st->ponds.cap ? (int64_t)st->ponds.used : 0;
    int64_t id = hs_store_pond_id(st, pond);
    if (id < 0)
        return -1;
    if ((int64_t)st->ponds.used != known && ensure_state_series(st, pond) != 0)
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_STATE_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, id);
    sqlite3_bind_int64(s, 2, t_ms);
    sqlite3_bind_int(s, 3, (int)quality);
    hs_bind_num(s, 4, b->density_kg_m3);
    hs_bind_num(s, 5, b->temperature_c);
    hs_bind_num(s, 6, b->practical_salinity);
    hs_bind_num(s, 7, b->salinity_g_kg);
    hs_bind_num(s, 8, b->specific_gravity);
    hs_bind_num(s, 9, b->reference_temperature_c);
    hs_bind_num(s, 10, b->baume);
    hs_bind_num(s, 11, b->baume_modulus);
    hs_bind_num(s, 12, b->concentration_factor);
    bind_text_or_null(s, 13, b->stage == HC_STAGE_NONE ? NULL : hc_stage_name(b->stage));
    bind_text_or_null(s, 14, b->next_stage == HC_STAGE_NONE ? NULL : hc_stage_name(b->next_stage));
    hs_bind_num(s, 15, b->next_stage_density_kg_m3);
    hs_bind_num(s, 16, b->saturation_index[HC_MIN_GYPSUM]);
    hs_bind_num(s, 17, b->saturation_index[HC_MIN_HALITE]);
    hs_bind_num(s, 18, b->water_activity);
    bind_text_or_null(s, 19, hc_method_name(b->method));
    sqlite3_bind_int64(s, 20, (int64_t)b->warnings);
    hs_bind_num(s, 21, extra->depth_m);
    hs_bind_num(s, 22, extra->volume_m3);
    hs_bind_num(s, 23, extra->dissolved_salt_t);
    hs_bind_num(s, 24, extra->deposited_salt_t);
    hs_bind_num(s, 25, extra->net_evaporation_mm_day);
    hs_bind_num(s, 26, extra->days_to_target_low);
    hs_bind_num(s, 27, extra->days_to_target_high);
    hs_bind_num(s, 28, extra->days_to_next_stage);
    hs_bind_num(s, 29, b->density_uncertainty_kg_m3);
    hs_bind_num(s, 30, b->sg_uncertainty);
    hs_bind_num(s, 31, b->baume_uncertainty);
    hs_bind_num(s, 32, b->cf_uncertainty);
    sqlite3_bind_int(s, 33, rolled != 0);
    return step_write(st, s, "adding a pond state");
}

int hs_store_add_journal(hs_store *st, const hs_journal_row *r)
{
    if (r->pond == NULL || r->rule == NULL || r->from_state == NULL || r->to_state == NULL ||
        r->cause == NULL || r->event_id == 0 || r->event_id > (uint64_t)INT64_MAX)
        return hs_store_fail(st, "journal row: missing field or event id 0");
    if (hs_store_batch_begin(st) != 0)
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_JOURNAL_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, (int64_t)r->event_id);
    sqlite3_bind_int64(s, 2, r->t_ms);
    sqlite3_bind_text(s, 3, r->pond, -1, SQLITE_TRANSIENT);
    sqlite3_bind_text(s, 4, r->rule, -1, SQLITE_TRANSIENT);
    sqlite3_bind_text(s, 5, r->from_state, -1, SQLITE_TRANSIENT);
    sqlite3_bind_text(s, 6, r->to_state, -1, SQLITE_TRANSIENT);
    sqlite3_bind_text(s, 7, r->cause, -1, SQLITE_TRANSIENT);
    hs_bind_num(s, 8, r->value);
    hs_bind_num(s, 9, r->limit);
    sqlite3_bind_int(s, 10, r->priority);
    bind_text_or_null(s, 11, r->actor);
    bind_text_or_null(s, 12, r->note);
    sqlite3_bind_int64(s, 13, (int64_t)r->episode_id);
    sqlite3_bind_int64(s, 14, r->shelved_until_ms);
    hs_store_mark_urgent(st);
    return step_write(st, s, "adding a journal row");
}

int hs_store_last_event_id(hs_store *st, uint64_t *out)
{
    sqlite3_stmt *s = hs_store_stmt(st, SQL_JOURNAL_MAX);
    if (s == NULL)
        return -1;
    int rc = sqlite3_step(s);
    *out = rc == SQLITE_ROW ? (uint64_t)sqlite3_column_int64(s, 0) : 0;
    sqlite3_reset(s);
    return rc == SQLITE_ROW ? 0 : hs_store_fail_db(st, "reading the last event id");
}

static int journal_query(hs_store *st, sqlite3_stmt *s, hs_journal_fn fn, void *ctx)
{
    int rc;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        hs_journal_row r = {
            .event_id = (uint64_t)sqlite3_column_int64(s, 0),
            .t_ms = sqlite3_column_int64(s, 1),
            .pond = (const char *)sqlite3_column_text(s, 2),
            .rule = (const char *)sqlite3_column_text(s, 3),
            .from_state = (const char *)sqlite3_column_text(s, 4),
            .to_state = (const char *)sqlite3_column_text(s, 5),
            .cause = (const char *)sqlite3_column_text(s, 6),
            .value = hs_col_num(s, 7),
            .limit = hs_col_num(s, 8),
            .priority = sqlite3_column_int(s, 9),
            .actor = (const char *)sqlite3_column_text(s, 10),
            .note = (const char *)sqlite3_column_text(s, 11),
            .episode_id = (uint64_t)sqlite3_column_int64(s, 12),
            .shelved_until_ms = sqlite3_column_int64(s, 13),
        };
        fn(ctx, &r);
    }
    int ok = rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, "reading the journal");
    sqlite3_finalize(s);
    return ok;
}

#define JOURNAL_COLS "event_id, t_ms, pond, rule, from_state, to_state, cause, value," \
                     " limit_value, priority, actor, note, episode_id, shelved_until_ms"

int hs_store_journal_latest(hs_store *st, hs_journal_fn fn, void *ctx)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT " JOURNAL_COLS " FROM alarm_journal WHERE event_id IN"
                           " (SELECT max(event_id) FROM alarm_journal GROUP BY pond, rule)"
                           " ORDER BY event_id",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading the journal");
    return journal_query(st, s, fn, ctx);
}

int hs_store_journal_range(hs_store *st, const char *pond, int64_t since_ms, int64_t until_ms,
                           hs_journal_fn fn, void *ctx)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT " JOURNAL_COLS " FROM alarm_journal WHERE t_ms >= ?1 AND"
                           " t_ms < ?2 AND (?3 IS NULL OR pond = ?3) ORDER BY event_id",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading the journal");
    sqlite3_bind_int64(s, 1, since_ms);
    sqlite3_bind_int64(s, 2, until_ms);
    bind_text_or_null(s, 3, pond);
    return journal_query(st, s, fn, ctx);
}

int hs_store_add_transfer(hs_store *st, const char *transfer, int64_t t_ms, const char *advice,
                          const char *reasons_json, int actuated)
{
    if (transfer == NULL || advice == NULL)
        return hs_store_fail(st, "transfer decision: missing name or advice");
    if (hs_store_batch_begin(st) != 0)
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_TRANSFER_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_text(s, 1, transfer, -1, SQLITE_TRANSIENT);
    sqlite3_bind_int64(s, 2, t_ms);
    sqlite3_bind_text(s, 3, advice, -1, SQLITE_TRANSIENT);
    sqlite3_bind_text(s, 4, reasons_json ? reasons_json : "[]", -1, SQLITE_TRANSIENT);
    sqlite3_bind_int(s, 5, actuated != 0);
    hs_store_mark_urgent(st);
    return step_write(st, s, "adding a transfer decision");
}

int hs_store_add_calibration(hs_store *st, const hs_calibration_row *r)
{
    if (r->pond == NULL || *r->pond == '\0')
        return hs_store_fail(st, "calibration sample: missing pond");
    if (hs_store_batch_begin(st) != 0)
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_CALIB_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, r->t_ms);
    sqlite3_bind_text(s, 2, r->pond, -1, SQLITE_TRANSIENT);
    hs_bind_num(s, 3, r->specific_gravity);
    hs_bind_num(s, 4, r->hydrometer_temperature_c);
    hs_bind_num(s, 5, r->reference_temperature_c);
    hs_bind_num(s, 6, r->conductivity_ms_cm);
    hs_bind_num(s, 7, r->temperature_c);
    bind_text_or_null(s, 8, r->operator_name);
    bind_text_or_null(s, 9, r->note);
    hs_store_mark_urgent(st);
    return step_write(st, s, "adding a calibration sample");
}

int hs_store_calibrations(hs_store *st, const char *pond, hs_calibration_fn fn, void *ctx)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db,
                           "SELECT t_ms, pond, specific_gravity, hydrometer_temperature_c,"
                           " reference_temperature_c, conductivity_ms_cm, temperature_c,"
                           " operator, note FROM calibration_sample"
                           " WHERE ?1 IS NULL OR pond = ?1 ORDER BY t_ms, id",
                           -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading calibration samples");
    bind_text_or_null(s, 1, pond);
    int rc;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        hs_calibration_row r = {
            .t_ms = sqlite3_column_int64(s, 0),
            .pond = (const char *)sqlite3_column_text(s, 1),
            .specific_gravity = hs_col_num(s, 2),
            .hydrometer_temperature_c = hs_col_num(s, 3),
            .reference_temperature_c = hs_col_num(s, 4),
            .conductivity_ms_cm = hs_col_num(s, 5),
            .temperature_c = hs_col_num(s, 6),
            .operator_name = (const char *)sqlite3_column_text(s, 7),
            .note = (const char *)sqlite3_column_text(s, 8),
        };
        fn(ctx, &r);
    }
    int ok = rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, "reading calibration samples");
    sqlite3_finalize(s);
    return ok;
}

/* ---- command queue (CLI -> daemon) ---- */

int hs_store_command_put(hs_store *st, const char *json, int64_t t_ms, int64_t *id)
{
    sqlite3_stmt *s = NULL;
    if (hs_store_flush(st) != 0)
        return -1;
    if (sqlite3_prepare_v2(st->db, "INSERT INTO command_queue(t_ms, request) VALUES(?1, ?2)", -1,
                           &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "queueing a command");
    sqlite3_bind_int64(s, 1, t_ms);
    sqlite3_bind_text(s, 2, json, -1, SQLITE_STATIC);
    int rc = sqlite3_step(s);
    sqlite3_finalize(s);
    if (rc != SQLITE_DONE)
        return hs_store_fail_db(st, "queueing a command");
    *id = sqlite3_last_insert_rowid(st->db);
    return 0;
}

int hs_store_command_take(hs_store *st, hs_command_fn fn, void *ctx)
{
    sqlite3_stmt *sel = NULL, *upd = NULL;
    int ok = -1;
    if (sqlite3_prepare_v2(st->db, "SELECT id, request FROM command_queue WHERE done_ms IS NULL"
                                   " ORDER BY id LIMIT 64", -1, &sel, NULL) != SQLITE_OK ||
        sqlite3_prepare_v2(st->db, "UPDATE command_queue SET reply = ?2, done_ms ="
                                   " CAST((julianday('now') - 2440587.5) * 86400000 AS INTEGER)"
                                   " WHERE id = ?1", -1, &upd, NULL) != SQLITE_OK) {
        hs_store_fail_db(st, "reading queued commands");
        goto done;
    }
    /* Collect first: replies are written while the select is not running. */
    int64_t ids[64];
    char *requests[64];
    int n = 0, rc;
    while (n < 64 && (rc = sqlite3_step(sel)) == SQLITE_ROW) {
        ids[n] = sqlite3_column_int64(sel, 0);
        requests[n] = strdup((const char *)sqlite3_column_text(sel, 1));
        if (requests[n] == NULL)
            break;
        n++;
    }
    sqlite3_reset(sel);
    ok = 0;
    for (int i = 0; i < n; i++) {
        char *reply = ok == 0 ? fn(ctx, ids[i], requests[i]) : NULL;
        if (ok == 0 && hs_store_batch_begin(st) == 0) {
            hs_store_mark_urgent(st);
            sqlite3_reset(upd);
            sqlite3_bind_int64(upd, 1, ids[i]);
            if (reply)
                sqlite3_bind_text(upd, 2, reply, -1, SQLITE_TRANSIENT);
            else
                sqlite3_bind_text(upd, 2, "{}", -1, SQLITE_STATIC);
            if (sqlite3_step(upd) != SQLITE_DONE)
                ok = hs_store_fail_db(st, "recording a command reply");
        }
        free(reply);
        free(requests[i]);
    }
    /* Every second: replies at once, and whatever batch is open (outbox
     * rows and their acknowledgements) is not held longer, so another
     * writer (halostage ack, the page) never waits for it. The daemon's
     * samples and states do not wait in an open batch: it holds them in
     * memory until their commit (hs_runtime_keep.c). */
    if (ok == 0)
        ok = hs_store_flush(st);
done:
    sqlite3_finalize(sel);
    sqlite3_finalize(upd);
    return ok;
}

int hs_store_command_reply(hs_store *st, int64_t id, char **reply)
{
    sqlite3_stmt *s = NULL;
    *reply = NULL;
    if (sqlite3_prepare_v2(st->db, "SELECT reply, done_ms FROM command_queue WHERE id = ?1", -1,
                           &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading a command reply");
    sqlite3_bind_int64(s, 1, id);
    int rc = sqlite3_step(s), out;
    if (rc == SQLITE_ROW) {
        if (sqlite3_column_type(s, 1) == SQLITE_NULL) {
            out = 0;
        } else {
            const char *text = (const char *)sqlite3_column_text(s, 0);
            *reply = strdup(text ? text : "{}");
            out = *reply ? 1 : hs_store_fail(st, "out of memory");
        }
    } else if (rc == SQLITE_DONE) {
        out = hs_store_fail(st, "no queued command %lld", (long long)id);
    } else {
        out = hs_store_fail_db(st, "reading a command reply");
    }
    sqlite3_finalize(s);
    return out;
}
