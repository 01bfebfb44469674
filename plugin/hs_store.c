/* History store: opening, schema migrations, prepared statements, batching.
 * Ownership: hs_store owns its sqlite3 connection, statements and caches. */
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hs_store_private.h"

/* Each migration takes the schema from version i to i + 1, in one
 * transaction with the user_version update. Never edit a released step;
 * append a new one. */
static const char *const migrations[] = {
    /* 0 -> 1: the first schema. */
    "CREATE TABLE series(id INTEGER PRIMARY KEY, name TEXT NOT NULL UNIQUE) STRICT;"
    "CREATE TABLE sample(series_id INTEGER NOT NULL, t_ms INTEGER NOT NULL,"
    " value REAL, quality INTEGER NOT NULL) STRICT;"
    "CREATE INDEX sample_series_t ON sample(series_id, t_ms);"
    "CREATE INDEX sample_t ON sample(t_ms);"
    "CREATE TABLE pond(id INTEGER PRIMARY KEY, name TEXT NOT NULL UNIQUE) STRICT;"
    "CREATE TABLE pond_state(pond_id INTEGER NOT NULL, t_ms INTEGER NOT NULL,"
    " quality INTEGER NOT NULL, density_kg_m3 REAL, temperature_c REAL,"
    " practical_salinity REAL, salinity_g_kg REAL, specific_gravity REAL,"
    " reference_temperature_c REAL, baume REAL, baume_modulus REAL,"
    " concentration_factor REAL, stage TEXT, next_stage TEXT,"
    " next_stage_density_kg_m3 REAL, si_gypsum REAL, si_halite REAL,"
    " water_activity REAL, method TEXT, warnings INTEGER NOT NULL,"
    " depth_m REAL, volume_m3 REAL, dissolved_salt_t REAL, deposited_salt_t REAL,"
    " net_evaporation_mm_day REAL, days_to_target_low REAL,"
    " days_to_target_high REAL, days_to_next_stage REAL) STRICT;"
    "CREATE INDEX pond_state_pond_t ON pond_state(pond_id, t_ms);"
    "CREATE INDEX pond_state_t ON pond_state(t_ms);"
    "CREATE TABLE rollup(series_id INTEGER NOT NULL, step_s INTEGER NOT NULL,"
    " t_ms INTEGER NOT NULL, n INTEGER NOT NULL, vmin REAL, vsum REAL, vmax REAL,"
    " worst INTEGER NOT NULL, PRIMARY KEY(series_id, step_s, t_ms)) STRICT, WITHOUT ROWID;"
    "CREATE INDEX rollup_step_t ON rollup(step_s, t_ms);"
    "CREATE TABLE alarm_journal(event_id INTEGER PRIMARY KEY, t_ms INTEGER NOT NULL,"
    " pond TEXT NOT NULL, rule TEXT NOT NULL, from_state TEXT NOT NULL,"
    " to_state TEXT NOT NULL, cause TEXT NOT NULL, value REAL, limit_value REAL,"
    " priority INTEGER NOT NULL, actor TEXT, note TEXT, episode_id INTEGER NOT NULL,"
    " shelved_until_ms INTEGER NOT NULL) STRICT;"
    "CREATE INDEX alarm_journal_t ON alarm_journal(t_ms);"
    "CREATE INDEX alarm_journal_pond_rule ON alarm_journal(pond, rule, event_id);"
    "CREATE TABLE transfer_decision(id INTEGER PRIMARY KEY, t_ms INTEGER NOT NULL,"
    " transfer TEXT NOT NULL, advice TEXT NOT NULL, reasons TEXT NOT NULL,"
    " actuated INTEGER NOT NULL) STRICT;"
    "CREATE INDEX transfer_decision_t ON transfer_decision(transfer, t_ms);"
    "CREATE TABLE calibration_sample(id INTEGER PRIMARY KEY, t_ms INTEGER NOT NULL,"
    " pond TEXT NOT NULL, specific_gravity REAL, hydrometer_temperature_c REAL,"
    " reference_temperature_c REAL, conductivity_ms_cm REAL, temperature_c REAL,"
    " operator TEXT, note TEXT) STRICT;"
    "CREATE INDEX calibration_sample_pond ON calibration_sample(pond, t_ms);"
    "CREATE TABLE outbox(id INTEGER PRIMARY KEY AUTOINCREMENT, t_ms INTEGER NOT NULL,"
    " kind INTEGER NOT NULL, qos INTEGER NOT NULL, retained INTEGER NOT NULL,"
    " topic TEXT NOT NULL, payload BLOB NOT NULL) STRICT;"
    "CREATE INDEX outbox_kind ON outbox(kind, id);"
    "CREATE TABLE command_queue(id INTEGER PRIMARY KEY, t_ms INTEGER NOT NULL,"
    " request TEXT NOT NULL, reply TEXT, done_ms INTEGER) STRICT;"
    "CREATE INDEX command_queue_pending ON command_queue(done_ms, id);"
    "CREATE TABLE store_meta(key TEXT PRIMARY KEY, value INTEGER NOT NULL) STRICT;",
    /* 1 -> 2: rollups are reached through their primary key, series by
     * series; the (step_s, t_ms) index cost a third of the file. */
    "DROP INDEX IF EXISTS rollup_step_t;",
    /* 2 -> 3: every state carries its standard uncertainty (k = 1). */
    "ALTER TABLE pond_state ADD COLUMN density_uncertainty_kg_m3 REAL;"
    "ALTER TABLE pond_state ADD COLUMN sg_uncertainty REAL;"
    "ALTER TABLE pond_state ADD COLUMN baume_uncertainty REAL;"
    "ALTER TABLE pond_state ADD COLUMN cf_uncertainty REAL;",
    /* 3 -> 4: inbound MQTT commands already answered (by request id, or by
     * a hash of a retained one), so a repeat is answered, not applied. */
    "CREATE TABLE command_seen(key TEXT PRIMARY KEY, t_ms INTEGER NOT NULL,"
    " ok INTEGER NOT NULL, reply TEXT NOT NULL) STRICT, WITHOUT ROWID;"
    "CREATE INDEX command_seen_t ON command_seen(t_ms);",
    /* 4 -> 5: why a sample is not good (hp_sample_reason, or flatline) and
     * the Modbus exception code or errno behind it; NULL for good ones. */
    "ALTER TABLE sample ADD COLUMN reason TEXT;"
    "ALTER TABLE sample ADD COLUMN code INTEGER;",
    /* 5 -> 6: a raw sample whose minute the writer rolled up as it came in
     * (the daemon keeps raw samples by exception but counts them all);
     * maintenance folds only the others. */
    "ALTER TABLE sample ADD COLUMN rolled INTEGER NOT NULL DEFAULT 0;"
    "ALTER TABLE sample ADD COLUMN thin INTEGER NOT NULL DEFAULT 0;",
    /* 6 -> 7: a pond state whose quantities the writer rolled up as the
     * states came in (the daemon keeps state rows by exception but counts
     * every computed state); maintenance folds only the others. */
    "ALTER TABLE pond_state ADD COLUMN rolled INTEGER NOT NULL DEFAULT 0;",
    /* 7 -> 8: 1-minute rollups in one table per UTC day, in time order
     * (hs_store_minutes.c): a batch of minutes is appended to the table's
     * last pages instead of rewriting the last page of every series, and
     * retention drops a day's table instead of deleting its rows. 1-hour
     * rollups stay series by series for long reads. The old minutes are
     * moved by hs_minutes_split_old in the same transaction. */
    "CREATE TABLE rollup_hour(series_id INTEGER NOT NULL, t_ms INTEGER NOT NULL,"
    " n INTEGER NOT NULL, vmin REAL, vsum REAL, vmax REAL, worst INTEGER NOT NULL,"
    " PRIMARY KEY(series_id, t_ms)) STRICT, WITHOUT ROWID;"
    "INSERT INTO rollup_hour(series_id, t_ms, n, vmin, vsum, vmax, worst)"
    " SELECT series_id, t_ms, n, vmin, vsum, vmax, worst FROM rollup WHERE step_s = 3600"
    " ORDER BY series_id, t_ms;"
    "DELETE FROM rollup WHERE step_s <> 60;"
    "ALTER TABLE rollup RENAME TO rollup_minute_old;",
};
#define SCHEMA_VERSION ((int)(sizeof migrations / sizeof migrations[0]))

