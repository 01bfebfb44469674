/* History store: a consistent copy of the live file (SQLite online backup).
 *
 * The copy is taken in one backup step inside one read transaction of the
 * source, so it is the database exactly as it was committed when the copy
 * began: every row committed before then is in it, nothing half-written is.
 * WAL lets the daemon keep writing meanwhile. The copy is written beside its
 * destination under a temporary name, checked (integrity_check), made a
 * self-contained single file (journal_mode=DELETE), synced, and only then
 * renamed into place, so a failed or interrupted backup never leaves a file
 * that looks like a good one.
 * Ownership: everything is opened and closed here; nothing is kept. */
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <libgen.h>
#include <sqlite3.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "hs_store.h"

static int failf(char *err, size_t len, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
static int failf(char *err, size_t len, const char *fmt, ...)
{
    if (err != NULL && len > 0) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err, len, fmt, ap);
        va_end(ap);
    }
    return -1;
}

static int64_t count_rows(sqlite3 *db, const char *sql)
{
    sqlite3_stmt *s = NULL;
    int64_t n = -1;
    if (sqlite3_prepare_v2(db, sql, -1, &s, NULL) == SQLITE_OK && sqlite3_step(s) == SQLITE_ROW)
        n = sqlite3_column_int64(s, 0);
    sqlite3_finalize(s);
    return n;
}

/* "ok", or the first problem integrity_check names (in msg). */
static int integrity_ok(sqlite3 *db, char *msg, size_t len)
{
    sqlite3_stmt *s = NULL;
    int ok = 0;
    if (sqlite3_prepare_v2(db, "PRAGMA integrity_check", -1, &s, NULL) == SQLITE_OK &&
        sqlite3_step(s) == SQLITE_ROW) {
        const char *r = (const char *)sqlite3_column_text(s, 0);
        ok = r != NULL && strcmp(r, "ok") == 0;
        snprintf(msg, len, "%s", r ? r : "no answer");
    } else {
        snprintf(msg, len, "%s", sqlite3_errmsg(db));
    }
    sqlite3_finalize(s);
    return ok;
}

static int sync_path(const char *path, int flags)
{
    int fd = open(path, flags | O_CLOEXEC);
    if (fd < 0)
        return -1;
    int rc = fsync(fd);
    close(fd);
    return rc;
}

static void sleep_ms(long ms)
{
    struct timespec ts = {ms / 1000, (ms % 1000) * 1000000L};
    nanosleep(&ts, NULL);
}

int hs_store_backup(const char *db_path, const char *to_path, int overwrite, int busy_timeout_ms,
                    hs_backup_report *rep, char *err, size_t len)
{
    memset(rep, 0, sizeof *rep);
    char real_db[PATH_MAX], real_to[PATH_MAX];
    if (realpath(db_path, real_db) == NULL)
        return failf(err, len, "%s: %s", db_path, strerror(errno));
    if (realpath(to_path, real_to) != NULL && strcmp(real_db, real_to) == 0)
        return failf(err, len, "%s: that is the live database itself; back up to another file",
                     to_path);
    struct stat sb;
    if (!overwrite && stat(to_path, &sb) == 0)
        return failf(err, len, "%s: exists; remove it or give --force to replace it", to_path);

    char tmp[PATH_MAX];
    if (snprintf(tmp, sizeof tmp, "%s.partial", to_path) >= (int)sizeof tmp)
        return failf(err, len, "%s: path too long", to_path);
    unlink(tmp);
    /* Created here, not by SQLite, so that its mode does not follow the
     * caller's umask: history is the site's business, 0640. */
    int fd = open(tmp, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0640);
    if (fd < 0)
        return failf(err, len, "%s: %s", tmp, strerror(errno));
    fchmod(fd, 0640);
    close(fd);

    sqlite3 *src = NULL, *dst = NULL;
    sqlite3_backup *b = NULL;
    int rc = -1;
    if (sqlite3_open_v2(db_path, &src, SQLITE_OPEN_READONLY, NULL) != SQLITE_OK) {
        failf(err, len, "%s: %s", db_path, src ? sqlite3_errmsg(src) : "cannot open");
        goto done;
    }
    sqlite3_busy_timeout(src, busy_timeout_ms);
    if (sqlite3_open_v2(tmp, &dst, SQLITE_OPEN_READWRITE, NULL) != SQLITE_OK) {
        failf(err, len, "%s: %s", tmp, dst ? sqlite3_errmsg(dst) : "cannot open");
        goto done;
    }
    sqlite3_busy_timeout(dst, busy_timeout_ms);
    b = sqlite3_backup_init(dst, "main", src, "main");
    if (b == NULL) {
        failf(err, len, "%s: %s", to_path, sqlite3_errmsg(dst));
        goto done;
    }
    /* One step for the whole file: one read transaction, one snapshot. A
     * busy source (a checkpoint holding a lock) is waited for, bounded. */
    int step, waited = 0;
    while ((step = sqlite3_backup_step(b, -1)) == SQLITE_BUSY || step == SQLITE_LOCKED) {
        if (waited >= busy_timeout_ms)
            break;
        sleep_ms(50);
        waited += 50;
    }
    rep->pages = sqlite3_backup_pagecount(b);
    if (sqlite3_backup_finish(b) != SQLITE_OK || step != SQLITE_DONE) {
        failf(err, len, "%s: copying %s: %s", to_path, db_path,
              step == SQLITE_BUSY || step == SQLITE_LOCKED ? "the database stayed busy"
                                                           : sqlite3_errmsg(dst));
        goto done;
    }
    b = NULL;
    /* The live file is in WAL mode; the copy becomes one self-contained file. */
    if (sqlite3_exec(dst, "PRAGMA journal_mode=DELETE", NULL, NULL, NULL) != SQLITE_OK) {
        failf(err, len, "%s: %s", to_path, sqlite3_errmsg(dst));
        goto done;
    }
    char why[256];
    if (!integrity_ok(dst, why, sizeof why)) {
        failf(err, len, "%s: the copy fails its integrity check (%s); the live database is "
                        "untouched", to_path, why);
        goto done;
    }
    rep->schema_version = (int)count_rows(dst, "PRAGMA user_version");
    rep->pond_states = count_rows(dst, "SELECT count(*) FROM pond_state");
    rep->samples = count_rows(dst, "SELECT count(*) FROM sample");
    rep->journal_rows = count_rows(dst, "SELECT count(*) FROM alarm_journal");
    rc = 0;
done:
    if (b != NULL)
        sqlite3_backup_finish(b);
    if (dst != NULL)
        sqlite3_close(dst);
    if (src != NULL)
        sqlite3_close(src);
    if (rc == 0 && sync_path(tmp, O_RDONLY) != 0)
        rc = failf(err, len, "%s: %s", tmp, strerror(errno));
    if (rc == 0 && rename(tmp, to_path) != 0)
        rc = failf(err, len, "%s: %s", to_path, strerror(errno));
    if (rc != 0) {
        unlink(tmp);
        return -1;
    }
    char dir[PATH_MAX];
    snprintf(dir, sizeof dir, "%s", to_path);
    sync_path(dirname(dir), O_RDONLY | O_DIRECTORY); /* the rename itself */
    if (stat(to_path, &sb) == 0)
        rep->bytes = (int64_t)sb.st_size;
    return 0;
}
