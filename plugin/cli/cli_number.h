/* Strict parsing of option values shared by every `halostage` subcommand.
 * Error convention: 0 on success; -1 after printing one line on stderr of the
 * form "halostage CMD: OPT: what is wrong" (the output is left untouched). */
#ifndef HS_CLI_NUMBER_H
#define HS_CLI_NUMBER_H

/* The whole of TEXT must be one finite number (no trailing characters, no
 * overflow, no inf/nan): "halostage CMD: OPT: 'TEXT' is not a number".
 * Options whose name ends in a quantity (temperature, conductivity, density,
 * pressure, level, crest, area) also take a number with a unit, as the site
 * file does ("77F", "40cm", "20ha", "1.215 g/cm3"), converted to the unit the
 * command works in, and a bare number that is almost surely a slip of unit
 * (a conductivity above 1000 mS/cm, a density below 3 kg/m3) is refused with
 * the likely meaning. */
int hs_cli_number(const char *cmd, const char *opt, const char *text, double *out);

/* Returned instead of -1 when TEXT is a number but outside what the option
 * takes (a slip of unit, a reference temperature out of its range): the
 * commands exit 1 for it ("out of the model's range"), 2 for text that is
 * not a decimal number. Hexadecimal ("0x10") is not a number here. */
#define HS_CLI_RANGE (-2)
/* The exit status for a parse result: 0, 1 (HS_CLI_RANGE) or 2. */
#define HS_CLI_EXIT(rc) ((rc) == 0 ? 0 : (rc) == HS_CLI_RANGE ? 1 : 2)

/* Reference temperature for specific gravity and Baume [degC]: a number within
 * lo_c..hi_c (else HS_CLI_RANGE), or "60F" (any case), which gives HC_TREF_60F. */
int hs_cli_tref(const char *cmd, const char *text, double lo_c, double hi_c, double *t_ref_c);

/* The value after the option at argv[*i]; advances *i past it. NULL (message
 * printed: "OPT needs a value") when the option is the last argument. */
const char *hs_cli_value(const char *cmd, int argc, char **argv, int *i);

/* After getopt_long (run with opterr = 0) returned '?': prints one line
 * naming the unknown option or the option missing its value. */
void hs_cli_bad_option(const char *cmd, char *const *argv, int argc);

#endif
