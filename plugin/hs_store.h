/* The history store: one SQLite file per gateway holding raw samples, pond
 * states, the alarm journal, transfer decisions, hydrometer readings and the
 * MQTT outbox, plus 1-minute and 1-hour rollups.
 *
 * Durability: WAL with synchronous=NORMAL. A process crash (even SIGKILL)
 * loses nothing that was committed; a power cut may lose the last commits but
 * never corrupts the file. Writes are batched: the first write opens a
 * transaction, hs_store_flush() (or a full batch) commits it.
 *
 * Threads: one hs_store belongs to one thread. The daemon owns a writer; the
 * CLI opens its own reader (HS_STORE_READ) in another process, which WAL lets
 * read while the daemon writes.
 *
 * Times are milliseconds since 1970-01-01 UTC (int64). Unknown numbers are
 * NaN in C and NULL in SQL.
 *
 * Error convention (plugin store layer): functions return 0 on success and -1
 * on failure; hs_store_error() then gives a one-line reason naming the file.
 * A few return a documented positive value for a non-error outcome. */
#ifndef HS_STORE_H
#define HS_STORE_H

#include <stddef.h>
#include <stdint.h>

#include "hc_state.h"

typedef struct hs_store hs_store;

/* Sample quality, ordered so that a larger number is worse ("worst quality"
 * of a rollup is the maximum). */
#define HS_REASON_MAX 24

typedef enum {
    HS_QUALITY_GOOD = 0,
    HS_QUALITY_UNCERTAIN = 1, /* e.g. outside the sensor's span, extrapolated */
    HS_QUALITY_STALE = 2,     /* last good value, too old */
    HS_QUALITY_BAD = 3,       /* read failed or value invalid */
    HS_QUALITY_COUNT
} hs_quality;

const char *hs_quality_name(hs_quality q); /* "good", ...; "invalid" if out of range */

typedef enum {
    HS_STORE_WRITE, /* creates the file, migrates the schema, owns maintenance */
    HS_STORE_READ   /* existing file only; refuses a schema newer than it knows */
} hs_store_mode;

typedef struct {
    int64_t raw_retention_ms;      /* raw samples and pond states; default 30 days */
    int64_t minute_retention_ms;   /* 1-minute rollups; default 35 days */
    int64_t hour_retention_ms;     /* 1-hour rollups; default 10 years */
    int batch_rows;                /* commit after this many writes; default 1000 */
    int busy_timeout_ms;           /* on every connection; default 5000 */
    int64_t outbox_max_rows;       /* bound of the MQTT outbox; default 100000 */
    int64_t retention_every_ms;    /* hs_store_maintain deletes past retention at most this
                                    * often (each delete touches every series' first page);
                                    * default 0: every call */
    int64_t hour_fold_every_ms;    /* complete hours are folded into 1-hour rollups once this
                                    * many are waiting (each fold writes the last page of
                                    * every series' hours); reads of hour steps take the
                                    * minutes of the hours not folded yet; default 0: every
                                    * complete hour */
} hs_store_options;

/* Fills the defaults listed above. */
void hs_store_options_default(hs_store_options *opt);

/* What a backup copied (hs_store_backup). */
typedef struct {
    int schema_version;
    int pages;
    int64_t bytes;
    int64_t pond_states, samples, journal_rows;
} hs_backup_report;

/* Copies the history file at db_path to to_path while a daemon may be
 * writing it: one consistent snapshot holding every row committed before the
 * copy began, checked with integrity_check, a single file (no -wal), mode
 * 0640, put in place by rename only when complete. Refuses an existing
 * to_path unless overwrite, and the live file itself. 0, or -1 with a reason
 * naming the file in err (nothing is left at to_path then). */
int hs_store_backup(const char *db_path, const char *to_path, int overwrite, int busy_timeout_ms,
                    hs_backup_report *rep, char *err, size_t len);

/* Changes the retention periods of an open writer (a reload of the site
 * file); they apply from the next maintenance pass. Non-positive values keep
 * the current period. */
void hs_store_set_retention(hs_store *st, int64_t raw_ms, int64_t minute_ms, int64_t hour_ms);

/* Opens (and in HS_STORE_WRITE mode creates and migrates) the store at path.
 * opt may be NULL for defaults. On failure returns NULL and, when err is not
 * NULL, writes a reason into err (errlen bytes). The caller owns the handle
 * and frees it with hs_store_close(). */
hs_store *hs_store_open(const char *path, hs_store_mode mode, const hs_store_options *opt,
                        char *err, size_t errlen);
