/* The history store on real SQLite files: schema and migrations, batching
 * and readers, rollups against the raw data, retention, the outbox bound and
 * policy, the journal and the CLI command queue. No science here. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>
#include <sqlite3.h>

#include "hs_store.h"

/* cmocka 1.1.5 has no double comparison. */
#define assert_double_equal(a, b, eps)                                                   \
    do {                                                                                 \
        double a_ = (a), b_ = (b);                                                       \
        if (!(fabs(a_ - b_) <= (eps)))                                                   \
            fail_msg("%s = %.12g, expected %.12g (within %g)", #a, a_, b_, (double)(eps)); \
    } while (0)

static char dir[64];
static char path[128];

static int setup(void **unused)
{
    (void)unused;
    snprintf(dir, sizeof dir, "/tmp/hs-store-test.XXXXXX");
    if (mkdtemp(dir) == NULL)
        return -1;
    snprintf(path, sizeof path, "%s/history.db", dir);
    return 0;
}

static int teardown(void **unused)
{
    (void)unused;
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    return system(cmd) == 0 ? 0 : -1;
}

static hs_store *open_writer(const hs_store_options *opt)
{
    char err[256];
    hs_store *st = hs_store_open(path, HS_STORE_WRITE, opt, err, sizeof err);
    if (st == NULL)
        fail_msg("open: %s", err);
    return st;
}

static int64_t scalar(const char *sql)
{
    sqlite3 *db;
    sqlite3_stmt *s;
    int64_t v = -1;
    assert_int_equal(sqlite3_open_v2(path, &db, SQLITE_OPEN_READONLY, NULL), SQLITE_OK);
    sqlite3_busy_timeout(db, 2000);
    assert_int_equal(sqlite3_prepare_v2(db, sql, -1, &s, NULL), SQLITE_OK);
    if (sqlite3_step(s) == SQLITE_ROW)
        v = sqlite3_column_int64(s, 0);
    sqlite3_finalize(s);
    sqlite3_close(db);
    return v;
}

static void schema_created_and_versioned(void **unused)
{
    (void)unused;
    char err[256];
    assert_null(hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err));
    assert_non_null(strstr(err, path)); /* the error names the file */
    hs_store *st = open_writer(NULL);
    hs_store_close(st);
    assert_int_equal(scalar("PRAGMA user_version"), hs_store_schema_version());
    st = open_writer(NULL); /* reopening migrates nothing and fails nothing */
    hs_store_close(st);
    st = hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err);
    assert_non_null(st);
    hs_store_close(st);
    /* A file from a newer program is refused, not damaged. */
    sqlite3 *db;
    assert_int_equal(sqlite3_open(path, &db), SQLITE_OK);
    assert_int_equal(sqlite3_exec(db, "PRAGMA user_version = 99", NULL, NULL, NULL), SQLITE_OK);
    sqlite3_close(db);
    assert_null(hs_store_open(path, HS_STORE_WRITE, NULL, err, sizeof err));
    assert_non_null(strstr(err, "newer"));
}

