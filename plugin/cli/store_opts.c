/* Shared CLI helpers for the history views (see store_opts.h). */
#include <stdio.h>
#include <string.h>
#include <time.h>

#include "store_opts.h"

int64_t hs_cli_now_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int hs_cli_load_site(const char *config, hs_site *site)
{
    hs_diag diag;
    if (hs_site_load(config, site, &diag) == 0)
        return 0;
    for (unsigned i = 0; i < diag.n; i++)
        fprintf(stderr, "%s\n", diag.msg[i]);
    return HS_EXIT_CONFIG;
}

int hs_cli_open(const char *config, hs_site *site, hs_store **st)
{
    if (hs_cli_load_site(config, site) != 0)
        return HS_EXIT_CONFIG;
    char err[600];
    *st = hs_store_open(site->site.database, HS_STORE_READ, NULL, err, sizeof err);
    if (*st == NULL) {
        fprintf(stderr, "halostage: %s\n", err);
        hs_site_free(site);
        return 1;
    }
    return 0;
}

int hs_cli_known_pond(const char *cmd, const char *opt, const hs_site *site, const char *name)
{
    if (name == NULL || hs_site_pond(site, name) >= 0)
        return 0;
    char hint[200];
    fprintf(stderr, "halostage %s: %s %s: no pond '%s' in %s%s\n", cmd, opt, name, name,
            site->path, hs_site_pond_hint(site, name, hint, sizeof hint));
    return 2;
}

int hs_cli_known_signal(const char *cmd, const hs_site *site, const char *name)
{
    if (name == NULL)
        return 0;
    for (size_t i = 0; i < site->n_signals; i++)
        if (strcmp(site->signals[i].name, name) == 0)
            return 0;
    char hint[200];
    fprintf(stderr, "halostage %s: --signal %s: no [signal %s] in %s%s\n", cmd, name, name,
            site->path, hs_site_signal_hint(site, name, hint, sizeof hint));
    return 2;
}

int hs_cli_time(const char *text, int64_t now_ms, int64_t *out_ms, char *msg, size_t len)
{
    if (strcmp(text, "now") == 0) {
        *out_ms = now_ms;
        return 0;
    }
    static const char *const formats[] = {"%Y-%m-%dT%H:%M:%SZ", "%Y-%m-%dT%H:%M:%S",
                                          "%Y-%m-%dT%H:%MZ",    "%Y-%m-%dT%H:%M",
                                          "%Y-%m-%d %H:%M:%S",  "%Y-%m-%d %H:%M",
                                          "%Y-%m-%d"};
    for (size_t i = 0; i < sizeof formats / sizeof formats[0]; i++) {
        struct tm tm;
        memset(&tm, 0, sizeof tm);
        const char *end = strptime(text, formats[i], &tm);
        if (end != NULL && *end == '\0') {
            *out_ms = (int64_t)timegm(&tm) * 1000; /* times are UTC */
            return 0;
        }
    }
    int64_t ago;
    char why[160];
    if (hs_parse_duration_ms(text, &ago, why, sizeof why) == 0) {
        *out_ms = now_ms - ago;
        return 0;
    }
    snprintf(msg, len, "'%s' is neither a duration back from now (7d, 6h, 90min) nor a UTC "
                       "time (2026-03-01T06:00Z)", text);
    return -1;
}

int hs_cli_window(const char *cmd, const char *since_text, const char *until_text,
                  int64_t *since_ms, int64_t *until_ms)
{
    char msg[256];
    int64_t now = hs_cli_now_ms();
    if (hs_cli_time(since_text, now, since_ms, msg, sizeof msg) != 0 ||
        hs_cli_time(until_text, now, until_ms, msg, sizeof msg) != 0) {
        fprintf(stderr, "halostage %s: %s\n", cmd, msg);
        return -1;
    }
    return 0;
}