/* Commits any open batch and closes. NULL is allowed. */
void hs_store_close(hs_store *st);

/* Last error text; valid until the next call on st. Never NULL. */
const char *hs_store_error(const hs_store *st);
/* Schema version this code writes (PRAGMA user_version). */
int hs_store_schema_version(void);

/* Commits the open batch, if any. 0 / -1. */
int hs_store_flush(hs_store *st);
/* Commits the open batch when due is set or it holds an urgent row (alarm
 * journal, transfer decision, hydrometer reading, outbox message, command
 * reply): samples and states wait for the next due commit. Returns 1 when
 * it committed, 0 when not, -1 on error. */
int hs_store_commit_due(hs_store *st, int due);

/* ---- writes (batched) -------------------------------------------------- */

/* One raw sample of signal "POND.QUANTITY" (the config's signal name). */
int hs_store_add_sample(hs_store *st, const char *signal, int64_t t_ms, double value,
                        hs_quality quality);
/* The same with why it is not good: reason ("timeout", "exception",
 * "out-of-range", "flatline", ...; NULL or "" for none, at most
 * HS_REASON_MAX - 1 characters kept) and the Modbus exception code or errno
 * behind it (0 = none). */
int hs_store_add_sample_why(hs_store *st, const char *signal, int64_t t_ms, double value,
                            hs_quality quality, const char *reason, int code);

/* The daemon's way: every sample is counted in its minute's rollup as it
 * comes in (hs_store_add_rollup, one call per minute with the minute's n,
 * min, sum, max and worst quality of the values that are known), and only
 * some are kept raw (by exception), marked rolled so that maintenance does
 * not count them twice. */
#define HS_SAMPLE_ROLLED 1 /* already counted in its minute's rollup */
#define HS_SAMPLE_THIN 2   /* not an exception: deleted once older than the full-rate window */
int hs_store_add_sample_rolled(hs_store *st, const char *signal, int64_t t_ms, double value,
                               hs_quality quality, const char *reason, int code, int flags);
/* The full-rate window: HS_SAMPLE_THIN rows older than this are deleted by
 * maintenance (0: they are kept as long as the rest). */
void hs_store_set_full_rate_window(hs_store *st, int64_t window_ms);
int hs_store_add_rollup(hs_store *st, const char *signal, int64_t minute_ms, int64_t n,
                        double vmin, double vsum, double vmax, hs_quality worst);

/* Level and balance columns that the hydrology fills; NaN when unknown. */
typedef struct {
    double depth_m;
    double volume_m3;
    double dissolved_salt_t;
    double deposited_salt_t;
    double net_evaporation_mm_day;
    double days_to_target_low;
    double days_to_target_high;
    double days_to_next_stage;
} hs_pond_extra;

void hs_pond_extra_clear(hs_pond_extra *x); /* all NaN */

/* One computed state of a pond. extra may be NULL (all unknown). */
int hs_store_add_state(hs_store *st, const char *pond, int64_t t_ms, const hc_brine_state *s,
                       const hs_pond_extra *extra, hs_quality quality);
/* The daemon's way (pond states by exception): every computed state is
 * counted in the minute rollups of hs_store_state_fields as it comes in
 * (hs_store_add_rollup on "POND:FIELD"), and only the exceptions are kept
 * as rows, with rolled = 1 so that maintenance does not count them twice. */
int hs_store_add_state_rolled(hs_store *st, const char *pond, int64_t t_ms,
                              const hc_brine_state *s, const hs_pond_extra *extra,
                              hs_quality quality, int rolled);
/* Value of hs_store_state_fields[field] in a state (NaN unknown). */
double hs_store_state_value(const hc_brine_state *s, const hs_pond_extra *extra, int field);

/* One alarm journal row. event_id is unique (the engine assigns it); a
 * duplicate is an error. Strings are copied; note/actor may be NULL. */
typedef struct {
    uint64_t event_id;
    int64_t t_ms;
    const char *pond;
    const char *rule;
    const char *from_state;
    const char *to_state;
    const char *cause;    /* what made the transition: "condition", "ack", ... */
    double value;         /* the measured value at the time; NaN if none */
    double limit;         /* the limit in force; NaN if none */
    int priority;
    const char *actor;    /* who acknowledged or shelved; NULL for the engine */
    const char *note;
    uint64_t episode_id;  /* event that raised the alarm's current episode; 0 none */
    int64_t shelved_until_ms; /* when shelved; 0 otherwise */
} hs_journal_row;

int hs_store_add_journal(hs_store *st, const hs_journal_row *row);
/* Largest event id in the journal, 0 when empty (to seed the engine). */
int hs_store_last_event_id(hs_store *st, uint64_t *out);

