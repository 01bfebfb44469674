/* Upgrades: a history file written by the first released schema (version 2,
 * tests/fixtures/store_schema2.sql) is migrated in place by the writer with
 * every row and every value it held; the reader refuses it until then; a file
 * from a newer program is refused with a message that names the file and both
 * versions. No science here, so no source to cite. */
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

#define FIXTURE "tests/fixtures/store_schema2.sql"

static char dir[64], orig[128], path[128];

static char *read_all(const char *file)
{
    FILE *f = fopen(file, "rb");
    if (f == NULL)
        return NULL;
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *text = malloc((size_t)n + 1);
    if (text != NULL && fread(text, 1, (size_t)n, f) != (size_t)n) {
        free(text);
        text = NULL;
    }
    if (text != NULL)
        text[n] = '\0';
    fclose(f);
    return text;
}

static void load_fixture(const char *file)
{
    char *sql = read_all(FIXTURE);
    assert_non_null(sql);
    sqlite3 *db;
    assert_int_equal(sqlite3_open(file, &db), SQLITE_OK);
    char *msg = NULL;
    int rc = sqlite3_exec(db, sql, NULL, NULL, &msg);
    if (rc != SQLITE_OK)
        fail_msg("loading %s: %s", FIXTURE, msg ? msg : "?");
    sqlite3_close(db);
    free(sql);
}

static int64_t scalar(const char *file, const char *sql)
{
    sqlite3 *db;
    sqlite3_stmt *s;
    int64_t v = -1;
    assert_int_equal(sqlite3_open_v2(file, &db, SQLITE_OPEN_READONLY, NULL), SQLITE_OK);
    assert_int_equal(sqlite3_prepare_v2(db, sql, -1, &s, NULL), SQLITE_OK);
    if (sqlite3_step(s) == SQLITE_ROW)
        v = sqlite3_column_int64(s, 0);
    sqlite3_finalize(s);
    sqlite3_close(db);
    return v;
}

static int setup(void **unused)
{
    (void)unused;
    snprintf(dir, sizeof dir, "/tmp/hs-upgrade.XXXXXX");
    if (mkdtemp(dir) == NULL)
        return -1;
    snprintf(orig, sizeof orig, "%s/orig.db", dir);
    snprintf(path, sizeof path, "%s/history.db", dir);
    return 0;
}

static int teardown(void **unused)
{
    (void)unused;
    const char *suffix[] = {"", "-wal", "-shm", "-journal"};
    char f[160];
    for (size_t i = 0; i < sizeof suffix / sizeof suffix[0]; i++) {
        snprintf(f, sizeof f, "%s%s", orig, suffix[i]);
        unlink(f);
        snprintf(f, sizeof f, "%s%s", path, suffix[i]);
        unlink(f);
    }
    rmdir(dir);
    return 0;
}

/* Every row of every version-2 table, over the version-2 columns, is still
 * there after the migration, and nothing was added to or lost from it. */
static void same_rows(sqlite3 *db, const char *table)
{
    char cols[1024] = "", sql[5000]; /* 4 x cols + the text: no truncation */
    sqlite3_stmt *s;
    snprintf(sql, sizeof sql, "SELECT name FROM pragma_table_info('%s', 'v2')", table);
    assert_int_equal(sqlite3_prepare_v2(db, sql, -1, &s, NULL), SQLITE_OK);
    while (sqlite3_step(s) == SQLITE_ROW) {
        if (cols[0])
            strncat(cols, ",", sizeof cols - strlen(cols) - 1);
        strncat(cols, (const char *)sqlite3_column_text(s, 0), sizeof cols - strlen(cols) - 1);
    }
    sqlite3_finalize(s);
    assert_true(cols[0] != '\0');
    snprintf(sql, sizeof sql,
             "SELECT (SELECT count(*) FROM v2.%1$s), (SELECT count(*) FROM main.%1$s),"
             " (SELECT count(*) FROM (SELECT %2$s FROM v2.%1$s EXCEPT SELECT %2$s FROM main.%1$s)),"
             " (SELECT count(*) FROM (SELECT %2$s FROM main.%1$s EXCEPT SELECT %2$s FROM v2.%1$s))",
             table, cols);
    assert_int_equal(sqlite3_prepare_v2(db, sql, -1, &s, NULL), SQLITE_OK);
    assert_int_equal(sqlite3_step(s), SQLITE_ROW);
    int64_t before = sqlite3_column_int64(s, 0), after = sqlite3_column_int64(s, 1);
    int64_t lost = sqlite3_column_int64(s, 2), changed = sqlite3_column_int64(s, 3);
    sqlite3_finalize(s);
    if (before != after || lost != 0 || changed != 0)
        fail_msg("table %s: %lld rows before, %lld after, %lld lost, %lld changed", table,
                 (long long)before, (long long)after, (long long)lost, (long long)changed);
}