static const char *const stmt_sql[SQL_COUNT] = {
    [SQL_BEGIN] = "BEGIN IMMEDIATE",
    [SQL_COMMIT] = "COMMIT",
    [SQL_SERIES_GET] = "SELECT id FROM series WHERE name = ?1",
    [SQL_SERIES_ADD] = "INSERT INTO series(name) VALUES(?1)",
    [SQL_POND_GET] = "SELECT id FROM pond WHERE name = ?1",
    [SQL_POND_ADD] = "INSERT INTO pond(name) VALUES(?1)",
    [SQL_SAMPLE_ADD] = "INSERT INTO sample(series_id, t_ms, value, quality, reason, code,"
                       " rolled, thin) VALUES(?1,?2,?3,?4,?5,?6,?7,?8)",
    [SQL_STATE_ADD] =
        "INSERT INTO pond_state(pond_id, t_ms, quality, density_kg_m3, temperature_c,"
        " practical_salinity, salinity_g_kg, specific_gravity, reference_temperature_c,"
        " baume, baume_modulus, concentration_factor, stage, next_stage,"
        " next_stage_density_kg_m3, si_gypsum, si_halite, water_activity, method,"
        " warnings, depth_m, volume_m3, dissolved_salt_t, deposited_salt_t,"
        " net_evaporation_mm_day, days_to_target_low, days_to_target_high,"
        " days_to_next_stage, density_uncertainty_kg_m3, sg_uncertainty,"
        " baume_uncertainty, cf_uncertainty, rolled) VALUES(?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,"
        "?11,?12,?13,?14,?15,?16,?17,?18,?19,?20,?21,?22,?23,?24,?25,?26,?27,?28,?29,?30,"
        "?31,?32,?33)",
    [SQL_JOURNAL_ADD] =
        "INSERT INTO alarm_journal(event_id, t_ms, pond, rule, from_state, to_state,"
        " cause, value, limit_value, priority, actor, note, episode_id, shelved_until_ms)"
        " VALUES(?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12,?13,?14)",
    [SQL_JOURNAL_MAX] = "SELECT coalesce(max(event_id), 0) FROM alarm_journal",
    [SQL_TRANSFER_ADD] = "INSERT INTO transfer_decision(transfer, t_ms, advice, reasons,"
                         " actuated) VALUES(?1,?2,?3,?4,?5)",
    [SQL_CALIB_ADD] = "INSERT INTO calibration_sample(t_ms, pond, specific_gravity,"
                      " hydrometer_temperature_c, reference_temperature_c,"
                      " conductivity_ms_cm, temperature_c, operator, note)"
                      " VALUES(?1,?2,?3,?4,?5,?6,?7,?8,?9)",
    [SQL_OUTBOX_ADD] = "INSERT INTO outbox(t_ms, kind, qos, retained, topic, payload)"
                       " VALUES(?1,?2,?3,?4,?5,?6)",
    [SQL_OUTBOX_COUNT] = "SELECT count(*) FROM outbox",
    [SQL_OUTBOX_DROP_STATE] = "DELETE FROM outbox WHERE id IN (SELECT id FROM outbox"
                              " WHERE kind = 0 ORDER BY id LIMIT ?1)",
    [SQL_OUTBOX_PEEK] = "SELECT id, kind, qos, retained, topic, payload FROM outbox"
                        " WHERE id > ?1 ORDER BY id LIMIT ?2",
    [SQL_OUTBOX_DEL] = "DELETE FROM outbox WHERE id = ?1",
    [SQL_META_GET] = "SELECT value FROM store_meta WHERE key = ?1",
    [SQL_META_SET] = "INSERT INTO store_meta(key, value) VALUES(?1, ?2)"
                     " ON CONFLICT(key) DO UPDATE SET value = excluded.value",
};

