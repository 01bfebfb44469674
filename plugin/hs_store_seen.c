/* Inbound commands already answered (see hs_store.h). Plain statements: a
 * command is rare next to samples. */
#include <stdlib.h>
#include <string.h>

#include "hs_store_private.h"

int hs_store_command_seen(hs_store *st, const char *key, int *ok, char **reply)
{
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, "SELECT ok, reply FROM command_seen WHERE key = ?1", -1, &s,
                           NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "looking up a command");
    sqlite3_bind_text(s, 1, key, -1, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s), found = 0;
    if (rc == SQLITE_ROW) {
        *ok = sqlite3_column_int(s, 0);
        const unsigned char *text = sqlite3_column_text(s, 1);
        *reply = strdup(text ? (const char *)text : "{}");
        found = *reply != NULL ? 1 : -1;
    } else if (rc != SQLITE_DONE) {
        found = -1;
    }
    sqlite3_finalize(s);
    return found < 0 ? hs_store_fail_db(st, "looking up a command") : found;
}

int hs_store_command_seen_add(hs_store *st, const char *key, int64_t t_ms, int ok,
                              const char *reply)
{
    if (hs_store_batch_begin(st) != 0)
        return -1;
    hs_store_mark_urgent(st);
    sqlite3_stmt *s = NULL;
    if (sqlite3_prepare_v2(st->db, "INSERT OR REPLACE INTO command_seen(key, t_ms, ok, reply)"
                                   " VALUES(?1, ?2, ?3, ?4)", -1, &s, NULL) != SQLITE_OK)
        return hs_store_fail_db(st, "recording a command");
    sqlite3_bind_text(s, 1, key, -1, SQLITE_TRANSIENT);
    sqlite3_bind_int64(s, 2, t_ms);
    sqlite3_bind_int(s, 3, ok ? 1 : 0);
    sqlite3_bind_text(s, 4, reply, -1, SQLITE_TRANSIENT);
    int rc = sqlite3_step(s);
    sqlite3_finalize(s);
    return rc == SQLITE_DONE ? 0 : hs_store_fail_db(st, "recording a command");
}