static void migrates_an_older_file(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    hs_store_close(st);
    /* Make it look like a version-1 file: the rollup index that version 2
     * drops, no uncertainty columns (version 3), no command_seen (version
     * 4), no sample reasons (version 5), one sample already stored, and the
     * old version number. */
    sqlite3 *db;
    assert_int_equal(sqlite3_open(path, &db), SQLITE_OK);
    assert_int_equal(sqlite3_exec(db, "DROP VIEW rollup; DROP TABLE rollup_hour;"
                                      "CREATE TABLE rollup(series_id INTEGER NOT NULL,"
                                      " step_s INTEGER NOT NULL, t_ms INTEGER NOT NULL,"
                                      " n INTEGER NOT NULL, vmin REAL, vsum REAL, vmax REAL,"
                                      " worst INTEGER NOT NULL,"
                                      " PRIMARY KEY(series_id, step_s, t_ms)) STRICT, WITHOUT ROWID;"
                                      "INSERT INTO rollup VALUES(1, 60, 0, 6, 1.0, 7.5, 2.0, 0),"
                                      " (1, 60, 86460000, 6, 1.0, 7.5, 2.0, 0),"
                                      " (1, 3600, 0, 60, 0.5, 80.0, 2.5, 1);"
                                      "CREATE INDEX rollup_step_t ON rollup(step_s, t_ms);"
                                      "ALTER TABLE pond_state DROP COLUMN density_uncertainty_kg_m3;"
                                      "ALTER TABLE pond_state DROP COLUMN sg_uncertainty;"
                                      "ALTER TABLE pond_state DROP COLUMN baume_uncertainty;"
                                      "ALTER TABLE pond_state DROP COLUMN cf_uncertainty;"
                                      "DROP TABLE command_seen;"
                                      "ALTER TABLE pond_state DROP COLUMN rolled;"
                                      "ALTER TABLE sample DROP COLUMN rolled;"
                                      "ALTER TABLE sample DROP COLUMN thin;"
                                      "ALTER TABLE sample DROP COLUMN reason;"
                                      "ALTER TABLE sample DROP COLUMN code;"
                                      "INSERT INTO series(id, name) VALUES(1, 'a.density');"
                                      "INSERT INTO sample(series_id, t_ms, value, quality)"
                                      " VALUES(1, 1000, 1210.5, 0);"
                                      "PRAGMA user_version = 1;", NULL, NULL, NULL), SQLITE_OK);
    sqlite3_close(db);
    char err[256];
    assert_null(hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err));
    assert_non_null(strstr(err, "older")); /* the CLI does not migrate */
    st = open_writer(NULL);
    hs_store_close(st);
    assert_int_equal(scalar("PRAGMA user_version"), hs_store_schema_version());
    assert_int_equal(scalar("SELECT count(*) FROM sqlite_master WHERE name = 'rollup_step_t'"),
                     0);
    /* version 8 split the rollups by step: both rows are still there */
    assert_int_equal(scalar("SELECT count(*) FROM rollup_minute_0 WHERE series_id = 1 AND n = 6"
                            " AND vsum = 7.5"), 1); /* minute 0 is in day 0's table */
    assert_int_equal(scalar("SELECT count(*) FROM rollup_hour WHERE series_id = 1 AND n = 60"
                            " AND worst = 1"), 1);
    assert_int_equal(scalar("SELECT count(*) FROM rollup_minute_1 WHERE t_ms = 86460000"), 1);
    assert_int_equal(scalar("SELECT count(*) FROM sqlite_master WHERE name = 'rollup_minute_old'"),
                     0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup"), 3);
    assert_int_equal(scalar("SELECT count(*) FROM pragma_table_info('pond_state')"
                            " WHERE name LIKE '%uncertainty%'"), 4);
    assert_int_equal(scalar("SELECT count(*) FROM pragma_table_info('sample')"
                            " WHERE name IN ('reason', 'code')"), 2);
    /* the old sample is kept, with no reason */
    assert_int_equal(scalar("SELECT count(*) FROM sample WHERE value = 1210.5 AND quality = 0"
                            " AND reason IS NULL AND code IS NULL"), 1);
    assert_int_equal(scalar("SELECT count(*) FROM sqlite_master WHERE name = 'command_seen'"), 1);
    assert_int_equal(scalar("SELECT count(*) FROM pragma_table_info('sample')"
                            " WHERE name IN ('rolled', 'thin')"), 2);
    assert_int_equal(scalar("SELECT count(*) FROM pragma_table_info('pond_state')"
                            " WHERE name = 'rolled'"), 1);
}

struct reason_rows {
    int n;
    char reason[4][HS_REASON_MAX];
    int code[4];
    hs_quality q[4];
};

static void collect_reason(void *ctx, const hs_point *p)
{
    struct reason_rows *r = ctx;
    if (r->n < 4) {
        snprintf(r->reason[r->n], sizeof r->reason[0], "%s", p->reason);
        r->code[r->n] = p->code;
        r->q[r->n] = p->worst;
    }
    r->n++;
}

/* The quality reason and its code are stored next to the class and come
 * back with the raw history (history --signal, export --what samples). */
static void sample_reasons_stored(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    assert_int_equal(hs_store_add_sample_why(st, "east-1.density", 1000, 1210.0,
                                             HS_QUALITY_GOOD, NULL, 0), 0);
    assert_int_equal(hs_store_add_sample_why(st, "east-1.density", 2000, NAN, HS_QUALITY_BAD,
                                             "timeout", 110), 0);
    assert_int_equal(hs_store_add_sample_why(st, "east-1.density", 3000, NAN, HS_QUALITY_BAD,
                                             "exception", 2), 0);
    assert_int_equal(hs_store_add_sample_why(st, "east-1.density", 4000, 0.0, HS_QUALITY_BAD,
                                             "out-of-range", 0), 0);
    struct reason_rows r = {0};
    assert_int_equal(hs_store_history(st, "east-1.density", 0, 10000, 0, collect_reason, &r), 4);
    assert_string_equal(r.reason[0], "");
    assert_int_equal(r.code[0], 0);
    assert_string_equal(r.reason[1], "timeout");
    assert_int_equal(r.code[1], 110);
    assert_int_equal(r.q[1], HS_QUALITY_BAD);
    assert_string_equal(r.reason[2], "exception");
    assert_int_equal(r.code[2], 2);
    assert_string_equal(r.reason[3], "out-of-range");
    assert_int_equal(r.code[3], 0);
    hs_store_close(st);
}

