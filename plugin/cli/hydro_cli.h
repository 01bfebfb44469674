/* What `halostage forecast` and `halostage plan` share: the common options,
 * the site (configuration and store, when given), and one pond's view
 * merged from the configuration, the store's latest state and the command
 * line (the command line wins), with its brine state on the feed's
 * evaporation path.
 *
 * Error convention: 0 on success; otherwise an exit status (1 failure,
 * 2 usage, 78 bad configuration) after printing "halostage CMD: ..." on
 * stderr. Memory: a context owns its site and store, a view its pond copy
 * and evaporation path; free them with the matching functions. */
#ifndef HS_CLI_HYDRO_CLI_H
#define HS_CLI_HYDRO_CLI_H

#include <jansson.h>

#include "cli/hydro_opts.h"
#include "hc_path.h"
#include "hc_state.h"
#include "hs_hydro.h"
#include "hs_hydro_brine.h"
#include "hs_site.h"
#include "hs_store.h"

struct hs_hcli_common {
    const char *config_path;   /* NULL: explicit inputs only */
    double temperature_c;      /* NaN: the store's latest */
    double fallback_temperature_c; /* when neither gives one (NaN: none) */
    double t_ref_c;            /* NaN: the site's, else 15 degC */
    double feed_sp;            /* NaN: the pond's feed, else seawater S_P 35 */
    int json;
};

void hs_hcli_common_init(struct hs_hcli_common *c);
/* --config, --temperature, --reference-temperature, --feed-salinity.
 * 1 handled, 0 not ours, -1 bad value (printed). */
int hs_hcli_common_option(const char *cmd, struct hs_hcli_common *c, const char *opt,
                          const char *value);

struct hs_hcli_context {
    const struct hs_hcli_common *common;
    int site_loaded;
    hs_site site;
    hs_store *store;    /* NULL: no database yet */
    double t_ref_c;     /* resolved */
};

/* Loads the configuration (if any) and opens its store for reading (if the
 * file exists). */
int hs_hcli_open(const char *cmd, const struct hs_hcli_common *common,
                 struct hs_hcli_context *ctx);
void hs_hcli_close(struct hs_hcli_context *ctx);
size_t hs_hcli_pond_count(const struct hs_hcli_context *ctx);
const char *hs_hcli_pond_name(const struct hs_hcli_context *ctx, size_t i);

/* The feed's evaporation path at one temperature, as hydrology uses it. */
struct hs_hcli_model {
    hc_feed feed;
    hc_path *path;
    struct hs_brine_curve curve;
};

struct hs_hcli_pond_view {
    char name[HS_NAME_MAX];
    char label[HS_NAME_MAX + 16];      /* "pond NAME" or "the pond", for messages */
    struct hs_cli_pond own;            /* merged pond (owns its table) */
    struct hs_cli_pond *pond;          /* = &own */
    struct hs_hcli_model model;
    hc_brine_state state;              /* the brine now, on the path */
    double target_kg_m3;               /* at the reference temperature; NaN: none */
    double reference_temperature_c;
    double cf_target, cf_next_stage;   /* NaN: none */
    double rates[HS_HYDRO_MAX_DAYS];   /* the store's daily rates, oldest first */
    int n_rates;
    double deposited_salt_t;           /* the store's latest (NaN: none) */
    double rate_mm_day, rate_spread_mm_day; /* explicit (NaN: from rates) */
    int crystalliser;
};

/* Builds the view of pond `name` ("" without a configuration). cli holds
 * what the command line gave (NaN / "" for not given); target, rate and
 * spread likewise. With want_target, a missing target defaults to the
 * pond's density_out. */
int hs_hcli_pond_view(const char *cmd, struct hs_hcli_context *ctx, const char *name,
                      const struct hs_cli_pond *cli, int want_target, double target_kg_m3,
                      double rate_mm_day, double rate_spread_mm_day,
                      struct hs_hcli_pond_view *pv);
void hs_hcli_pond_view_free(struct hs_hcli_pond_view *pv);

/* The brine state JSON (hp_state_to_json) plus "pond", "level_m" and
 * "target_density_kg_m3". New reference, or NULL when out of memory. */
json_t *hs_hcli_state_json(const struct hs_hcli_pond_view *pv);

#endif
