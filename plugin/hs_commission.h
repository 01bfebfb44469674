/* Commissioning entry points of halostaged (plugin/host/halostaged.c calls
 * them; they hold the logic so that the host stays thin). Each returns a
 * process exit status: 0 ok, 1 runtime failure, 78 bad configuration. */
#ifndef HS_COMMISSION_H
#define HS_COMMISSION_H

#include <stdbool.h>

/* --check: loads the file; a summary on stdout, or every FILE:LINE: error on
 * stderr (exit 78). */
int hs_check_run(const char *config_path);

#endif
