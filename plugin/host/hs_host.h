/* halostaged's own parts: leveled logging, loading the plugin through its
 * versioned ABI, and the service loop (signals, sd_notify, watchdog).
 * The host knows nothing of ponds: all of the job lives in the plugin.
 * Error convention: functions returning int give 0 on success, -1 on
 * failure after logging the reason. */
#ifndef HS_HOST_H
#define HS_HOST_H

#include <stdarg.h>
#include <stddef.h>

#include "halostage_plugin.h"

/* ---- logging (hs_host_log.c) ---- */

/* Lines go to stderr. Under journald (JOURNAL_STREAM set) each line starts
 * with the syslog priority "<N>", which journald turns into the entry's
 * priority; otherwise it reads "halostaged: warning: ...". */
void hs_host_log_init(const char *ident, int max_level);
void hs_host_log_set_level(int max_level);
int hs_host_log_level_from_name(const char *name); /* -1 if unknown */
void hs_host_log(int level, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
void hs_host_vlog(int level, const char *fmt, va_list ap) __attribute__((format(printf, 2, 0)));

/* ---- plugin loading (hs_host_plugin.c) ---- */

struct hs_host_plugin {
    void *dl;                          /* dlopen handle; owned */
    int abi_version;                   /* the version negotiated */
    const struct hsp_plugin_v1 *ops;   /* borrowed from the plugin */
    void *instance;                    /* the plugin's; freed by ops->close */
};

/* The plugin next to the executable, else in ../lib/halostage/ from it,
 * else the installed path. Writes into buf. */
void hs_host_default_plugin_path(char *buf, size_t len);
/* dlopen + version negotiation + ops lookup. Refuses (-1, logged) a missing
 * entry point, a refusal, or a version this host did not offer. */
int hs_host_plugin_load(struct hs_host_plugin *plugin, const char *path);
/* dlclose; call after ops->close. */
void hs_host_plugin_unload(struct hs_host_plugin *plugin);

/* ---- service mode (hs_host_service.c) ---- */

struct hs_host_options {
    const char *config_path;
    const char *plugin_path; /* NULL: hs_host_default_plugin_path() */
    unsigned max_runtime_s;  /* 0: until a signal; for tests and demos */
    int emit_stdout;         /* print every emitted value on stdout */
};

/* Runs until SIGTERM/SIGINT (or max_runtime_s). Returns the process exit
 * status: 0 clean stop, 1 runtime failure, 78 bad config, 69 plugin refused. */
int hs_host_service_run(const struct hs_host_options *options);

#endif
