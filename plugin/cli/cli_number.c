/* Strict option-value parsing shared by the subcommands (see cli_number.h). */
#include "cli/cli_number.h"

#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "hc_baume.h"
#include "hs_config.h"

/* The quantity an option carries, known by the end of its name, with the
 * unit the command works in: "--from-level" takes a length in m, so "40cm"
 * is read as the site file would read it. */
struct opt_quantity {
    const char *suffix;
    const hs_unit_kind *kind;
    const char *unit;  /* what a bare number means */
    double per_si;     /* option unit per SI unit of the kind */
};

static const struct opt_quantity *quantity_of(const char *opt)
{
    static const struct opt_quantity table[] = {
        {"temperature", &hs_unit_temperature, "degC", 1.0},
        {"conductivity", &hs_unit_conductivity, "mS/cm", 1.0},
        {"density", &hs_unit_density, "kg/m3", 1.0},
        {"pressure", &hs_unit_pressure, "dbar", 1e-4},
        {"level", &hs_unit_length, "m", 1.0},
        {"crest", &hs_unit_length, "m", 1.0},
        {"area", &hs_unit_area, "m2", 1.0},
    };
    size_t n = strlen(opt);
    for (size_t i = 0; i < sizeof table / sizeof table[0]; i++) {
        size_t k = strlen(table[i].suffix);
        if (n >= k && strcmp(opt + n - k, table[i].suffix) == 0)
            return &table[i];
    }
    return NULL;
}

/* Bare numbers that are almost surely in a neighbouring unit: a conductivity
 * in uS/cm (brines stay below 300 mS/cm) or a density in g/cm3 (SG-like). */
static int slip(const char *cmd, const char *opt, const char *text, double v,
                const struct opt_quantity *q)
{
    if (q == NULL)
        return 0;
    if (q->kind == &hs_unit_conductivity && v > 1000.0) {
        fprintf(stderr, "halostage %s: %s %s: that is more than any brine conducts in mS/cm; "
                "in uS/cm it is %.6g mS/cm (write '%s uS/cm' or %.6g)\n", cmd, opt, text,
                v / 1000.0, text, v / 1000.0);
        return 1;
    }
    if (q->kind == &hs_unit_density && v > 0.0 && v < 3.0) {
        fprintf(stderr, "halostage %s: %s %s: densities are in kg/m3; as g/cm3 it is %.6g "
                "kg/m3 (write '%s g/cm3' or %.6g)\n", cmd, opt, text, v * 1000.0, text,
                v * 1000.0);
        return 1;
    }
    return 0;
}

int hs_cli_number(const char *cmd, const char *opt, const char *text, double *out)
{
    char *end = NULL;
    errno = 0;
    double v = strtod(text, &end);
    const struct opt_quantity *q = quantity_of(opt);
    /* decimal only: strtod also reads hexadecimal ("0x10", "0x1p4") */
    const char *hex = strpbrk(text, "xXpP");
    if (hex != NULL && end != NULL && hex < end) {
        fprintf(stderr, "halostage %s: %s: '%s' is not a decimal number\n", cmd, opt, text);
        return -1;
    }
    if (end != text && *end != '\0' && errno == 0 && isfinite(v) && q != NULL) {
        char msg[200];
        double si;
        if (hs_parse_quantity(text, q->kind, &si, msg, sizeof msg) != 0) {
            fprintf(stderr, "halostage %s: %s: %s (a bare number is %s)\n", cmd, opt, msg,
                    q->unit);
            return -1;
        }
        *out = si * q->per_si;
        return 0;
    }
    if (end == text || *end != '\0' || errno != 0 || !isfinite(v)) {
        if (q != NULL)
            fprintf(stderr, "halostage %s: %s: '%s' is not a number (a %s in %s, or with its "
                    "unit as in the site file)\n", cmd, opt, text, q->kind->what, q->unit);
        else
            fprintf(stderr, "halostage %s: %s: '%s' is not a number\n", cmd, opt, text);
        return -1;
    }
    if (slip(cmd, opt, text, v, q))
        return HS_CLI_RANGE;
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
    int rc = hs_cli_number(cmd, "--reference-temperature", text, &v);
    if (rc != 0)
        return rc;
    if (v < lo_c || v > hi_c) {
        fprintf(stderr, "halostage %s: --reference-temperature %s: outside %.0f..%.0f degC "
                        "(usual: 15, 20 or 60F)\n", cmd, text, lo_c, hi_c);
        return HS_CLI_RANGE;
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