static void wal_and_strict(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    assert_int_equal(hs_store_add_sample(st, "east-1.conductivity", 1000, 55.5, HS_QUALITY_GOOD),
                     0);
    assert_int_equal(hs_store_flush(st), 0);
    sqlite3 *db;
    sqlite3_stmt *s;
    assert_int_equal(sqlite3_open(path, &db), SQLITE_OK);
    assert_int_equal(sqlite3_prepare_v2(db, "PRAGMA journal_mode", -1, &s, NULL), SQLITE_OK);
    assert_int_equal(sqlite3_step(s), SQLITE_ROW);
    assert_string_equal((const char *)sqlite3_column_text(s, 0), "wal");
    sqlite3_finalize(s);
    /* STRICT: text in an integer column is refused. */
    assert_int_not_equal(sqlite3_exec(db, "INSERT INTO sample(series_id, t_ms, value, quality)"
                                          " VALUES(1, 'noon', 1.0, 0)", NULL,
                                      NULL, NULL), SQLITE_OK);
    sqlite3_close(db);
    hs_store_close(st);
}

static void batch_visible_only_when_committed(void **unused)
{
    (void)unused;
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.batch_rows = 100;
    hs_store *st = open_writer(&opt);
    for (int i = 0; i < 150; i++)
        assert_int_equal(hs_store_add_sample(st, "east-1.temperature", i * 1000, 20.0 + i,
                                             HS_QUALITY_GOOD), 0);
    /* 100 committed by the full batch, 50 still open: a reader sees 100. */
    assert_int_equal(scalar("SELECT count(*) FROM sample"), 100);
    char err[256];
    hs_store *rd = hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err);
    assert_non_null(rd);
    assert_int_equal(hs_store_flush(st), 0);
    assert_int_equal(scalar("SELECT count(*) FROM sample"), 150);
    hs_store_close(rd);
    hs_store_close(st);
}

struct first_state {
    int n;
    hs_state_row first;
};

static void keep_first(void *ctx, const hs_state_row *r)
{
    struct first_state *got = ctx;
    if (got->n++ == 0) {
        got->first = *r;
        got->first.pond = NULL; /* only valid during the call */
    }
}

static void state_round_trip(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    hc_brine_state b;
    hc_state_clear(&b);
    b.density_kg_m3 = 1210.5;
    b.baume = 25.4;
    b.temperature_c = 31.0;
    b.stage = HC_STAGE_HALITE;
    b.next_stage = HC_STAGE_MAGNESIUM_SULFATE;
    b.method = HC_METHOD_DENSITOMETER;
    b.warnings = HC_WARN_CONDUCTIVITY_WEAK;
    b.saturation_index[HC_MIN_HALITE] = -0.01;
    hs_pond_extra x;
    hs_pond_extra_clear(&x);
    x.depth_m = 0.42;
    assert_int_equal(hs_store_add_state(st, "north-3", 5000, &b, &x, HS_QUALITY_UNCERTAIN), 0);
    assert_int_equal(hs_store_add_state(st, "north-3", 6000, &b, NULL, HS_QUALITY_GOOD), 0);
    struct first_state got = {0};
    assert_int_equal(hs_store_states(st, "north-3", 0, 10000, keep_first, &got), 2);
    assert_int_equal(got.n, 2);
    assert_int_equal(got.first.t_ms, 5000);
    assert_double_equal(got.first.state.density_kg_m3, 1210.5, 1e-9);
    assert_double_equal(got.first.extra.depth_m, 0.42, 1e-12);
    assert_true(isnan(got.first.extra.volume_m3));
    assert_true(isnan(got.first.state.practical_salinity));
    assert_int_equal(got.first.state.stage, HC_STAGE_HALITE);
    assert_int_equal(got.first.state.next_stage, HC_STAGE_MAGNESIUM_SULFATE);
    assert_int_equal(got.first.state.method, HC_METHOD_DENSITOMETER);
    assert_int_equal(got.first.state.warnings, HC_WARN_CONDUCTIVITY_WEAK);
    assert_int_equal(got.first.quality, HS_QUALITY_UNCERTAIN);
    assert_double_equal(got.first.state.saturation_index[HC_MIN_HALITE], -0.01, 1e-12);
    hs_store_close(st);
}


/* ---- rollups against the raw data ---- */