int hs_store_schema_version(void) { return SCHEMA_VERSION; }

const char *hs_quality_name(hs_quality q)
{
    static const char *const names[HS_QUALITY_COUNT] = {"good", "uncertain", "stale", "bad"};
    return (unsigned)q < HS_QUALITY_COUNT ? names[q] : "invalid";
}

void hs_store_options_default(hs_store_options *opt)
{
    opt->raw_retention_ms = 30 * HS_DAY_MS;
    opt->minute_retention_ms = 35 * HS_DAY_MS;
    opt->hour_retention_ms = 3650 * HS_DAY_MS;
    opt->batch_rows = 1000;
    opt->busy_timeout_ms = 5000;
    opt->outbox_max_rows = 100000;
    opt->retention_every_ms = 0;
    opt->hour_fold_every_ms = 0;
}

void hs_store_set_retention(hs_store *st, int64_t raw_ms, int64_t minute_ms, int64_t hour_ms)
{
    if (raw_ms > 0)
        st->opt.raw_retention_ms = raw_ms;
    if (minute_ms > 0)
        st->opt.minute_retention_ms = minute_ms;
    if (hour_ms > 0)
        st->opt.hour_retention_ms = hour_ms;
}

void hs_pond_extra_clear(hs_pond_extra *x)
{
    x->depth_m = x->volume_m3 = x->dissolved_salt_t = x->deposited_salt_t = NAN;
    x->net_evaporation_mm_day = x->days_to_target_low = x->days_to_target_high = NAN;
    x->days_to_next_stage = NAN;
}

