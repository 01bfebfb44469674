/* Internals of the history store, shared by plugin/hs_store*.c only. */
#ifndef HS_STORE_PRIVATE_H
#define HS_STORE_PRIVATE_H

#include <sqlite3.h>
#include <stdarg.h>

#include "hs_store.h"

/* Prepared statements, prepared on first use and kept until close. */
enum hs_stmt_id {
    SQL_BEGIN,
    SQL_COMMIT,
    SQL_SERIES_GET,
    SQL_SERIES_ADD,
    SQL_POND_GET,
    SQL_POND_ADD,
    SQL_SAMPLE_ADD,
    SQL_STATE_ADD,
    SQL_JOURNAL_ADD,
    SQL_JOURNAL_MAX,
    SQL_TRANSFER_ADD,
    SQL_CALIB_ADD,
    SQL_OUTBOX_ADD,
    SQL_OUTBOX_COUNT,
    SQL_OUTBOX_DROP_STATE,
    SQL_OUTBOX_PEEK,
    SQL_OUTBOX_DEL,
    SQL_META_GET,
    SQL_META_SET,
    SQL_COUNT
};

/* name -> id cache (series and ponds), open addressing. */
struct hs_name_map {
    char **names;
    int64_t *ids;
    size_t cap;   /* power of two, 0 when empty */
    size_t used;
};

struct hs_store {
    sqlite3 *db;
    char *path;
    hs_store_mode mode;
    hs_store_options opt;
    sqlite3_stmt *stmt[SQL_COUNT];
    int in_batch;          /* a write transaction is open */
    int batch_pending;     /* writes in the open batch */
    int64_t full_rate_window_ms; /* thin raw samples older than this go; 0 never */
    int urgent;            /* the open batch holds a row that must reach the disk now
                            * (journal, decision, outbox, command): see hs_store_commit_due */
    int64_t outbox_rows;   /* cached row count; -1 when unknown */
    int64_t retention_done_ms; /* when maintenance last deleted past retention; 0 never */
    int64_t outbox_dropped;
    int64_t minutes_day_ok;      /* day whose rollup_minute_<day> is known to exist */
    sqlite3_stmt *minute_add;    /* upsert into rollup_minute_<minute_add_day> */
    int64_t minute_add_day;
    struct hs_name_map series;
    struct hs_name_map ponds;
    char err[512];
};

/* hs_store_minutes.c: the 1-minute rollups, one table per UTC day. */
#define HS_MINUTE_DAY_MS INT64_C(86400000)
#define HS_MINUTE_VIEW_DAYS 400 /* days of minutes in the view "rollup" */
#define HS_MINUTE_READ_DAYS 400 /* days of minutes one history read may take */
void hs_minutes_name(char *buf, size_t len, int64_t day);
/* Days with a table in [from_day, to_day], ascending (*days malloc'd). */
int hs_minutes_days(hs_store *st, int64_t from_day, int64_t to_day, int64_t **days, size_t *n);
int hs_minutes_exists(hs_store *st, int64_t day, int *exists);
int hs_minutes_ensure(hs_store *st, int64_t day); /* creates the day's table */
int hs_minutes_view(hs_store *st);                /* rebuilds the view "rollup" */
int hs_minutes_drop_before(hs_store *st, int64_t cut_ms); /* whole days before cut_ms */
int hs_minutes_split_old(hs_store *st);           /* the schema-8 migration's second half */
void hs_minutes_forget(hs_store *st); /* after a rollback: nothing known, no statement */
/* The upsert of one minute into its day's table (the table made if new). */
sqlite3_stmt *hs_minutes_add_stmt(hs_store *st, int64_t minute_ms);

/* Records an error message (printf style), returns -1. */
int hs_store_fail(hs_store *st, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Records SQLite's message for what failed, returns -1. */
int hs_store_fail_db(hs_store *st, const char *what);
/* The statement for id, reset and unbound; NULL (error recorded) on failure. */
sqlite3_stmt *hs_store_stmt(hs_store *st, enum hs_stmt_id id);
/* Opens a batch if none is open, counts one write, commits a full batch
 * after the caller's write (call hs_store_wrote() after the step). */
int hs_store_batch_begin(hs_store *st);
/* Marks the open batch as holding a row that must be committed at once. */
void hs_store_mark_urgent(hs_store *st);
int hs_store_wrote(hs_store *st);
/* Id of the named series / pond, creating it; -1 on error. */
int64_t hs_store_series_id(hs_store *st, const char *name);
int64_t hs_store_pond_id(hs_store *st, const char *name);
/* Binds a double, NaN as NULL. */
int hs_bind_num(sqlite3_stmt *s, int col, double v);
/* A REAL column, NULL as NaN. */
double hs_col_num(sqlite3_stmt *s, int col);
/* Runs SQL text without results; -1 with the error recorded. */
int hs_store_exec(hs_store *st, const char *sql);
/* store_meta integer value, def when absent. */
int hs_store_meta_get(hs_store *st, const char *key, int64_t def, int64_t *out);
int hs_store_meta_set(hs_store *st, const char *key, int64_t value);

#define HS_MINUTE_MS INT64_C(60000)
#define HS_HOUR_MS INT64_C(3600000)
#define HS_DAY_MS INT64_C(86400000)

#endif