#define SPAN_MS (3 * 3600 * 1000 + 17 * 60 * 1000) /* 3 h 17 min, ends mid-hour */
#define EVERY_MS 7000
#define T0_MS INT64_C(1767225600000) /* 2026-01-01T00:00:00Z */

static double value_at(int64_t i)
{
    /* A deterministic, irregular signal: a slow ramp plus an LCG wobble. */
    uint32_t x = (uint32_t)(i * 1103515245u + 12345u);
    return 1100.0 + 0.01 * (double)i + (double)(x % 1000) / 100.0;
}

struct agg {
    int64_t n;
    double min, max, sum;
    int worst;
};

struct collect {
    hs_point p[2000];
    int n;
};

static void collect_point(void *ctx, const hs_point *p)
{
    struct collect *c = ctx;
    if (c->n < 2000)
        c->p[c->n++] = *p;
}

static void check_rollup(hs_store *st, int64_t step_ms, int64_t folded_to)
{
    static struct collect got;
    got.n = 0;
    int n = hs_store_history(st, "west-2.density", T0_MS, T0_MS + SPAN_MS, step_ms,
                             collect_point, &got);
    int64_t buckets = (folded_to - T0_MS) / step_ms;
    assert_int_equal(n, buckets);
    for (int b = 0; b < n; b++) {
        struct agg a = {0, INFINITY, -INFINITY, 0, 0};
        for (int64_t i = 0; T0_MS + i * EVERY_MS < T0_MS + SPAN_MS; i++) {
            int64_t t = T0_MS + i * EVERY_MS;
            if (t < T0_MS + b * step_ms || t >= T0_MS + (b + 1) * step_ms)
                continue;
            double v = value_at(i);
            a.n++;
            a.sum += v;
            a.min = fmin(a.min, v);
            a.max = fmax(a.max, v);
            if (i % 97 == 0)
                a.worst = HS_QUALITY_UNCERTAIN;
        }
        assert_int_equal(got.p[b].t_ms, T0_MS + b * step_ms);
        assert_int_equal(got.p[b].count, a.n);
        assert_double_equal(got.p[b].min, a.min, 1e-9);
        assert_double_equal(got.p[b].max, a.max, 1e-9);
        assert_double_equal(got.p[b].mean, a.sum / (double)a.n, 1e-9);
        assert_int_equal(got.p[b].worst, a.worst);
    }
}

static void rollups_match_raw(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    for (int64_t i = 0; T0_MS + i * EVERY_MS < T0_MS + SPAN_MS; i++) {
        hs_quality q = i % 97 == 0 ? HS_QUALITY_UNCERTAIN : HS_QUALITY_GOOD;
        assert_int_equal(hs_store_add_sample(st, "west-2.density", T0_MS + i * EVERY_MS,
                                             value_at(i), q), 0);
        /* Maintenance runs now and then while data flows in, so buckets
         * are folded in pieces as in the daemon. */
        if (i % 500 == 250)
            assert_int_equal(hs_store_maintain(st, T0_MS + i * EVERY_MS), 0);
    }
    int64_t end = T0_MS + SPAN_MS;
    assert_int_equal(hs_store_maintain(st, end + 10000), 0);
    int64_t minute_end = end / 60000 * 60000, hour_end = end / 3600000 * 3600000;
    check_rollup(st, 60000, minute_end);
    check_rollup(st, 5 * 60000, minute_end / 300000 * 300000 +
                                    (minute_end % 300000 ? 300000 : 0));
    /* The hour in progress (3:00 to 3:17) comes from its minute rollups. */
    check_rollup(st, 3600000, hour_end + 3600000);
    /* Raw history gives every sample back. */
    static struct collect raw;
    raw.n = 0;
    assert_int_equal(hs_store_history(st, "west-2.density", T0_MS, T0_MS + 60000, 0,
                                      collect_point, &raw), 9);
    assert_double_equal(raw.p[3].mean, value_at(3), 1e-12);
    assert_int_equal(hs_store_history(st, "nowhere.density", T0_MS, end, 0, collect_point, &raw),
                     -1);
    assert_non_null(strstr(hs_store_error(st), "nowhere.density"));
    assert_int_equal(hs_store_history(st, "west-2.density", T0_MS, end, 1500, collect_point,
                                      &raw), -1);
    hs_store_close(st);
}

