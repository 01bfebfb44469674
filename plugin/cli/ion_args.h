/* Parsing of ion lists typed on the command line, e.g.
 * "Na=6.0,Cl=6.0,SO4=0.02", shared by `halostage brine` and `halostage path`.
 * Ion names as hc_ion_name gives them, matched without regard to case.
 * Error convention: 0 on success; -1 after printing one line on stderr that
 * names the option and the offending item. */
#ifndef HS_CLI_ION_ARGS_H
#define HS_CLI_ION_ARGS_H

#include "hc_ion.h"

/* Fills value[] (zeros for ions not named); each ion at most once, every
 * value a finite number >= 0, at least one above zero. */
int hs_cli_parse_ions(const char *cmd, const char *opt, const char *text,
                      double value[HC_ION_COUNT]);

/* For a feed analysis: as hs_cli_parse_ions, and also Br=X and Sr=X (bromide
 * and strontium, which the feed counts as Cl and Ca mole for mole), returned
 * in *br and *sr (0 when absent). */
int hs_cli_parse_feed_ions(const char *cmd, const char *opt, const char *text,
                           double value[HC_ION_COUNT], double *br, double *sr);

#endif
