/* The chain schedule's inputs from a site: the feed's fractional path as
 * hc_chain tables (densities at the path temperature and at the reference
 * temperature, molalities, water activity, stage onsets), and the ponds and
 * transfers of the configuration: every [transfer] section (its rule from
 * hs_conf_transfer_rule, its rated flow), and every `next` link that no
 * [transfer] covers, as a transfer that starts at the source's density_out
 * and keeps the destination's density_in, at a default pump flow.
 *
 * Memory: a hs_chain_site owns its tables, ponds, links and stage-storage
 * tables; hs_chain_site_free releases them (safe on a zeroed struct).
 * Error convention: 0, or -1 with a message in err. */
#ifndef HS_CHAIN_SITE_H
#define HS_CHAIN_SITE_H

#include <stddef.h>

#include "hc_path.h"
#include "hs_chain.h"
#include "hs_stage_table.h"

struct hs_chain_tables {
    hc_chain_brine view;
    double *cf, *rho, *rho_ref, *aw, *mol, *si_halite, *si_gypsum;
    double molar_mass[HC_MIX_MAX_IONS];
};

int hs_chain_tables_from_path(const hc_path *path, double t_ref_c, struct hs_chain_tables *out,
                              char *err, size_t errlen);
void hs_chain_tables_free(struct hs_chain_tables *t);

struct hs_chain_site {
    struct hs_chain_pond_in *ponds;  /* site->n_ponds; states NaN until the caller fills them */
    struct hs_chain_link *links;
    size_t n_ponds, n_links;
    struct hs_stage_table *tables;   /* per pond (empty without a stage_storage file) */
};

/* Ponds (geometry, limits, role) and links of the site. default_flow_m3_h
 * serves transfers without a rated_flow and `next` links. */
int hs_chain_site_build(const hs_site *site, double default_flow_m3_h, struct hs_chain_site *out,
                        char *err, size_t errlen);
void hs_chain_site_free(struct hs_chain_site *s);

#endif