static void pond_state_rollups(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    hc_brine_state b;
    hc_state_clear(&b);
    for (int i = 0; i < 120; i++) { /* two minutes at 1 s */
        b.density_kg_m3 = 1200.0 + i;
        assert_int_equal(hs_store_add_state(st, "crys-1", T0_MS + i * 1000, &b, NULL,
                                            HS_QUALITY_GOOD), 0);
    }
    assert_int_equal(hs_store_maintain(st, T0_MS + 3 * 60000), 0);
    static struct collect got;
    got.n = 0;
    assert_int_equal(hs_store_history(st, "crys-1:density_kg_m3", T0_MS, T0_MS + 3 * 60000,
                                      60000, collect_point, &got), 2);
    assert_double_equal(got.p[0].min, 1200.0, 1e-9);
    assert_double_equal(got.p[0].max, 1259.0, 1e-9);
    assert_double_equal(got.p[0].mean, 1229.5, 1e-9);
    assert_double_equal(got.p[1].mean, 1289.5, 1e-9);
    /* Baume was never known: its series exists but holds no points. */
    got.n = 0;
    assert_int_equal(hs_store_history(st, "crys-1:baume", T0_MS, T0_MS + 3 * 60000, 60000,
                                      collect_point, &got), 0);
    hs_store_close(st);
}

/* The daemon counts every computed state in the rollups itself and keeps
 * rows by exception (rolled = 1): maintenance folds only the other rows. */
static void rolled_states_not_folded_twice(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    hc_brine_state b;
    hc_state_clear(&b);
    b.specific_gravity = 1.2;
    /* the writer's own count of the minute: 60 states, of which one row */
    assert_int_equal(hs_store_add_rollup(st, "crys-1:specific_gravity", T0_MS, 60, 1.19, 72.0,
                                         1.21, HS_QUALITY_GOOD), 0);
    assert_int_equal(hs_store_add_state_rolled(st, "crys-1", T0_MS, &b, NULL, HS_QUALITY_GOOD, 1),
                     0);
    /* a row written the plain way in the next minute is folded by maintenance */
    assert_int_equal(hs_store_add_state(st, "crys-1", T0_MS + 60000, &b, NULL, HS_QUALITY_GOOD),
                     0);
    assert_int_equal(hs_store_maintain(st, T0_MS + 3 * 60000), 0);
    static struct collect got;
    got.n = 0;
    assert_int_equal(hs_store_history(st, "crys-1:specific_gravity", T0_MS, T0_MS + 3 * 60000,
                                      60000, collect_point, &got), 2);
    assert_int_equal(got.p[0].count, 60); /* not 61 */
    assert_double_equal(got.p[0].mean, 1.2, 1e-12);
    assert_int_equal(got.p[1].count, 1);
    hs_store_close(st);
}

