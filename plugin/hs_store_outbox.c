/* History store: the MQTT outbox. Rows leave in id order and only when the
 * broker acknowledged them (the publisher calls hs_store_outbox_done). The
 * bound and its policy are described in hs_store.h. An acknowledgement is
 * not urgent: its delete waits in the open batch for the next commit (a
 * crash before it sends the row once more, which QoS 1 allows), so the
 * daemon does not commit once per published message. */
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_store_private.h"

static int64_t wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int hs_store_outbox_count(hs_store *st, int64_t *waiting)
{
    if (st->outbox_rows >= 0) {
        *waiting = st->outbox_rows;
        return 0;
    }
    sqlite3_stmt *s = hs_store_stmt(st, SQL_OUTBOX_COUNT);
    if (s == NULL)
        return -1;
    int rc = sqlite3_step(s);
    if (rc == SQLITE_ROW)
        st->outbox_rows = sqlite3_column_int64(s, 0);
    sqlite3_reset(s);
    if (rc != SQLITE_ROW)
        return hs_store_fail_db(st, "counting the outbox");
    *waiting = st->outbox_rows;
    return 0;
}

int64_t hs_store_outbox_dropped(const hs_store *st) { return st->outbox_dropped; }

void hs_store_set_outbox_max(hs_store *st, int64_t rows)
{
    st->opt.outbox_max_rows = rows < 1 ? 1 : rows;
}

int hs_store_outbox_put(hs_store *st, hs_msg_kind kind, const char *topic, const void *payload,
                        size_t len, int qos, int retained)
{
    if (topic == NULL || *topic == '\0' || (payload == NULL && len > 0) || qos < 0 || qos > 2 ||
        kind > HS_MSG_REPLY || len > (size_t)INT32_MAX)
        return hs_store_fail(st, "outbox: invalid message");
    if (hs_store_batch_begin(st) != 0)
        return -1;
    int64_t rows;
    if (hs_store_outbox_count(st, &rows) != 0)
        return -1;
    if (rows >= st->opt.outbox_max_rows) {
        /* Full: the oldest state updates give way (a newer one of the same
         * pond follows anyway); alarms and the rest never do. */
        sqlite3_stmt *d = hs_store_stmt(st, SQL_OUTBOX_DROP_STATE);
        if (d == NULL)
            return -1;
        sqlite3_bind_int64(d, 1, rows - st->opt.outbox_max_rows + 1);
        int rc = sqlite3_step(d);
        sqlite3_reset(d);
        if (rc != SQLITE_DONE)
            return hs_store_fail_db(st, "making room in the outbox");
        int gone = sqlite3_changes(st->db);
        st->outbox_rows -= gone;
        st->outbox_dropped += gone;
        if (st->outbox_rows >= st->opt.outbox_max_rows && kind == HS_MSG_STATE) {
            st->outbox_dropped++;
            return 1;
        }
    }
    if (kind == HS_MSG_STATE) {
        /* A retained state replaces the pond's previous one: keep only the
         * latest per topic (the outbox is written less, the reconnect
         * sends less, the broker keeps the same). */
        sqlite3_stmt *d = NULL;
        if (sqlite3_prepare_v2(st->db, "DELETE FROM outbox WHERE kind = 0 AND topic = ?1", -1,
                               &d, NULL) != SQLITE_OK)
            return hs_store_fail_db(st, "replacing a queued state");
        sqlite3_bind_text(d, 1, topic, -1, SQLITE_TRANSIENT);
        int rc = sqlite3_step(d);
        sqlite3_finalize(d);
        if (rc != SQLITE_DONE)
            return hs_store_fail_db(st, "replacing a queued state");
        st->outbox_rows -= sqlite3_changes(st->db);
    }
    sqlite3_stmt *s = hs_store_stmt(st, SQL_OUTBOX_ADD);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, wall_ms());
    sqlite3_bind_int(s, 2, (int)kind);
    sqlite3_bind_int(s, 3, qos);
    sqlite3_bind_int(s, 4, retained != 0);
    sqlite3_bind_text(s, 5, topic, -1, SQLITE_TRANSIENT);
    sqlite3_bind_blob(s, 6, len ? payload : "", (int)len, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s);
    sqlite3_reset(s);
    if (rc != SQLITE_DONE)
        return hs_store_fail_db(st, "queueing an MQTT message");
    st->outbox_rows++;
    if (kind != HS_MSG_STATE) /* a state may wait for the batch: the next one replaces it */
        hs_store_mark_urgent(st);
    return hs_store_wrote(st);
}

int hs_store_outbox_peek(hs_store *st, int64_t after_id, int max, hs_outbox_fn fn, void *ctx)
{
    if (hs_store_commit_due(st, 0) < 0) /* outbox rows are urgent: committed first */
        return -1;
    sqlite3_stmt *s = hs_store_stmt(st, SQL_OUTBOX_PEEK);
    if (s == NULL)
        return -1;
    sqlite3_bind_int64(s, 1, after_id);
    sqlite3_bind_int(s, 2, max);
    int rc, n = 0;
    while ((rc = sqlite3_step(s)) == SQLITE_ROW) {
        hs_outbox_msg m = {
            .id = sqlite3_column_int64(s, 0),
            .kind = (hs_msg_kind)sqlite3_column_int(s, 1),
            .qos = sqlite3_column_int(s, 2),
            .retained = sqlite3_column_int(s, 3),
            .topic = (const char *)sqlite3_column_text(s, 4),
            .payload = sqlite3_column_blob(s, 5),
            .payload_len = (size_t)sqlite3_column_bytes(s, 5),
        };
        n++;
        if (fn(ctx, &m) != 0)
            break;
    }
    sqlite3_reset(s);
    if (rc != SQLITE_ROW && rc != SQLITE_DONE)
        return hs_store_fail_db(st, "reading the outbox");
    return n;
}

int hs_store_outbox_done(hs_store *st, const int64_t *ids, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        if (hs_store_batch_begin(st) != 0) /* again after a full batch committed */
            return -1;
        sqlite3_stmt *s = hs_store_stmt(st, SQL_OUTBOX_DEL);
        if (s == NULL)
            return -1;
        sqlite3_bind_int64(s, 1, ids[i]);
        int rc = sqlite3_step(s);
        sqlite3_reset(s);
        if (rc != SQLITE_DONE)
            return hs_store_fail_db(st, "removing a sent message");
        if (sqlite3_changes(st->db) > 0 && st->outbox_rows > 0)
            st->outbox_rows--;
        if (hs_store_wrote(st) != 0) /* a full batch commits; otherwise the next commit */
            return -1;
    }
    return 0;
}
