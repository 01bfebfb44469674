#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "cli/cli_number.h"
#include "cli/ion_args.h"

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
        if (hs_cli_number(cmd, what, eq + 1, &v) != 0)
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

/* Br= and Sr= are taken out of the list into *br and *sr (the feed lumps them
 * into Cl and Ca, mole for mole); the rest is parsed as hs_cli_parse_ions. */
int hs_cli_parse_feed_ions(const char *cmd, const char *opt, const char *text,
                           double value[HC_ION_COUNT], double *br, double *sr)
{
    char rest[512];
    size_t used = 0;
    *br = *sr = 0.0;
    if (strlen(text) >= sizeof rest) {
        fprintf(stderr, "halostage %s: %s: the list is too long\n", cmd, opt);
        return -1;
    }
    const char *p = text;
    while (*p != '\0') {
        const char *comma = strchr(p, ',');
        size_t len = comma != NULL ? (size_t)(comma - p) : strlen(p);
        double *minor = NULL;
        if (len > 3 && (strncasecmp(p, "Br=", 3) == 0))
            minor = br;
        else if (len > 3 && (strncasecmp(p, "Sr=", 3) == 0))
            minor = sr;
        if (minor != NULL) {
            char num[64];
            if (len - 3 >= sizeof num) {
                fprintf(stderr, "halostage %s: %s: overlong item in '%s'\n", cmd, opt, text);
                return -1;
            }
            memcpy(num, p + 3, len - 3);
            num[len - 3] = '\0';
            if (hs_cli_number(cmd, opt, num, minor) != 0)
                return -1;
            if (*minor < 0) {
                fprintf(stderr, "halostage %s: %s: %.2s=%s must not be negative\n", cmd, opt, p,
                        num);
                return -1;
            }
        } else {
            if (used > 0)
                rest[used++] = ',';
            memcpy(rest + used, p, len);
            used += len;
        }
        p += len;
        if (*p == ',')
            p++;
    }
    rest[used] = '\0';
    return hs_cli_parse_ions(cmd, opt, rest, value);
}