static void retention_keeps_rollups(void **unused)
{
    (void)unused;
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.raw_retention_ms = 3600000; /* 1 h raw */
    opt.minute_retention_ms = 2 * 3600000;
    hs_store *st = open_writer(&opt);
    for (int i = 0; i < 4 * 60; i++) /* four hours, one per minute */
        assert_int_equal(hs_store_add_sample(st, "east-1.level", T0_MS + i * 60000, i,
                                             HS_QUALITY_GOOD), 0);
    int64_t now = T0_MS + 4 * 3600000;
    assert_int_equal(hs_store_maintain(st, now), 0);
    assert_int_equal(scalar("SELECT count(*) FROM sample"), 60);
    assert_int_equal(scalar("SELECT min(t_ms) FROM sample"), now - 3600000);
    /* Minute 239 is still inside the fold grace, so minutes 0..238 are
     * folded; 1-minute rollups go in whole days and T0's day has not ended
     * (so all are kept despite the 2 h retention); only hours 0..2 are
     * complete. */
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 60"), 239);
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 3600"), 3);
    assert_int_equal(scalar("SELECT sum(n) FROM rollup WHERE step_s = 3600"), 180);
    /* The last hour completes on the next pass; raw rows go no earlier. */
    assert_int_equal(hs_store_maintain(st, now + 3600000), 0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 3600"), 4);
    assert_int_equal(scalar("SELECT sum(n) FROM rollup WHERE step_s = 3600"), 240);
    assert_int_equal(scalar("SELECT count(*) FROM sample"), 0);
    /* Once the 2 h retention is past the end of T0's day, its minutes go
     * with their table; the hours stay. */
    assert_int_equal(hs_store_maintain(st, T0_MS + 26 * INT64_C(3600000) + 60000), 0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 60"), 0);
    assert_int_equal(scalar("SELECT sum(n) FROM rollup WHERE step_s = 3600"), 240);
    hs_store_close(st);
}

/* The daemon folds hours once a day: until then the hour steps are read
 * from the minutes, and minutes past retention wait for their fold. */
static void hours_folded_once_a_day(void **unused)
{
    (void)unused;
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.hour_fold_every_ms = 24 * INT64_C(3600000);
    opt.minute_retention_ms = 2 * 3600000;
    hs_store *st = open_writer(&opt);
    for (int i = 0; i < 5 * 60; i++) /* five hours, one per minute */
        assert_int_equal(hs_store_add_sample(st, "east-1.level", T0_MS + i * 60000, 0.5 + i,
                                             HS_QUALITY_GOOD), 0);
    int64_t now = T0_MS + 5 * 3600000 + 60000;
    assert_int_equal(hs_store_maintain(st, now), 0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup_hour"), 0);
    /* not folded: kept although older than the 2 h minute retention */
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 60"), 300);
    static struct collect got;
    got.n = 0;
    assert_int_equal(hs_store_history(st, "east-1.level", T0_MS, now, 3600000, collect_point,
                                      &got), 5);
    for (int h = 0; h < 5; h++) {
        assert_int_equal(got.p[h].t_ms, T0_MS + h * 3600000);
        assert_int_equal(got.p[h].count, 60);
        /* mean of 0.5 + i for i = 60 h .. 60 h + 59 */
        assert_double_equal(got.p[h].mean, 0.5 + 60.0 * h + 29.5, 1e-9);
    }
    /* a day of complete hours: folded; the minutes past retention go in
     * whole days (T0's day table is dropped once the cut is past its end) */
    assert_int_equal(hs_store_maintain(st, T0_MS + 24 * INT64_C(3600000) + 60000), 0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup_hour"), 5);
    assert_int_equal(scalar("SELECT sum(n) FROM rollup_hour"), 300);
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 60"), 300);
    assert_int_equal(hs_store_maintain(st, T0_MS + 48 * INT64_C(3600000) + 60000), 0);
    assert_int_equal(scalar("SELECT count(*) FROM rollup_hour"), 5);
    assert_int_equal(scalar("SELECT count(*) FROM rollup WHERE step_s = 60"), 0);
    char sql[128];
    snprintf(sql, sizeof sql, "SELECT count(*) FROM sqlite_master WHERE name = 'rollup_minute_%lld'",
             (long long)(T0_MS / 86400000));
    assert_int_equal(scalar(sql), 0);
    got.n = 0;
    assert_int_equal(hs_store_history(st, "east-1.level", T0_MS, now, 3600000, collect_point,
                                      &got), 5);
    assert_double_equal(got.p[4].mean, 0.5 + 240.0 + 29.5, 1e-9);
    hs_store_close(st);
}

/* Minutes live in one table per UTC day: a read across midnight takes
 * both days, in order, at minute and at hour steps. */
static void history_across_midnight(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    int64_t t0 = T0_MS + 23 * INT64_C(3600000); /* 23:00 to 01:00 */
    for (int i = 0; i < 120; i++)
        assert_int_equal(hs_store_add_sample(st, "east-1.level", t0 + i * 60000, i,
                                             HS_QUALITY_GOOD), 0);
    assert_int_equal(hs_store_maintain(st, t0 + 3 * 3600000), 0);
    char sql[160];
    for (int d = 0; d < 2; d++) {
        snprintf(sql, sizeof sql, "SELECT count(*) FROM rollup_minute_%lld",
                 (long long)(T0_MS / 86400000 + d));
        assert_int_equal(scalar(sql), 60);
    }
    static struct collect got;
    got.n = 0;
    assert_int_equal(hs_store_history(st, "east-1.level", t0, t0 + 2 * 3600000, 60000,
                                      collect_point, &got), 120);
    for (int i = 0; i < 120; i++) {
        assert_int_equal(got.p[i].t_ms, t0 + i * 60000);
        assert_double_equal(got.p[i].mean, i, 1e-12);
    }
    got.n = 0;
    assert_int_equal(hs_store_history(st, "east-1.level", t0, t0 + 2 * 3600000, 3600000,
                                      collect_point, &got), 2);
    assert_int_equal(got.p[1].t_ms, T0_MS + 24 * INT64_C(3600000));
    assert_int_equal(got.p[1].count, 60);
    assert_double_equal(got.p[1].mean, 89.5, 1e-12);
    hs_store_close(st);
}

/* ---- outbox ---- */

struct seen {
    int64_t ids[64];
    int kinds[64];
    char topics[64][32];
    int n;
};

static int see(void *ctx, const hs_outbox_msg *m)
{
    struct seen *s = ctx;
    s->ids[s->n] = m->id;
    s->kinds[s->n] = m->kind;
    snprintf(s->topics[s->n], sizeof s->topics[0], "%s", m->topic);
    s->n++;
    return 0;
}

static void outbox_order_and_policy(void **unused)
{
    (void)unused;
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.outbox_max_rows = 4;
    hs_store *st = open_writer(&opt);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_STATE, "s/1", "a", 1, 1, 1), 0);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/1", "b", 1, 1, 0), 0);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_STATE, "s/2", "c", 1, 1, 1), 0);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/2", "d", 1, 1, 0), 0);
    /* Full: the oldest state (s/1) gives way to the new alarm. */
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/3", "e", 1, 1, 0), 0);
    /* Full again: s/2 gives way to a new state. */
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_STATE, "s/3", "f", 1, 1, 1), 0);
    /* Now s/3 gives way to an alarm; then only alarms: a state is refused,
     * an alarm still goes in beyond the bound. */
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/4", "g", 1, 1, 0), 0);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_STATE, "s/4", "h", 1, 1, 1), 1);
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "a/5", "i", 1, 1, 0), 0);
    int64_t waiting;
    assert_int_equal(hs_store_outbox_count(st, &waiting), 0);
    assert_int_equal(waiting, 5);
    assert_int_equal(hs_store_outbox_dropped(st), 4);
    struct seen s = {0};
    assert_int_equal(hs_store_outbox_peek(st, 0, 10, see, &s), 5);
    const char *order[] = {"a/1", "a/2", "a/3", "a/4", "a/5"};
    for (int i = 0; i < 5; i++) {
        assert_string_equal(s.topics[i], order[i]);
        if (i > 0)
            assert_true(s.ids[i] > s.ids[i - 1]);
    }
    /* Acknowledged rows leave; the rest stay in order across a reopen. */
    assert_int_equal(hs_store_outbox_done(st, s.ids, 2), 0);
    hs_store_close(st);
    st = open_writer(&opt);
    struct seen t = {0};
    assert_int_equal(hs_store_outbox_peek(st, 0, 10, see, &t), 3);
    assert_string_equal(t.topics[0], "a/3");
    assert_int_equal(t.ids[0], s.ids[2]);
    struct seen u = {0};
    assert_int_equal(hs_store_outbox_peek(st, t.ids[1], 10, see, &u), 1);
    assert_string_equal(u.topics[0], "a/5");
    assert_int_equal(hs_store_outbox_put(st, HS_MSG_ALARM, "", "x", 1, 1, 0), -1);
    hs_store_close(st);
}

