/* Logging for the plugin layer. Lines go to whichever host loaded the
 * plugin (its log function, set by hs_plugin.c at open), or to stderr when
 * the plugin code runs inside a program without a host (the CLI, tests).
 * Levels are the ABI's (syslog numbers). Safe from any thread as long as
 * the sink is (the ABI requires hosts' log functions to be). */
#ifndef HS_LOG_H
#define HS_LOG_H

#include <stdarg.h>

#include "halostage_plugin.h"

typedef void (*hs_log_sink)(void *data, int level, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Routes every later line to sink(data, ...); NULL restores stderr. */
void hs_log_set_sink(hs_log_sink sink, void *data);
void hs_log(int level, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

#endif
