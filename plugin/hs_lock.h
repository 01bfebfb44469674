/* One daemon per site. A running pipeline holds an exclusive
 * open-file-description lock (fcntl F_OFD_SETLK, Linux 3.15+) on the file
 * DATABASE.lock next to the history database, and writes its PID into it.
 * SQLite's own locks cannot tell "another daemon" from "a reader", and the
 * CLI (a WAL reader) must keep working: it never takes this lock, it only
 * asks who holds it (hs_lock_holder). The kernel drops the lock when the
 * process ends, however it ends, so a stale file never blocks a restart.
 *
 * Memory: hs_lock_take allocates the handle; hs_lock_release closes and
 * frees it (the file stays, so the lock's inode stays the same for all).
 * Error convention: 0 success, -1 with a sentence in err. */
#ifndef HS_LOCK_H
#define HS_LOCK_H

#include <stddef.h>

typedef struct hs_lock hs_lock;

/* Takes the site lock for database. When another process holds it, err
 * names that process ("held by PID N") and the lock file. */
int hs_lock_take(const char *database, hs_lock **out, char *err, size_t err_len);
void hs_lock_release(hs_lock *lock);

/* 1 when some process holds the lock of database (*pid its PID as it wrote
 * it, 0 when unreadable), 0 when nobody does (or there is no lock file),
 * -1 on an error (err says which). Takes no lock itself. */
int hs_lock_holder(const char *database, long *pid, char *err, size_t err_len);

/* The lock file's path for database, into buf (as snprintf). */
int hs_lock_path(const char *database, char *buf, size_t len);

#endif