/* ---- journal ---- */

static int latest_n;
static char latest_last_state[32];
static void on_latest(void *ctx, const hs_journal_row *r)
{
    (void)ctx;
    latest_n++;
    snprintf(latest_last_state, sizeof latest_last_state, "%s", r->to_state);
}

static void journal_rows(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    uint64_t last = 99;
    assert_int_equal(hs_store_last_event_id(st, &last), 0);
    assert_int_equal(last, 0);
    hs_journal_row r = {.event_id = 1, .t_ms = 10, .pond = "p1", .rule = "fall",
                        .from_state = "normal", .to_state = "unacknowledged",
                        .cause = "condition", .value = 3.5, .limit = 3.0, .priority = 2};
    assert_int_equal(hs_store_add_journal(st, &r), 0);
    r.event_id = 2;
    r.from_state = "unacknowledged";
    r.to_state = "acknowledged";
    r.cause = "ack";
    r.actor = "shift-b";
    assert_int_equal(hs_store_add_journal(st, &r), 0);
    r.event_id = 3;
    r.rule = "level-high";
    assert_int_equal(hs_store_add_journal(st, &r), 0);
    assert_int_equal(hs_store_flush(st), 0);
    r.event_id = 2; /* duplicate id: refused */
    assert_int_equal(hs_store_add_journal(st, &r), -1);
    assert_int_equal(hs_store_flush(st), 0);
    assert_int_equal(hs_store_last_event_id(st, &last), 0);
    assert_int_equal(last, 3);
    latest_n = 0;
    assert_int_equal(hs_store_journal_latest(st, on_latest, NULL), 0);
    assert_int_equal(latest_n, 2);
    assert_string_equal(latest_last_state, "acknowledged");
    hs_store_close(st);
}

static char *answer(void *ctx, int64_t id, const char *json)
{
    int *calls = ctx;
    (*calls)++;
    char *out = malloc(64);
    snprintf(out, 64, "{\"id\":%lld,\"len\":%zu}", (long long)id, strlen(json));
    return out;
}

