#include <getopt.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "cli/ion_args.h"
#include "hc_baume.h"

/* Returns 0 or -1 (message printed). */
int hs_cli_parse_number(const char *cmd, const char *opt, const char *text, double *out)
{
    char *end = NULL;
    errno = 0;
    double v = strtod(text, &end);
    if (end == text || *end != '\0' || errno != 0 || !isfinite(v)) {
        fprintf(stderr, "halostage %s: %s: '%s' is not a number\n", cmd, opt, text);
        return -1;
    }
    *out = v;
    return 0;
}

void hs_cli_bad_option(const char *cmd, char *const *argv, int argc)
{
    /* getopt leaves optind past the offending word (and past a missing value). */
    const char *word = optind > 0 && optind <= argc ? argv[optind - 1] : "?";
    if (optopt != 0 && word[0] == '-' && word[1] != '-')
        fprintf(stderr, "halostage %s: option '-%c' unknown or missing its value (see --help)\n",
                cmd, optopt);
    else
        fprintf(stderr, "halostage %s: option '%.80s' unknown or missing its value (see --help)\n",
                cmd, word);
}

/* Returns 0 or -1 (message printed). */
int hs_cli_parse_tref(const char *cmd, const char *text, double *t_ref_c)
{
    if (strcasecmp(text, "60F") == 0) {
        *t_ref_c = HC_TREF_60F;
        return 0;
    }
    if (hs_cli_parse_number(cmd, "--reference-temperature", text, t_ref_c) != 0)
        return -1;
    if (*t_ref_c < 0.0 || *t_ref_c > 40.0) {
        fprintf(stderr, "halostage %s: --reference-temperature %s: outside 0..40 degC "
                        "(usual: 15, 20 or 60F)\n", cmd, text);
        return -1;
    }
    return 0;
}

static void known_ions(void)
{
    fprintf(stderr, " (known:");
    for (int i = 0; i < HC_ION_COUNT; i++)
        fprintf(stderr, " %s", hc_ion_name((hc_ion)i));
    fprintf(stderr, ")\n");
}

/* Returns 0 or -1 (message printed). */
int hs_cli_parse_ions(const char *cmd, const char *opt, const char *text,
                      double value[HC_ION_COUNT])
{
    int seen[HC_ION_COUNT] = {0};
    for (int i = 0; i < HC_ION_COUNT; i++)
        value[i] = 0.0;
    const char *p = text;
    int any = 0;
    while (*p != '\0') {
        const char *comma = strchr(p, ',');
        size_t len = comma != NULL ? (size_t)(comma - p) : strlen(p);
        char item[64];
        if (len == 0 || len >= sizeof item) {
            fprintf(stderr, "halostage %s: %s: empty or overlong item in '%s'\n", cmd, opt, text);
            return -1;
        }
        memcpy(item, p, len);
        item[len] = '\0';
        char *eq = strchr(item, '=');
        if (eq == NULL) {
            fprintf(stderr, "halostage %s: %s: '%s' should be ION=VALUE, e.g. Na=6.0\n", cmd,
                    opt, item);
            return -1;
        }
        *eq = '\0';
        int ion = -1;
        for (int i = 0; i < HC_ION_COUNT; i++)
            if (strcasecmp(item, hc_ion_name((hc_ion)i)) == 0)
                ion = i;
        if (ion < 0) {
            fprintf(stderr, "halostage %s: %s: unknown ion '%s'", cmd, opt, item);
            known_ions();
            return -1;
        }
        if (seen[ion]) {
            fprintf(stderr, "halostage %s: %s: %s is given twice\n", cmd, opt,
                    hc_ion_name((hc_ion)ion));
            return -1;
        }
        seen[ion] = 1;
        char what[96];
        snprintf(what, sizeof what, "%s %s", opt, hc_ion_name((hc_ion)ion));
        double v;
        if (hs_cli_parse_number(cmd, what, eq + 1, &v) != 0)
            return -1;
        if (v < 0.0) {
            fprintf(stderr, "halostage %s: %s: %s=%s cannot be negative\n", cmd, opt,
                    hc_ion_name((hc_ion)ion), eq + 1);
            return -1;
        }
        value[ion] = v;
        any |= v > 0.0;
        p += len;
        if (*p == ',' && *++p == '\0') {
            fprintf(stderr, "halostage %s: %s: '%s' ends with a comma\n", cmd, opt, text);
            return -1;
        }
    }
    if (!any) {
        fprintf(stderr, "halostage %s: %s: give at least one ion above zero, e.g. Na=6,Cl=6\n",
                cmd, opt);
        return -1;
    }
    return 0;
}