/* Latest journal row of each (pond, rule), oldest first, for restoring the
 * alarm states after a restart. The callback's strings live until it
 * returns. Returns 0 / -1. */
typedef void (*hs_journal_fn)(void *ctx, const hs_journal_row *row);
int hs_store_journal_latest(hs_store *st, hs_journal_fn fn, void *ctx);
/* Journal rows with t_ms in [since, until), oldest first. pond may be NULL. */
int hs_store_journal_range(hs_store *st, const char *pond, int64_t since_ms, int64_t until_ms,
                           hs_journal_fn fn, void *ctx);

/* One transfer advice or command; reasons_json is a JSON array text. */
int hs_store_add_transfer(hs_store *st, const char *transfer, int64_t t_ms, const char *advice,
                          const char *reasons_json, int actuated);

/* One operator's hydrometer reading (calibration sample). Unknown numbers NaN. */
typedef struct {
    int64_t t_ms;
    const char *pond;
    double specific_gravity;        /* hydrometer reading [1] */
    double hydrometer_temperature_c;/* temperature of the reading [degC] */
    double reference_temperature_c; /* hydrometer's reference [degC] */
    double conductivity_ms_cm;      /* the inline signal at that time [mS/cm] */
    double temperature_c;           /* the inline temperature [degC] */
    const char *operator_name;      /* may be NULL */
    const char *note;               /* may be NULL */
} hs_calibration_row;

int hs_store_add_calibration(hs_store *st, const hs_calibration_row *row);
typedef void (*hs_calibration_fn)(void *ctx, const hs_calibration_row *row);
/* Readings of one pond (NULL: all), oldest first. */
int hs_store_calibrations(hs_store *st, const char *pond, hs_calibration_fn fn, void *ctx);

/* ---- MQTT outbox --------------------------------------------------------- */

/* What a message is; decides what gives way when the outbox is full. */
typedef enum {
    HS_MSG_STATE = 0,    /* retained pond state: oldest give way when full */
    HS_MSG_ALARM = 1,    /* alarm transition: never dropped */
    HS_MSG_TRANSFER = 2, /* transfer advice: never dropped */
    HS_MSG_GATEWAY = 3,  /* gateway status */
    HS_MSG_REPLY = 4     /* reply to a command */
} hs_msg_kind;

typedef struct {
    int64_t id;          /* outbox row id: increasing in enqueue order */
    hs_msg_kind kind;
    int qos;
    int retained;
    const char *topic;   /* owned by the store; valid until the next outbox call */
    const void *payload;
    size_t payload_len;
} hs_outbox_msg;

/* Queues one message. When the outbox holds outbox_max_rows rows, the oldest
 * state messages are deleted to make room; when there are none to delete, a
 * new state message is refused (returns 1, nothing queued) and any other kind
 * is queued beyond the bound (alarms never give way). Returns 0 queued, 1
 * dropped by policy, -1 error. */
int hs_store_outbox_put(hs_store *st, hs_msg_kind kind, const char *topic, const void *payload,
                        size_t len, int qos, int retained);
/* Up to max rows with id > after_id, in id order, given to fn one by one.
 * Commits the open batch first so that only committed rows leave. Returns the
 * number of rows given, or -1. */
typedef int (*hs_outbox_fn)(void *ctx, const hs_outbox_msg *msg); /* nonzero stops */
int hs_store_outbox_peek(hs_store *st, int64_t after_id, int max, hs_outbox_fn fn, void *ctx);
/* Deletes rows the broker acknowledged, in the open batch: the next commit
 * (hs_store_flush, hs_store_commit_due or a full batch) carries the deletes,
 * none is made for them alone. 0 / -1. */
int hs_store_outbox_done(hs_store *st, const int64_t *ids, size_t n);
/* Changes the outbox bound (rows) of an open store; at least 1. */
void hs_store_set_outbox_max(hs_store *st, int64_t rows);
/* Rows waiting and rows dropped by policy since open. */
int hs_store_outbox_count(hs_store *st, int64_t *waiting);
int64_t hs_store_outbox_dropped(const hs_store *st);

/* ---- maintenance (writer only) ------------------------------------------- */

/* Folds complete minutes before now_ms - grace into 1-minute rollups, complete
 * hours into 1-hour rollups (once hour_fold_every_ms of them wait) and
 * deletes rows past retention, minutes only once folded (the WAL is
 * checkpointed by SQLite every HS_STORE_WAL_PAGES pages). Samples that arrive for a minute already folded are kept
 * raw but not rolled up again. Call it every few seconds to minutes. */
