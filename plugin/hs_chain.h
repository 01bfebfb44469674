/* The chain schedule: from each pond's state now, the site's transfers and
 * an evaporation rate per pond, the day-by-day transfers a brine master
 * could make, and what the ponds would do meanwhile.
 *
 * The rule (greedy, one decision per transfer per day, in the morning):
 * transfers are taken from the densest source down, so that downstream
 * ponds make room before upstream ones fill them; each asks the transfer
 * engine (hs_transfer_decide, the daemon's own trigger and interlocks, with
 * its timing rules left out at a day's step) whether it would run, and
 * moves the most brine the day allows: the pump's rated flow for 24 h, the
 * source down to its minimum level, the destination up to its maximum, and
 * the destination's density band after mixing (at the reference
 * temperature). Moving the most brine that keeps every limit is what
 * maximises the salt delivered downstream day by day; it is not a
 * look-ahead optimiser. An intake pond may be topped up from the sea to its
 * maximum level each morning (sea_fill). Then every pond evaporates (and
 * takes rain) over the day (hc_chain_weather).
 *
 * Advice only: nothing here writes to a pump.
 * Memory: hs_chain_run allocates the result's arrays; hs_chain_result_free
 * releases them. Error convention: 0, or -1 with a message in err. */
#ifndef HS_CHAIN_H
#define HS_CHAIN_H

#include <stddef.h>

#include "hc_chain.h"
#include "hs_alarm.h"
#include "hs_brine_eval.h"
#include "hs_site.h"
#include "hs_transfer.h"

#define HS_CHAIN_MAX_DAYS 366

struct hs_chain_pond_in {
    char name[HS_NAME_MAX];
    int role;                      /* hs_pond_role */
    hc_pond_shape shape;           /* table arrays owned by the caller */
    double level_m;                /* now */
    double density_ref_kg_m3;      /* now, at the reference temperature */
    double level_min_m, level_max_m; /* NaN: none */
    double evap_fresh_mm_day;      /* fresh-water rate at this pond [mm/day] */
    double harvest_depth_m;        /* crystallisers: salt depth to harvest at; NaN none */
    double deposit_start_kg;       /* salt already on the floor [kg] */
    int stage_now_known;           /* 1: the start shows stage_now, the stage the
                                      daemon stored, so that every outlet gives a
                                      pond one stage; 0 (zeroed): the chain's own */
    int stage_now;                 /* hc_stage */
};

struct hs_chain_link {
    char name[HS_NAME_MAX];
    int source, dest;              /* pond indices */
    struct hs_transfer_rule rule;  /* the engine's rule (timing is ignored) */
    double rated_flow_m3_h;        /* > 0 */
    int configured;                /* 1: a [transfer] section; 0: a `next` link */
};

struct hs_chain_input {
    const hc_chain_brine *brine;
    size_t n_ponds;
    const struct hs_chain_pond_in *ponds;
    size_t n_links;
    const struct hs_chain_link *links;
    int days;                      /* 1..HS_CHAIN_MAX_DAYS */
    const double *rain_mm;         /* per day (days values), or NULL for none */
    double relative_humidity;      /* [0,1) for the brine factor; NaN: 0 */
    int sea_fill;                  /* top intake ponds up from the sea */
    double t_ref_c, baume_modulus;
    double salt_bulk_density_kg_m3;/* to turn deposits into a depth */
    hs_alarm_engine *alarms;       /* optional: the site's alarm rules (hs_alarm_site.h,
                                      hs_conf_alarm.h), fed each day's predicted state to
                                      tell which alarms it would raise; NULL: none. The
                                      caller owns it; the run changes its states. */
    const hs_brine_models *models; /* optional: stages as the daemon judges them, by density
                                      at the reference temperature against the onset brines
                                      (hs_stage_at_density_ref); NULL: from the CF */
    int feed_index;                /* the feed of the models (-1: built-in seawater) */
};

/* Per-pond limit flags of a day's end. */
enum {
    HS_CHAIN_LEVEL_LOW = 1u << 0,     /* below level_min */
    HS_CHAIN_LEVEL_HIGH = 1u << 1,    /* above level_max */
    HS_CHAIN_OVERFLOW = 1u << 2,      /* beyond the shape (dike crest) */
    HS_CHAIN_BITTERN_SALTS = 1u << 3, /* crystalliser past halite: magnesium salts */
    HS_CHAIN_GYPSUM_IN_CRYSTALLISER = 1u << 4 /* crystalliser brine still before halite */
};

struct hs_chain_pond_day {
    double level_m, volume_m3, density_ref_kg_m3, baume, cf;
    int stage;                     /* hc_stage */
    double evaporated_mm, salt_depth_m;
    unsigned limits;               /* HS_CHAIN_* */
    char why[96];                  /* what kept the schedule from a limit ("" none) */
    char alarms[160];              /* alarm rules active at the day's end, comma-separated */
};

struct hs_chain_link_day {
    double volume_m3, hours;
    int advice;                    /* hs_advice */
    unsigned reasons;              /* HS_XR_* from the engine, plus the binding limit */
    double mix_density_ref_kg_m3;  /* destination after the transfer */
};

struct hs_chain_result {
    int days;
    size_t n_ponds, n_links;
    struct hs_chain_pond_day *pond;   /* [days][n_ponds]; day 0 is now */
    struct hs_chain_link_day *link;   /* [days][n_links]; index d-1 for day d */
    int *harvest_day;                 /* per pond: first day at harvest depth; -1 never */
    double bittern_m3, bittern_baume; /* moved into bittern ponds, volume-weighted deg Be */
    double sea_in_m3;
    /* Balance over the schedule (every pond together). */
    double water_start_kg, water_end_kg, evaporated_kg, rain_kg, sea_water_kg;
    double ion_start_mol[HC_MIX_MAX_IONS], ion_end_mol[HC_MIX_MAX_IONS];
    double ion_sea_mol[HC_MIX_MAX_IONS];
    hc_chain_pond *end;               /* the ponds' accounts at the end */
};

int hs_chain_run(const struct hs_chain_input *in, struct hs_chain_result *out, char *err,
                 size_t errlen);
void hs_chain_result_free(struct hs_chain_result *r);

/* "level-low,..." for limit bits; as snprintf. */
int hs_chain_limits_format(unsigned limits, char *buf, size_t len);

static inline struct hs_chain_pond_day *hs_chain_pd(const struct hs_chain_result *r, int day,
                                                    size_t pond)
{
    return &r->pond[(size_t)day * r->n_ponds + pond];
}
static inline struct hs_chain_link_day *hs_chain_ld(const struct hs_chain_result *r, int day,
                                                    size_t link)
{
    return &r->link[(size_t)(day - 1) * r->n_links + link];
}

#endif