static void first_released_schema_migrates_in_place(void **unused)
{
    (void)unused;
    load_fixture(orig);
    load_fixture(path);
    assert_int_equal(scalar(path, "PRAGMA user_version"), 2);
    assert_true(scalar(path, "SELECT count(*) FROM pond_state") > 100); /* a real fixture */

    char err[512];
    if (hs_store_schema_version() > 2) { /* the CLI reads, it never migrates */
        assert_null(hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err));
        assert_non_null(strstr(err, "older"));
    }
    hs_store *st = hs_store_open(path, HS_STORE_WRITE, NULL, err, sizeof err);
    if (st == NULL)
        fail_msg("%s", err);
    hs_store_close(st);
    assert_int_equal(scalar(path, "PRAGMA user_version"), hs_store_schema_version());
    assert_int_equal(scalar(path, "SELECT count(*) FROM pragma_integrity_check "
                                  "WHERE integrity_check <> 'ok'"), 0);

    sqlite3 *db;
    assert_int_equal(sqlite3_open_v2(path, &db, SQLITE_OPEN_READONLY, NULL), SQLITE_OK);
    char attach[200];
    snprintf(attach, sizeof attach, "ATTACH '%s' AS v2", orig);
    assert_int_equal(sqlite3_exec(db, attach, NULL, NULL, NULL), SQLITE_OK);
    sqlite3_stmt *s;
    assert_int_equal(sqlite3_prepare_v2(db, "SELECT name FROM v2.sqlite_master WHERE type = "
                                            "'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
                                        -1, &s, NULL), SQLITE_OK);
    int tables = 0;
    while (sqlite3_step(s) == SQLITE_ROW) {
        same_rows(db, (const char *)sqlite3_column_text(s, 0));
        tables++;
    }
    sqlite3_finalize(s);
    sqlite3_close(db);
    assert_int_equal(tables, 11); /* every table of schema 2 was compared */

    /* The migrated file is a working store: the reader opens it and the
     * writer appends to it. */
    st = hs_store_open(path, HS_STORE_READ, NULL, err, sizeof err);
    if (st == NULL)
        fail_msg("%s", err);
    hs_store_close(st);
}

static void newer_schema_is_refused(void **unused)
{
    (void)unused;
    load_fixture(path);
    char bump[64];
    snprintf(bump, sizeof bump, "PRAGMA user_version = %d", hs_store_schema_version() + 1);
    sqlite3 *db;
    assert_int_equal(sqlite3_open(path, &db), SQLITE_OK);
    assert_int_equal(sqlite3_exec(db, bump, NULL, NULL, NULL), SQLITE_OK);
    sqlite3_close(db);
    int64_t rows = scalar(path, "SELECT count(*) FROM pond_state");
    char err[512], want[64];
    for (int m = 0; m < 2; m++) {
        assert_null(hs_store_open(path, m ? HS_STORE_READ : HS_STORE_WRITE, NULL, err, sizeof err));
        assert_non_null(strstr(err, path));
        snprintf(want, sizeof want, "schema version %d is newer than this program's %d",
                 hs_store_schema_version() + 1, hs_store_schema_version());
        assert_non_null(strstr(err, want));
    }
    assert_int_equal(scalar(path, "PRAGMA user_version"), hs_store_schema_version() + 1);
    assert_int_equal(scalar(path, "SELECT count(*) FROM pond_state"), rows); /* untouched */
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(first_released_schema_migrates_in_place, setup, teardown),
        cmocka_unit_test_setup_teardown(newer_schema_is_refused, setup, teardown),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