int hs_store_maintain(hs_store *st, int64_t now_ms);
/* The writer's WAL is copied into the file every this many pages (4 MiB of
 * 1 KiB pages): a hot page (a table's last page, the header) rewritten by
 * many commits reaches the file once per checkpoint (flash wear). */
#define HS_STORE_WAL_PAGES 4000
/* Truncating checkpoint (e.g. at shutdown). 0 / -1. */
int hs_store_checkpoint(hs_store *st, int truncate);

/* ---- queries --------------------------------------------------------------- */

/* One point of a history series: raw (n = 1, min = mean = max) or a rollup. */
typedef struct {
    int64_t t_ms;        /* start of the bucket, or the raw sample's time */
    double min, mean, max;
    int64_t count;
    char reason[HS_REASON_MAX]; /* raw sample only: why it is not good, "" none */
    int code;                   /* raw sample only: exception code or errno, 0 none */
    hs_quality worst;
} hs_point;

typedef void (*hs_point_fn)(void *ctx, const hs_point *p);

/* History of one series over [since, until) at step_ms resolution:
 * step 0 gives raw rows; a step that is a multiple of 1 h reads the 1-hour
 * rollups, a multiple of 1 min reads the 1-minute rollups, and combines
 * buckets into steps of that size. series is a signal name ("POND.QUANTITY")
 * or a pond-state quantity ("POND:density_kg_m3"; see hs_store_state_fields).
 * Returns the number of points, or -1 (unknown series is an error). */
int hs_store_history(hs_store *st, const char *series, int64_t since_ms, int64_t until_ms,
                     int64_t step_ms, hs_point_fn fn, void *ctx);

/* The pond-state quantities that are rolled up ("density_kg_m3", ...),
 * NULL-terminated. */
extern const char *const hs_store_state_fields[];
#define HS_STORE_STATE_FIELDS 8 /* entries of hs_store_state_fields before its NULL */

/* Raw pond-state rows of one pond (NULL: all) in [since, until), oldest
 * first, for exports. Strings live until fn returns. */
typedef struct {
    int64_t t_ms;
    const char *pond;
    hc_brine_state state;  /* stage/next_stage/method/warnings/SI halite+gypsum filled */
    hs_pond_extra extra;
    hs_quality quality;
} hs_state_row;
typedef void (*hs_state_fn)(void *ctx, const hs_state_row *row);
int hs_store_states(hs_store *st, const char *pond, int64_t since_ms, int64_t until_ms,
                    hs_state_fn fn, void *ctx);

/* Names of ponds that have states, sorted; fn called per name. */
int hs_store_ponds(hs_store *st, void (*fn)(void *ctx, const char *pond), void *ctx);

/* Named integers kept in the store (store_meta): the daemon's marks for
 * `status` ("daemon_pid", "daemon_started_ms", "daemon_seen_ms",
 * "daemon_stopped_ms") beside the store's own. get gives def when the key is
 * absent. 0, or -1 with hs_store_error(). */
int hs_store_meta_get(hs_store *st, const char *key, int64_t def, int64_t *out);
int hs_store_meta_set(hs_store *st, const char *key, int64_t value);

/* ---- commands queued by the CLI for the daemon --------------------------- */

/* The CLI (another process) queues a command as JSON text; the daemon takes
 * pending ones, applies them as it applies MQTT commands, and records the
 * reply. Returns 0 and the row id in *id, or -1. */
int hs_store_command_put(hs_store *st, const char *json, int64_t t_ms, int64_t *id);
/* Pending commands oldest first; fn's return value is the reply JSON
 * (caller-owned, may be NULL) which the store records, marking the row done. */
typedef char *(*hs_command_fn)(void *ctx, int64_t id, const char *json);
int hs_store_command_take(hs_store *st, hs_command_fn fn, void *ctx);
/* The reply of command id: 1 and a malloc'ed copy in *reply (caller frees)
 * once answered, 0 while pending, -1 on error or unknown id. */
int hs_store_command_reply(hs_store *st, int64_t id, char **reply);

/* Inbound commands already answered, by key ("id:REQUEST_ID" or
 * "retained:HASH"): 1 and the recorded reply (malloc'ed, caller frees) and
 * its ok flag when seen, 0 when not, -1 on error. Kept 30 days
 * (hs_store_maintain). */
int hs_store_command_seen(hs_store *st, const char *key, int *ok, char **reply);
int hs_store_command_seen_add(hs_store *st, const char *key, int64_t t_ms, int ok,
                              const char *reply);

#endif
