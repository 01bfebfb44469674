/* See hs_log.h. The sink is process-wide on purpose: a host loads the
 * plugin once, and every module logs through the same place. */
#include <stdio.h>

#include "hs_log.h"

static hs_log_sink log_sink;
static void *log_data;

void hs_log_set_sink(hs_log_sink sink, void *data)
{
    log_sink = sink;
    log_data = data;
}

void hs_log(int level, const char *fmt, ...)
{
    char line[1024];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(line, sizeof line, fmt, ap);
    va_end(ap);
    if (log_sink != NULL) {
        log_sink(log_data, level, "%s", line);
        return;
    }
    static const char *const names[] = {"error", "error", "error", "error",
                                        "warning", "notice", "info", "debug"};
    fprintf(stderr, "halostage: %s: %s\n", names[level >= 0 && level <= 7 ? level : 3], line);
}