const char *hs_store_error(const hs_store *st) { return st ? st->err : "no store"; }

int hs_store_fail(hs_store *st, const char *fmt, ...)
{
    char msg[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    snprintf(st->err, sizeof st->err, "%s: %s", st->path, msg);
    return -1;
}

int hs_store_fail_db(hs_store *st, const char *what)
{
    return hs_store_fail(st, "%s: %s", what, sqlite3_errmsg(st->db));
}

int hs_store_exec(hs_store *st, const char *sql)
{
    char *msg = NULL;
    if (sqlite3_exec(st->db, sql, NULL, NULL, &msg) != SQLITE_OK) {
        hs_store_fail(st, "%s", msg ? msg : sqlite3_errmsg(st->db));
        sqlite3_free(msg);
        return -1;
    }
    return 0;
}

sqlite3_stmt *hs_store_stmt(hs_store *st, enum hs_stmt_id id)
{
    sqlite3_stmt *s = st->stmt[id];
    if (s == NULL) {
        if (sqlite3_prepare_v3(st->db, stmt_sql[id], -1, SQLITE_PREPARE_PERSISTENT, &s, NULL) !=
            SQLITE_OK) {
            hs_store_fail_db(st, "preparing a statement");
            return NULL;
        }
        st->stmt[id] = s;
    }
    sqlite3_reset(s);
    sqlite3_clear_bindings(s);
    return s;
}

int hs_bind_num(sqlite3_stmt *s, int col, double v)
{
    return isfinite(v) ? sqlite3_bind_double(s, col, v) : sqlite3_bind_null(s, col);
}

double hs_col_num(sqlite3_stmt *s, int col)
{
    return sqlite3_column_type(s, col) == SQLITE_NULL ? NAN : sqlite3_column_double(s, col);
}

/* Runs a statement that returns no rows; -1 with the error recorded. */
static int step_done(hs_store *st, sqlite3_stmt *s, const char *what)
{
    int rc = sqlite3_step(s);
    sqlite3_reset(s);
    return rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, what);
}

