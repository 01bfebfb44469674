/* Shared by the CLI's history views (history, export, ack): opening the
 * site's store for reading, and time arguments. Error convention: 0 / -1
 * with the reason already printed on stderr (or in msg). */
#ifndef HS_CLI_STORE_OPTS_H
#define HS_CLI_STORE_OPTS_H

#include <stddef.h>
#include <stdint.h>

#include "hs_config.h"
#include "hs_store.h"

/* Loads the site file; on failure prints every FILE:LINE: message on stderr
 * and returns HS_EXIT_CONFIG (78), else 0 (the caller frees the site). */
int hs_cli_load_site(const char *config, hs_site *site);

/* Loads config and opens its database (HS_STORE_READ). Returns 0, or the
 * exit status to return (78 bad config, 1 no store) after printing why. On
 * success the caller frees with hs_site_free() and hs_store_close(). */
int hs_cli_open(const char *config, hs_site *site, hs_store **st);

/* A point in time: a duration back from now ("7d", "90min"), "now", or a
 * UTC date/time ("2026-03-01", "2026-03-01T06:00", "2026-03-01T06:00:00Z").
 * 0, or -1 with a reason in msg. */
int hs_cli_time(const char *text, int64_t now_ms, int64_t *out_ms, char *msg, size_t len);

int64_t hs_cli_now_ms(void);

/* A --pond (or --signal POND.QUANTITY) the site file must have. 0 when it
 * does (or name is NULL); else prints "halostage CMD: OPT NAME: no pond 'NAME'
 * in FILE (did you mean 'x'? | ponds: a, b)" and returns 2 (a usage error). */
int hs_cli_known_pond(const char *cmd, const char *opt, const hs_site *site, const char *name);
int hs_cli_known_signal(const char *cmd, const hs_site *site, const char *name);

/* --since and --until of CMD, each as hs_cli_time reads it against the same
 * "now". 0, or -1 after printing "halostage CMD: reason" on stderr. */
int hs_cli_window(const char *cmd, const char *since_text, const char *until_text,
                  int64_t *since_ms, int64_t *until_ms);

#endif
