/* Options shared by `halostage forecast` and `halostage plan`: numbers,
 * and a pond described on the command line (geometry, level, density,
 * limits), so that both commands work from explicit inputs as well as from
 * a configuration.
 * Error convention: 0 on success; -1 after printing "halostage CMD: ..." on
 * stderr. Memory: a pond owns its loaded table; hs_hopt_pond_free. */
#ifndef HS_CLI_HYDRO_OPTS_H
#define HS_CLI_HYDRO_OPTS_H

#include "hc_geometry.h"
#include "hs_stage_table.h"

/* Default height of a prism's dike crest when none is given [m]: the shape
 * then only bounds levels, so it can be generous. */
#define HS_HOPT_DEFAULT_CREST_M 10.0

struct hs_cli_pond {
    char name[64];
    double area_m2, side_slope, crest_m; /* prism, as given (NaN: not given) */
    char stage_storage[512];             /* or a table file ("" : none) */
    struct hs_stage_table table;         /* loaded table (owned) */
    hc_pond_shape shape;                 /* valid after hs_hopt_pond_finish */
    double level_m, density_kg_m3;       /* now */
    double min_level_m, max_level_m;     /* interlocks (NaN: none) */
    double band_low_kg_m3, band_high_kg_m3;
};

/* Sets every number to NaN and the name to `name`. */
void hs_hopt_pond_init(struct hs_cli_pond *p, const char *name);

/* Tries option `key` (without its prefix, e.g. "area" for --from-area) for
 * the pond. Returns 1 when the key is a pond option (and sets it), 0 when
 * it is not, -1 on a bad value. Keys: area, side-slope, crest,
 * stage-storage, level, density, min-level, max-level, band (LOW,HIGH). */
int hs_hopt_pond_option(const char *cmd, const char *opt, struct hs_cli_pond *p, const char *key,
                        const char *value);

/* Builds the shape (table file or prism), checks the level against it.
 * `what` names the pond in messages (e.g. "--from pond"). */
int hs_hopt_pond_finish(const char *cmd, const char *what, struct hs_cli_pond *p);

void hs_hopt_pond_free(struct hs_cli_pond *p);

#endif
