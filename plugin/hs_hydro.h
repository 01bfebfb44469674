/* Per-pond hydrology as the daemon sees it: level -> depth, area and
 * volume; a daily water and salt balance giving the net evaporation the
 * pond really achieves (kept over a sliding window of days); salt
 * inventories; the calibration-drift check; and the forecast of days to
 * the target density and to the next stage, as a range from the spread of
 * the daily rates.
 *
 * The caller feeds samples in time order (hs_hydro_sample), the brine it
 * pumps in and out (hs_hydro_transfer) and rain (hs_hydro_rain), then asks
 * for the current figures (hs_hydro_report). The brine's evaporation path,
 * as an hc_brine_curve, is passed in by the caller (NULL when unknown: the
 * figures that need it are then NaN).
 *
 * Threads: one tracker belongs to one thread (the daemon's main loop).
 * Memory: the tracker holds no pointers of its own except cfg.shape's
 * table arrays, which the caller owns and keeps alive.
 * Error convention: 0 on success, -1 on an input that cannot be used (the
 * tracker is then unchanged); hs_hydro_report never fails (unknown figures
 * are NaN). */
#ifndef HS_HYDRO_H
#define HS_HYDRO_H

#include "hc_brine_curve.h"
#include "hc_geometry.h"

#define HS_HYDRO_MAX_DAYS 60
#define HS_HYDRO_DAY_S 86400.0

struct hs_hydro_config {
    hc_pond_shape shape;
    int window_days;              /* daily rates behind the rate, 1..HS_HYDRO_MAX_DAYS */
    double spread_z;              /* range = mean -/+ z s.d. of the daily rates (e.g. 1) */
    double drift_tolerance_kg_m3; /* density gap that flags calibration drift */
    int crystalliser;             /* report the salt deposited */
    double relative_humidity;     /* [0, 1) for the water-activity scaling; NaN: no scaling */
    double pan_mm_day;            /* reference (pan) evaporation; NaN: unknown */
    double pan_coefficient;       /* pan to pond, e.g. 0.7 */
};

/* Defaults: window 7 days, z 1, drift tolerance 3 kg/m3, no scaling, no pan. */
void hs_hydro_config_default(struct hs_hydro_config *cfg);

/* One reading of the pond. NaN marks what is unknown; the level is needed. */
struct hs_hydro_sample {
    double t_s;               /* time [s], any epoch, increasing */
    double level_m;           /* brine level above the floor [m] */
    double density_kg_m3;     /* [kg/m3] */
    double salinity_g_kg;     /* dissolved salts per kg of brine [g/kg] */
    double cf;                /* concentration factor [1] */
    double water_activity;    /* [1] */
};

struct hs_hydro_snapshot {
    int valid;
    double t_s, level_m, volume_m3, area_m2, density_kg_m3, w_kg_kg, cf;
};

struct hs_hydro {
    struct hs_hydro_config cfg;
    struct hs_hydro_snapshot last;      /* the latest sample */
    struct hs_hydro_snapshot day_start; /* opening state of the current day */
    double area_sum_m2;                 /* area samples since day_start, for the mean */
    long area_count;
    double recv_water_kg, recv_salt_kg, sent_water_kg, sent_salt_kg, rain_mm;
    int day_broken;                     /* a transfer of unknown brine, or bad data */
    double rates[HS_HYDRO_MAX_DAYS];    /* daily net evaporation, newest last [mm/day] */
    int n_rates;
    double deposited_kg;                /* salt deposited since start (or seed) [kg] */
    double balance_density_kg_m3;       /* last day's predicted end density */
    int drift;                          /* last day's calibration verdict */
    double water_activity;              /* of the latest sample */
};

/* Errors: a bad shape (hc_*_check) or window. */
int hs_hydro_init(struct hs_hydro *h, const struct hs_hydro_config *cfg);

/* Takes a sample. A day closes when 24 h have passed since it opened: its
 * balance gives one daily rate. Returns -1 for a time going backwards, a
 * missing level or a level outside the shape (the sample is dropped). */
int hs_hydro_sample(struct hs_hydro *h, const struct hs_hydro_sample *s,
                    const hc_brine_curve *curve);

/* Brine moved in (into = 1) or out (into = 0) during the current day.
 * volume >= 0 [m3]; density and salinity describe the moved brine (for
 * brine sent out, NaN takes the pond's latest). Pump run time x rated flow
 * or a flow meter's total both end up here. Unknown brine in (NaN density)
 * spoils the day's balance, which is then skipped. */
int hs_hydro_transfer(struct hs_hydro *h, int into, double volume_m3, double density_kg_m3,
                      double salinity_g_kg);

/* Rain on the pond during the current day [mm]. */
int hs_hydro_rain(struct hs_hydro *h, double rain_mm);

/* Seeds the daily rates (e.g. from the store's history), oldest first, and
 * the salt deposited so far [kg]. */
int hs_hydro_seed(struct hs_hydro *h, const double *rates_mm_day, int n, double deposited_kg);

/* Current figures. NaN where unknown; ranges are low <= high. */
struct hs_hydro_report {
    double depth_m, area_m2, volume_m3;
    double dissolved_salt_t;
    double deposited_salt_t;            /* crystallisers only, else NaN */
    double net_evaporation_mm_day;      /* mean over the window */
    double net_evaporation_low_mm_day, net_evaporation_high_mm_day;
    int rate_days;                      /* daily rates behind it */
    double expected_evaporation_mm_day; /* pan x coefficient x activity factor */
    /* Days at the high rate (low), the mean rate (expected) and the low
     * rate (high); INFINITY when never at that rate. */
    double days_to_target_low, days_to_target_expected, days_to_target_high;
    double days_to_next_stage_low, days_to_next_stage_expected, days_to_next_stage_high;
    double balance_density_kg_m3;
    int density_drift;                  /* 1: density sensor disagrees with the balance */
};

/* cf_target and cf_next_stage (NaN: none) are the concentration factors of
 * the pond's target density and of the next stage's onset, which the
 * caller reads off the evaporation path. A rate override (finite
 * rate_mm_day) replaces the window's mean and spread with the given
 * rate -/+ rate_spread_mm_day. */
void hs_hydro_report(const struct hs_hydro *h, const hc_brine_curve *curve, double cf_target,
                     double cf_next_stage, double rate_mm_day, double rate_spread_mm_day,
                     struct hs_hydro_report *out);

#endif