int hs_store_batch_begin(hs_store *st)
{
    if (st->in_batch)
        return 0;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_BEGIN);
    if (s == NULL || step_done(st, s, "starting a batch") != 0)
        return -1;
    st->in_batch = 1;
    st->batch_pending = 0;
    return 0;
}

void hs_store_mark_urgent(hs_store *st) { st->urgent = 1; }

void hs_store_set_full_rate_window(hs_store *st, int64_t window_ms)
{
    st->full_rate_window_ms = window_ms > 0 ? window_ms : 0;
}

int hs_store_commit_due(hs_store *st, int due)
{
    if (!st->in_batch || !(due || st->urgent))
        return 0;
    return hs_store_flush(st) == 0 ? 1 : -1;
}

int hs_store_flush(hs_store *st)
{
    st->urgent = 0;
    if (!st->in_batch)
        return 0;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_COMMIT);
    if (s == NULL || step_done(st, s, "committing a batch") != 0)
        return -1;
    st->in_batch = 0;
    st->batch_pending = 0;
    return 0;
}

int hs_store_wrote(hs_store *st)
{
    if (++st->batch_pending >= st->opt.batch_rows)
        return hs_store_flush(st);
    return 0;
}

/* ---- name -> id caches ---- */

static uint64_t name_hash(const char *s)
{
    uint64_t h = UINT64_C(14695981039346656037); /* FNV-1a, 64 bit */
    for (; *s; s++)
        h = (h ^ (unsigned char)*s) * UINT64_C(1099511628211);
    return h;
}

static int64_t map_find(const struct hs_name_map *m, const char *name)
{
    if (m->cap == 0)
        return -1;
    for (size_t i = name_hash(name) & (m->cap - 1);; i = (i + 1) & (m->cap - 1)) {
        if (m->names[i] == NULL)
            return -1;
        if (strcmp(m->names[i], name) == 0)
            return m->ids[i];
    }
}

static int map_insert_owned(struct hs_name_map *m, char *name, int64_t id)
{
    size_t i = name_hash(name) & (m->cap - 1);
    while (m->names[i] != NULL)
        i = (i + 1) & (m->cap - 1);
    m->names[i] = name;
    m->ids[i] = id;
    m->used++;
    return 0;
}

static int map_add(struct hs_name_map *m, const char *name, int64_t id)
{
    if ((m->used + 1) * 2 > m->cap) {
        struct hs_name_map bigger = {0};
        bigger.cap = m->cap ? m->cap * 2 : 64;
        bigger.names = calloc(bigger.cap, sizeof *bigger.names);
        bigger.ids = calloc(bigger.cap, sizeof *bigger.ids);
        if (bigger.names == NULL || bigger.ids == NULL) {
            free(bigger.names);
            free(bigger.ids);
            return -1;
        }
        for (size_t i = 0; i < m->cap; i++)
            if (m->names[i] != NULL)
                map_insert_owned(&bigger, m->names[i], m->ids[i]);
        free(m->names);
        free(m->ids);
        *m = bigger;
    }
    char *copy = strdup(name);
    if (copy == NULL)
        return -1;
    return map_insert_owned(m, copy, id);
}

static void map_free(struct hs_name_map *m)
{
    for (size_t i = 0; i < m->cap; i++)
        free(m->names[i]);
    free(m->names);
    free(m->ids);
    memset(m, 0, sizeof *m);
}

/* Looks name up in the cache, then the table, then inserts it. */
static int64_t name_id(hs_store *st, struct hs_name_map *m, enum hs_stmt_id get,
                       enum hs_stmt_id add, const char *name)
{
    int64_t id = map_find(m, name);
    if (id >= 0)
        return id;
    sqlite3_stmt *s = hs_store_stmt(st, get);
    if (s == NULL)
        return -1;
    sqlite3_bind_text(s, 1, name, -1, SQLITE_STATIC);
    int rc = sqlite3_step(s);
    if (rc == SQLITE_ROW) {
        id = sqlite3_column_int64(s, 0);
        sqlite3_reset(s);
    } else if (rc == SQLITE_DONE) {
        sqlite3_reset(s);
        if (st->mode != HS_STORE_WRITE)
            return hs_store_fail(st, "unknown name '%s'", name);
        if (hs_store_batch_begin(st) != 0 || (s = hs_store_stmt(st, add)) == NULL)
            return -1;
        sqlite3_bind_text(s, 1, name, -1, SQLITE_STATIC);
        if (step_done(st, s, "adding a name") != 0)
            return -1;
        id = sqlite3_last_insert_rowid(st->db);
    } else {
        sqlite3_reset(s);
        return hs_store_fail_db(st, "looking up a name");
    }
    if (map_add(m, name, id) != 0)
        return hs_store_fail(st, "out of memory");
    return id;
}

