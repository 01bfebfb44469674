/* Leveled logging to stderr in a form journald keeps well. One module for
 * the whole host; the plugin's lines come through hs_host_vlog too. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_host.h"

static const char *log_ident = "halostaged";
static int log_max_level = HSP_LOG_INFO;
static int log_journal; /* stderr is connected to journald */

static const char *const level_names[] = {
    [HSP_LOG_ERR] = "error",     [HSP_LOG_WARNING] = "warning", [HSP_LOG_NOTICE] = "notice",
    [HSP_LOG_INFO] = "info",     [HSP_LOG_DEBUG] = "debug",
};

void hs_host_log_init(const char *ident, int max_level)
{
    log_ident = ident;
    log_max_level = max_level;
    /* systemd sets JOURNAL_STREAM when stderr is a journal stream. */
    log_journal = getenv("JOURNAL_STREAM") != NULL;
}

void hs_host_log_set_level(int max_level)
{
    log_max_level = max_level;
}

int hs_host_log_level_from_name(const char *name)
{
    for (int i = HSP_LOG_ERR; i <= HSP_LOG_DEBUG; i++)
        if (strcmp(name, level_names[i]) == 0)
            return i;
    return -1;
}

void hs_host_vlog(int level, const char *fmt, va_list ap)
{
    if (level < HSP_LOG_ERR)
        level = HSP_LOG_ERR;
    if (level > HSP_LOG_DEBUG)
        level = HSP_LOG_DEBUG;
    if (level > log_max_level)
        return;
    int saved = errno; /* logging never disturbs the caller's errno */
    char line[1024];
    vsnprintf(line, sizeof line, fmt, ap);
    /* One write per line so lines from threads never interleave; newlines
     * inside a message would split a journal entry, so flatten them. */
    for (char *p = line; *p; p++)
        if (*p == '\n' || *p == '\r')
            *p = ' ';
    if (log_journal)
        fprintf(stderr, "<%d>%s\n", level, line);
    else
        fprintf(stderr, "%s: %s: %s\n", log_ident, level_names[level], line);
    errno = saved;
}

void hs_host_log(int level, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    hs_host_vlog(level, fmt, ap);
    va_end(ap);
}