static void command_queue(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    char err[256];
    hs_store *cli = hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err);
    assert_non_null(cli);
    int64_t id;
    char *reply;
    assert_int_equal(hs_store_command_put(cli, "{\"ack\":1}", 5, &id), 0);
    assert_int_equal(hs_store_command_reply(cli, id, &reply), 0);
    int calls = 0;
    assert_int_equal(hs_store_command_take(st, answer, &calls), 0);
    assert_int_equal(calls, 1);
    assert_int_equal(hs_store_command_take(st, answer, &calls), 0);
    assert_int_equal(calls, 1); /* taken once only */
    assert_int_equal(hs_store_command_reply(cli, id, &reply), 1);
    char want[64];
    snprintf(want, sizeof want, "{\"id\":%lld,\"len\":9}", (long long)id);
    assert_string_equal(reply, want);
    free(reply);
    assert_int_equal(hs_store_command_reply(cli, id + 100, &reply), -1);
    hs_store_close(cli);
    hs_store_close(st);
}

/* Samples kept by exception but counted in full: rollups written at ingest
 * (n = every sample) are not counted again from the kept raw rows; thin
 * rows go once older than the full-rate window; samples wait for a due
 * commit, an urgent row (alarm journal) commits at once. */
static void rollups_count_every_sample(void **unused)
{
    (void)unused;
    hs_store *st = open_writer(NULL);
    int64_t m0 = T0_MS / 60000 * 60000;
    /* 6 samples in the minute (a 10 s poll), 2 kept raw, 1 thin */
    assert_int_equal(hs_store_add_rollup(st, "a.temperature", m0, 6, 20.0, 121.5, 20.5,
                                         HS_QUALITY_GOOD), 0);
    assert_int_equal(hs_store_add_sample_rolled(st, "a.temperature", m0, 20.0, HS_QUALITY_GOOD,
                                                NULL, 0, HS_SAMPLE_ROLLED), 0);
    assert_int_equal(hs_store_add_sample_rolled(st, "a.temperature", m0 + 50000, 20.5,
                                                HS_QUALITY_GOOD, NULL, 0, HS_SAMPLE_ROLLED), 0);
    assert_int_equal(hs_store_add_sample_rolled(st, "a.temperature", m0 + 10000, 20.1,
                                                HS_QUALITY_GOOD, NULL, 0,
                                                HS_SAMPLE_ROLLED | HS_SAMPLE_THIN), 0);
    assert_int_equal(hs_store_commit_due(st, 0), 0); /* samples only: not yet */
    assert_int_equal(hs_store_commit_due(st, 1), 1); /* due: committed */
    hs_store_set_full_rate_window(st, 3600000);
    assert_int_equal(hs_store_maintain(st, m0 + 2 * 3600000), 0);
    assert_int_equal(scalar("SELECT n FROM rollup r JOIN series s ON s.id = r.series_id"
                            " WHERE s.name = 'a.temperature' AND r.step_s = 60"), 6);
    assert_int_equal(scalar("SELECT count(*) FROM sample WHERE thin = 1"), 0); /* window past */
    assert_int_equal(scalar("SELECT count(*) FROM sample"), 2);
    hs_journal_row row = {.event_id = 1, .t_ms = m0, .pond = "a", .rule = "r",
                          .from_state = "normal", .to_state = "unacknowledged",
                          .cause = "condition", .value = NAN, .limit = NAN};
    assert_int_equal(hs_store_add_sample(st, "a.temperature", m0 + 7200000, 21.0,
                                         HS_QUALITY_GOOD), 0);
    assert_int_equal(hs_store_add_journal(st, &row), 0);
    assert_int_equal(hs_store_commit_due(st, 0), 1); /* urgent: at once */
    hs_store_close(st);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(schema_created_and_versioned, setup, teardown),
        cmocka_unit_test_setup_teardown(migrates_an_older_file, setup, teardown),
        cmocka_unit_test_setup_teardown(wal_and_strict, setup, teardown),
        cmocka_unit_test_setup_teardown(sample_reasons_stored, setup, teardown),
        cmocka_unit_test_setup_teardown(batch_visible_only_when_committed, setup, teardown),
        cmocka_unit_test_setup_teardown(state_round_trip, setup, teardown),
        cmocka_unit_test_setup_teardown(rollups_match_raw, setup, teardown),
        cmocka_unit_test_setup_teardown(pond_state_rollups, setup, teardown),
        cmocka_unit_test_setup_teardown(rolled_states_not_folded_twice, setup, teardown),
        cmocka_unit_test_setup_teardown(retention_keeps_rollups, setup, teardown),
        cmocka_unit_test_setup_teardown(hours_folded_once_a_day, setup, teardown),
        cmocka_unit_test_setup_teardown(history_across_midnight, setup, teardown),
        cmocka_unit_test_setup_teardown(outbox_order_and_policy, setup, teardown),
        cmocka_unit_test_setup_teardown(journal_rows, setup, teardown),
        cmocka_unit_test_setup_teardown(command_queue, setup, teardown),
        cmocka_unit_test_setup_teardown(rollups_count_every_sample, setup, teardown),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