int64_t hs_store_series_id(hs_store *st, const char *name)
{
    return name_id(st, &st->series, SQL_SERIES_GET, SQL_SERIES_ADD, name);
}

int64_t hs_store_pond_id(hs_store *st, const char *name)
{
    return name_id(st, &st->ponds, SQL_POND_GET, SQL_POND_ADD, name);
}

int hs_store_meta_get(hs_store *st, const char *key, int64_t def, int64_t *out)
{
    sqlite3_stmt *s = hs_store_stmt(st, SQL_META_GET);
    if (s == NULL)
        return -1;
    sqlite3_bind_text(s, 1, key, -1, SQLITE_STATIC);
    int rc = sqlite3_step(s);
    *out = rc == SQLITE_ROW ? sqlite3_column_int64(s, 0) : def;
    sqlite3_reset(s);
    return rc == SQLITE_ROW || rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, "reading store_meta");
}

int hs_store_meta_set(hs_store *st, const char *key, int64_t value)
{
    sqlite3_stmt *s = hs_store_stmt(st, SQL_META_SET);
    if (s == NULL)
        return -1;
    sqlite3_bind_text(s, 1, key, -1, SQLITE_STATIC);
    sqlite3_bind_int64(s, 2, value);
    return step_done(st, s, "writing store_meta");
}

/* ---- open / migrate / close ---- */

static int read_user_version(hs_store *st, int *version)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, "PRAGMA user_version", -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "reading the schema version");
    int rc = sqlite3_step(s);
    *version = rc == SQLITE_ROW ? sqlite3_column_int(s, 0) : -1;
    sqlite3_finalize(s);
    return rc == SQLITE_ROW ? 0 : hs_store_fail_db(st, "reading the schema version");
}

static int migrate(hs_store *st)
{
    int version;
    if (read_user_version(st, &version) != 0)
        return -1;
    if (version > SCHEMA_VERSION)
        return hs_store_fail(st, "schema version %d is newer than this program's %d", version,
                             SCHEMA_VERSION);
    if (st->mode == HS_STORE_READ) {
        if (version < SCHEMA_VERSION)
            return hs_store_fail(st, "schema version %d is older than %d; start the daemon once "
                                     "to migrate it", version, SCHEMA_VERSION);
        return 0;
    }
    for (int v = version; v < SCHEMA_VERSION; v++) {
        char bump[64];
        snprintf(bump, sizeof bump, "PRAGMA user_version = %d", v + 1);
        if (hs_store_exec(st, "BEGIN IMMEDIATE") != 0)
            return -1;
        if (hs_store_exec(st, migrations[v]) != 0 ||
            (v + 1 == 8 && hs_minutes_split_old(st) != 0) || hs_store_exec(st, bump) != 0) {
            char keep[sizeof st->err];
            memcpy(keep, st->err, sizeof keep);
            hs_store_exec(st, "ROLLBACK");
            hs_minutes_forget(st);
            memcpy(st->err, keep, sizeof keep);
            return -1;
        }
        if (hs_store_exec(st, "COMMIT") != 0)
            return -1;
    }
    return 0;
}

/* A new history file is created 0640 whatever the umask (SQLite would
 * take 0644 & ~umask): it holds the site's operations record. The WAL and
 * shared-memory files take their mode from it. */
