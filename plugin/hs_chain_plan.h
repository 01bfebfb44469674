/* The chain schedule of a site from its store: what `halostage chain`
 * prints and what the daemon publishes. Each pond starts from its latest
 * stored state (level, density and temperature; the density is taken to
 * the reference temperature along the feed's path); the evaporation is, in
 * order, a given fresh-water rate, a given Penman estimate, the Penman
 * estimate of the latest complete day of the site's stored weather (scaled
 * by its fit to the achieved rates when that rests on enough pond-days),
 * else each pond's recent achieved net rate; every pond's rate is scaled by
 * its brine's water activity (hc_evaporation_activity_factor).
 *
 * Memory: a plan owns everything it built; hs_chain_plan_free releases it
 * (safe on a zeroed plan). Error convention: 0, or -1 with a message in
 * err (a pond without a state, a path that fails, out of memory). */
#ifndef HS_CHAIN_PLAN_H
#define HS_CHAIN_PLAN_H

#include <jansson.h>
#include <stdint.h>

#include "hs_brine_eval.h"
#include "hs_chain.h"
#include "hs_chain_site.h"
#include "hs_site.h"
#include "hs_store.h"
#include "hs_weather.h"

#define HS_CHAIN_DEFAULT_FLOW_M3_H 500.0 /* a pump without a rated_flow: assumption, no source */
#define HS_CHAIN_DEFAULT_HARVEST_M 0.10  /* salt depth worth harvesting: common practice, no source */
#define HS_CHAIN_HALITE_DENSITY 2165.0   /* compact halite [kg/m3] (CRC Handbook, from memory) */
#define HS_CHAIN_MIN_FIT_PAIRS 3         /* fewer pond-days say too little to scale Penman */

struct hs_chain_options {
    int days;
    double evaporation_mm_day;   /* fresh water, every pond; NaN: not given */
    double penman_mm_day;        /* an estimate from given weather; NaN: not given */
    double relative_humidity;    /* [0,1) for the brine factor; NaN: 0 */
    double default_flow_m3_h, harvest_depth_m;
    int sea_fill;
    const double *rain_mm;       /* per day, or NULL */
    double t_ref_c;
};
void hs_chain_options_default(struct hs_chain_options *o, double t_ref_c);

struct hs_chain_evaporation {
    const char *source;          /* "given", "penman", "weather", "achieved" */
    double penman_mm_day;        /* the estimate used; NaN none */
    int weather_days;            /* complete days of stored weather */
    struct hs_weather_fit fit;   /* pairs 0: none */
    int calibrated;              /* the fit's factor was applied */
};

struct hs_chain_plan {
    hs_brine_models *own_models; /* built here when the caller gave none */
    struct hs_chain_tables tables;
    struct hs_chain_site cs;
    struct hs_chain_input in;
    struct hs_chain_result result;
    struct hs_chain_evaporation evaporation;
    hs_alarm_engine *alarms;     /* the site's rules, to predict the alarms */
    double rain[HS_CHAIN_MAX_DAYS];
};

/* models: the site's brine models (hs_brine_models_build; the daemon's own),
 * borrowed for the plan's life; NULL: built here (0.15 to 0.35 s a feed). */
int hs_chain_plan_make(const hs_site *site, const hs_brine_models *models, hs_store *st,
                       int64_t now_ms, const struct hs_chain_options *o,
                       struct hs_chain_plan *out, char *err, size_t errlen);
void hs_chain_plan_free(struct hs_chain_plan *p);

/* hs_chain_to_json plus site, time, evaporation source, Penman estimate and
 * fit. New reference, NULL when out of memory. */
json_t *hs_chain_plan_json(const struct hs_chain_plan *p, const char *site_name, int64_t now_ms);

#endif
