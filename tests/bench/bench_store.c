/* Store benchmark (make bench): rows per second into the history store
 * (batched, prepared) against a bare SQLite insert loop in the same run and
 * on the same disk, and a year of one pond: writing it at one state a
 * minute as the daemon would (with maintenance each simulated day), the
 * file size, and the time to query the year at 1-minute, 1-hour and 1-day
 * resolution. Prints figures; asserts nothing about speed. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sqlite3.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "hs_store.h"

#define ROWS 200000
#define T0_MS INT64_C(1767225600000) /* 2026-01-01T00:00:00Z */

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static int bare_sqlite(const char *path, double *rate)
{
    sqlite3 *db;
    sqlite3_stmt *s;
    if (sqlite3_open(path, &db) != SQLITE_OK)
        return -1;
    sqlite3_exec(db, "PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL;"
                     "CREATE TABLE sample(series_id INTEGER NOT NULL, t_ms INTEGER NOT NULL,"
                     " value REAL, quality INTEGER NOT NULL) STRICT;"
                     "CREATE INDEX s1 ON sample(series_id, t_ms); CREATE INDEX s2 ON sample(t_ms);",
                 NULL, NULL, NULL);
    sqlite3_prepare_v2(db, "INSERT INTO sample VALUES(?1,?2,?3,?4)", -1, &s, NULL);
    double t = now_s();
    for (int i = 0; i < ROWS; i++) {
        if (i % 1000 == 0)
            sqlite3_exec(db, "BEGIN", NULL, NULL, NULL);
        sqlite3_bind_int64(s, 1, i % 20);
        sqlite3_bind_int64(s, 2, T0_MS + i * 1000LL);
        sqlite3_bind_double(s, 3, 50.0 + i % 7);
        sqlite3_bind_int(s, 4, 0);
        sqlite3_step(s);
        sqlite3_reset(s);
        if (i % 1000 == 999)
            sqlite3_exec(db, "COMMIT", NULL, NULL, NULL);
    }
    *rate = ROWS / (now_s() - t);
    sqlite3_finalize(s);
    sqlite3_close(db);
    return 0;
}

static void count_point(void *ctx, const hs_point *p)
{
    (void)p;
    (*(long *)ctx)++;
}

static long long file_bytes(const char *path)
{
    struct stat sb;
    char wal[700];
    long long n = stat(path, &sb) == 0 ? (long long)sb.st_size : 0;
    snprintf(wal, sizeof wal, "%s-wal", path);
    if (stat(wal, &sb) == 0)
        n += (long long)sb.st_size;
    return n;
}

int main(void)
{
    char dir[] = "/tmp/hs-bench-store.XXXXXX", a[600], b[600], c[600], err[600];
    if (mkdtemp(dir) == NULL)
        return 1;
    snprintf(a, sizeof a, "%s/bare.db", dir);
    snprintf(b, sizeof b, "%s/store.db", dir);
    snprintf(c, sizeof c, "%s/year.db", dir);
    int rc = 1;
    double bare = 0;
    if (bare_sqlite(a, &bare) != 0)
        goto out;
    hs_store *st = hs_store_open(b, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL)
        goto out;
    char name[32];
    double t = now_s();
    for (int i = 0; i < ROWS; i++) {
        snprintf(name, sizeof name, "pond-%d.conductivity", i % 20);
        if (hs_store_add_sample(st, name, T0_MS + i * 1000LL, 50.0 + i % 7, HS_QUALITY_GOOD)) {
            fprintf(stderr, "%s\n", hs_store_error(st));
            goto out;
        }
    }
    hs_store_flush(st);
    double ours = ROWS / (now_s() - t);
    hs_store_close(st);
    printf("store insert, %d samples, 20 signals, batches of 1000, WAL synchronous=NORMAL:\n",
           ROWS);
    printf("  bare SQLite loop        %10.0f rows/s\n", bare);
    printf("  hs_store_add_sample     %10.0f rows/s  (%.0f %% of bare; adds the name lookup)\n",
           ours, 100.0 * ours / bare);

    /* A year of one pond at one state a minute, maintained daily. */
    st = hs_store_open(c, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL)
        goto out;
    hc_brine_state s;
    hc_state_clear(&s);
    hs_pond_extra x;
    hs_pond_extra_clear(&x);
    const long minutes = 365L * 24 * 60;
    double write_s = 0, maint_s = 0;
    for (long m = 0; m < minutes; m++) {
        s.density_kg_m3 = 1100.0 + (double)(m % 1440) / 20.0;
        s.baume = 13.0 + (double)(m % 1440) / 100.0;
        s.temperature_c = 20.0 + (double)(m % 60) / 10.0;
        x.depth_m = 0.5 + (double)(m % 720) / 7200.0;
        t = now_s();
        if (hs_store_add_state(st, "north-3", T0_MS + m * 60000LL, &s, &x, HS_QUALITY_GOOD)) {
            fprintf(stderr, "%s\n", hs_store_error(st));
            goto out;
        }
        write_s += now_s() - t;
        if (m % 1440 == 1439) {
            t = now_s();
            if (hs_store_maintain(st, T0_MS + (m + 1) * 60000LL + 10000)) {
                fprintf(stderr, "%s\n", hs_store_error(st));
                goto out;
            }
            maint_s += now_s() - t;
        }
    }
    hs_store_checkpoint(st, 1);
    printf("a year of one pond (525600 states, 1 a minute; raw kept 30 days):\n");
    printf("  write %.2f s (%.0f states/s), daily maintenance %.2f s in total (%.1f ms/day)\n",
           write_s, (double)minutes / write_s, maint_s, 1000.0 * maint_s / 365.0);
    printf("  file size %.1f MB\n", (double)file_bytes(c) / 1e6);
    static const struct {
        long long step;
        const char *what;
    } q[] = {{60000, "1-minute"}, {3600000, "1-hour"}, {86400000, "1-day"}};
    for (size_t i = 0; i < 3; i++) {
        long n = 0;
        t = now_s();
        if (hs_store_history(st, "north-3:density_kg_m3", T0_MS, T0_MS + minutes * 60000LL,
                             q[i].step, count_point, &n) < 0) {
            fprintf(stderr, "%s\n", hs_store_error(st));
            goto out;
        }
        printf("  query the year at %-8s resolution: %6ld points in %7.1f ms\n", q[i].what, n,
               1000.0 * (now_s() - t));
    }
    hs_store_close(st);
    rc = 0;
out:
    unlink(a);
    unlink(b);
    unlink(c);
    char cmd[700];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    if (system(cmd) != 0)
        rc = 1;
    return rc;
}