static int create_private(hs_store *st)
{
    int fd = open(st->path, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC | O_NOFOLLOW, 0600);
    if (fd < 0)
        return errno == EEXIST ? 0 : hs_store_fail(st, "cannot create: %s", strerror(errno));
    int rc = fchmod(fd, 0640);
    int saved = errno;
    close(fd);
    if (rc != 0)
        return hs_store_fail(st, "cannot set mode 0640: %s", strerror(saved));
    return 0;
}

hs_store *hs_store_open(const char *path, hs_store_mode mode, const hs_store_options *opt,
                        char *err, size_t errlen)
{
    hs_store *st = calloc(1, sizeof *st);
    if (st == NULL || (st->path = strdup(path)) == NULL) {
        if (err)
            snprintf(err, errlen, "%s: out of memory", path);
        free(st);
        return NULL;
    }
    st->mode = mode;
    st->outbox_rows = -1;
    st->minutes_day_ok = st->minute_add_day = INT64_MIN;
    if (opt)
        st->opt = *opt;
    else
        hs_store_options_default(&st->opt);
    if (st->opt.batch_rows < 1)
        st->opt.batch_rows = 1;
    int flags = SQLITE_OPEN_READWRITE | SQLITE_OPEN_NOMUTEX;
    if (mode == HS_STORE_WRITE) {
        flags |= SQLITE_OPEN_CREATE;
        if (create_private(st) != 0)
            goto fail;
    }
    if (sqlite3_open_v2(path, &st->db, flags, NULL) != SQLITE_OK) {
        hs_store_fail(st, "cannot open: %s", st->db ? sqlite3_errmsg(st->db) : strerror(ENOMEM));
        goto fail;
    }
    sqlite3_extended_result_codes(st->db, 1);
    /* Every connection waits for a busy writer instead of failing at once. */
    sqlite3_busy_timeout(st->db, st->opt.busy_timeout_ms);
    if (mode == HS_STORE_WRITE) {
        /* WAL lets the CLI read while we write; NORMAL: see the header. */
        /* 1 KiB pages for a new file (no effect on an existing one): a
         * batch of samples touches a page per series, and smaller pages
         * write less per batch (flash wear; see make bench). */
        if (hs_store_exec(st, "PRAGMA page_size = 1024") != 0 ||
            hs_store_exec(st, "PRAGMA journal_mode = WAL") != 0 ||
            hs_store_exec(st, "PRAGMA synchronous = NORMAL") != 0 ||
            sqlite3_wal_autocheckpoint(st->db, HS_STORE_WAL_PAGES) != SQLITE_OK)
            goto fail;
    } else if (hs_store_exec(st, "PRAGMA synchronous = NORMAL") != 0) {
        goto fail;
    }
    /* Debian's SQLite zeroes every freed page (secure_delete on): dropping
     * a day of 1-minute rollups then wrote 22 MB instead of 0.2 MB. FAST
     * still zeroes deleted rows inside pages that are written anyway; freed
     * pages keep their old bytes until reused (the file is 0640). */
    if (hs_store_exec(st, "PRAGMA secure_delete = FAST") != 0 ||
        hs_store_exec(st, "PRAGMA foreign_keys = ON") != 0 || migrate(st) != 0)
        goto fail;
    /* the view "rollup" follows the day tables there are (also ones an
     * operator restored or dropped by hand) */
    if (st->mode == HS_STORE_WRITE && hs_minutes_view(st) != 0)
        goto fail;
    return st;
fail:
    if (err)
        snprintf(err, errlen, "%s", st->err);
    hs_store_close(st);
    return NULL;
}

void hs_store_close(hs_store *st)
{
    if (st == NULL)
        return;
    if (st->db != NULL) {
        hs_store_flush(st);
        for (int i = 0; i < SQL_COUNT; i++)
            sqlite3_finalize(st->stmt[i]);
        hs_minutes_forget(st);
        sqlite3_close(st->db);
    }
    map_free(&st->series);
    map_free(&st->ponds);
    free(st->path);
    free(st);
}
