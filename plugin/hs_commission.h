/* Commissioning entry points of halostaged (plugin/host/halostaged.c calls
 * them; they hold the logic so that the host stays thin). Each returns a
 * process exit status: 0 ok, 1 runtime failure, 78 bad configuration. */
#ifndef HS_COMMISSION_H
#define HS_COMMISSION_H

#include <stdbool.h>

/* --check: loads the file; a summary on stdout, or every FILE:LINE: error on
 * stderr (exit 78). */
int hs_check_run(const char *config_path);

/* --once: reads every configured signal once (all buses in parallel), then
 * prints each signal's registers, raw and decoded value and quality, and each
 * pond's state. json: one JSON line per pond (brine-state fields, plus pond,
 * role, depth_m, problem, level_problem and signals). Exit 0 when every
 * signal read good, 1 otherwise, 78 for a bad configuration. */
int hs_once_run(const char *config_path, bool json);

#endif
