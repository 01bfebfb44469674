/* Strict option-value parsing shared by the subcommands (see cli_number.h). */
#include "cli/cli_number.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <strings.h>

#include "hc_baume.h"

int hs_cli_number(const char *cmd, const char *opt, const char *text, double *out)
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

int hs_cli_tref(const char *cmd, const char *text, double lo_c, double hi_c, double *t_ref_c)
{
    if (strcasecmp(text, "60F") == 0) {
        *t_ref_c = HC_TREF_60F;
        return 0;
    }
    double v;
    if (hs_cli_number(cmd, "--reference-temperature", text, &v) != 0)
        return -1;
    if (v < lo_c || v > hi_c) {
        fprintf(stderr, "halostage %s: --reference-temperature %s: outside %.0f..%.0f degC "
                        "(usual: 15, 20 or 60F)\n", cmd, text, lo_c, hi_c);
        return -1;
    }
    *t_ref_c = v;
    return 0;
}

const char *hs_cli_value(const char *cmd, int argc, char **argv, int *i)
{
    if (*i + 1 >= argc) {
        fprintf(stderr, "halostage %s: %s needs a value (see --help)\n", cmd, argv[*i]);
        return NULL;
    }
    *i += 1;
    return argv[*i];
}
