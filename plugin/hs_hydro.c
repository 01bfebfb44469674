/* Per-pond hydrology tracker (see hs_hydro.h). */
#include "hs_hydro.h"

#include <math.h>
#include <string.h>

#include "hc_balance.h"
#include "hc_forecast.h"

void hs_hydro_config_default(struct hs_hydro_config *cfg)
{
    memset(cfg, 0, sizeof *cfg);
    cfg->window_days = 7;
    cfg->spread_z = 1.0;
    cfg->drift_tolerance_kg_m3 = 3.0;
    cfg->relative_humidity = NAN;
    cfg->pan_mm_day = NAN;
    cfg->pan_coefficient = 0.7;
}

static void reset_day(struct hs_hydro *h)
{
    h->day_start = h->last;
    h->area_sum_m2 = h->last.valid ? h->last.area_m2 : 0;
    h->area_count = h->last.valid ? 1 : 0;
    h->recv_water_kg = h->recv_salt_kg = 0;
    h->sent_water_kg = h->sent_salt_kg = 0;
    h->rain_mm = 0;
    h->day_broken = 0;
}

/* Error convention: 0 / -1 (see hs_hydro.h). */
int hs_hydro_init(struct hs_hydro *h, const struct hs_hydro_config *cfg)
{
    if (h == NULL || cfg == NULL)
        return -1;
    hc_status st = cfg->shape.is_table ? hc_stage_table_check(&cfg->shape.table, NULL)
                                       : hc_prism_check(&cfg->shape.prism);
    if (st != HC_OK || cfg->window_days < 1 || cfg->window_days > HS_HYDRO_MAX_DAYS ||
        !(cfg->spread_z >= 0) || !(cfg->drift_tolerance_kg_m3 >= 0))
        return -1;
    memset(h, 0, sizeof *h);
    h->cfg = *cfg;
    h->balance_density_kg_m3 = NAN;
    h->water_activity = NAN;
    return 0;
}

static void push_rate(struct hs_hydro *h, double rate)
{
    if (h->n_rates == HS_HYDRO_MAX_DAYS) {
        memmove(h->rates, h->rates + 1, (HS_HYDRO_MAX_DAYS - 1) * sizeof h->rates[0]);
        h->n_rates--;
    }
    h->rates[h->n_rates++] = rate;
}

static int snapshot_has_brine(const struct hs_hydro_snapshot *s)
{
    return s->valid && isfinite(s->density_kg_m3) && isfinite(s->w_kg_kg);
}

/* Closes the day from day_start to last: one daily rate, the salt
 * deposited, and the drift verdict. A day without the data is skipped. */
static void close_day(struct hs_hydro *h, const hc_brine_curve *curve)
{
    const struct hs_hydro_snapshot *a = &h->day_start, *b = &h->last;
    if (h->day_broken || !snapshot_has_brine(a) || !snapshot_has_brine(b) || h->area_count == 0)
        return;
    hc_balance_input in;
    memset(&in, 0, sizeof in);
    in.duration_days = (b->t_s - a->t_s) / HS_HYDRO_DAY_S;
    in.mean_area_m2 = h->area_sum_m2 / (double)h->area_count;
    if (hc_brine_mass_of(a->volume_m3, a->density_kg_m3, a->w_kg_kg, &in.start) != HC_OK ||
        hc_brine_mass_of(b->volume_m3, b->density_kg_m3, b->w_kg_kg, &in.end) != HC_OK)
        return;
    in.received = (hc_brine_mass){h->recv_water_kg, h->recv_salt_kg};
    in.sent = (hc_brine_mass){h->sent_water_kg, h->sent_salt_kg};
    in.rain_mm = h->rain_mm;
    double dep = 0;
    if (curve != NULL && isfinite(a->cf) && isfinite(b->cf) && b->cf > a->cf &&
        hc_curve_deposit_between(curve, in.start.water_kg, a->cf, b->cf, &dep) != HC_OK)
        dep = 0;
    in.deposited_salt_kg = dep > 0 ? dep : 0;
    hc_balance_result r;
    if (hc_balance_close(&in, &r) != HC_OK)
        return;
    push_rate(h, r.net_evaporation_mm_day);
    h->deposited_kg += in.deposited_salt_kg;
    double rho_pred;
    int drift;
    if (hc_balance_density_check(&in, &r, b->volume_m3, b->density_kg_m3,
                                 h->cfg.drift_tolerance_kg_m3, &rho_pred, &drift) == HC_OK) {
        h->balance_density_kg_m3 = rho_pred;
        h->drift = drift;
    }
}

int hs_hydro_sample(struct hs_hydro *h, const struct hs_hydro_sample *s,
                    const hc_brine_curve *curve)
{
    if (h == NULL || s == NULL || !isfinite(s->t_s) || !isfinite(s->level_m))
        return -1;
    if (h->last.valid && s->t_s < h->last.t_s)
        return -1;
    struct hs_hydro_snapshot n;
    memset(&n, 0, sizeof n);
    if (hc_shape_at_level(&h->cfg.shape, s->level_m, &n.volume_m3, &n.area_m2) != HC_OK)
        return -1;
    n.valid = 1;
    n.t_s = s->t_s;
    n.level_m = s->level_m;
    n.density_kg_m3 = s->density_kg_m3 > 0 ? s->density_kg_m3 : NAN;
    n.w_kg_kg = s->salinity_g_kg >= 0 && s->salinity_g_kg < 1000 ? s->salinity_g_kg / 1000 : NAN;
    n.cf = s->cf >= 1 ? s->cf : NAN;
    h->last = n;
    h->water_activity = s->water_activity > 0 && s->water_activity <= 1 ? s->water_activity : NAN;
    if (!h->day_start.valid) {
        reset_day(h);
        return 0;
    }
    h->area_sum_m2 += n.area_m2;
    h->area_count++;
    if (n.t_s - h->day_start.t_s >= HS_HYDRO_DAY_S) {
        close_day(h, curve);
        reset_day(h);
    }
    return 0;
}

int hs_hydro_transfer(struct hs_hydro *h, int into, double volume_m3, double density_kg_m3,
                      double salinity_g_kg)
{
    if (h == NULL || !isfinite(volume_m3) || volume_m3 < 0)
        return -1;
    if (!into && !isfinite(density_kg_m3)) {
        density_kg_m3 = h->last.density_kg_m3;
        salinity_g_kg = h->last.w_kg_kg * 1000;
    }
    hc_brine_mass m;
    if (!isfinite(density_kg_m3) || !isfinite(salinity_g_kg) ||
        hc_brine_mass_of(volume_m3, density_kg_m3, salinity_g_kg / 1000, &m) != HC_OK) {
        h->day_broken = 1; /* moved brine of unknown make-up: no balance today */
        return 0;
    }
    if (into) {
        h->recv_water_kg += m.water_kg;
        h->recv_salt_kg += m.salt_kg;
    } else {
        h->sent_water_kg += m.water_kg;
        h->sent_salt_kg += m.salt_kg;
    }
    return 0;
}

int hs_hydro_rain(struct hs_hydro *h, double rain_mm)
{
    if (h == NULL || !isfinite(rain_mm) || rain_mm < 0)
        return -1;
    h->rain_mm += rain_mm;
    return 0;
}

int hs_hydro_seed(struct hs_hydro *h, const double *rates, int n, double deposited_kg)
{
    if (h == NULL || n < 0 || (n > 0 && rates == NULL) || !isfinite(deposited_kg) ||
        deposited_kg < 0)
        return -1;
    for (int i = 0; i < n; i++)
        if (!isfinite(rates[i]))
            return -1;
    for (int i = 0; i < n; i++)
        push_rate(h, rates[i]);
    h->deposited_kg = deposited_kg;
    return 0;
}

/* Days to cf_target at the rates e[0..2] (high, mean, low: so that the
 * days come out low, expected, high). */
static void forecast_range(const struct hs_hydro *h, const hc_brine_curve *curve, double cf_target,
                           const double e[3], double days[3])
{
    days[0] = days[1] = days[2] = NAN;
    if (curve == NULL || !isfinite(cf_target) || !isfinite(h->last.cf) || !h->last.valid)
        return;
    int scale = isfinite(h->cfg.relative_humidity) && curve->water_activity != NULL;
    hc_forecast_input in = {&h->cfg.shape, curve, h->last.level_m, h->last.cf, 0, scale,
                            scale ? h->cfg.relative_humidity : 0};
    for (int i = 0; i < 3; i++) {
        double d;
        in.net_evap_mm_day = e[i];
        if (hc_forecast_days_to_cf(&in, cf_target, &d) == HC_OK)
            days[i] = d;
    }
}

void hs_hydro_report(const struct hs_hydro *h, const hc_brine_curve *curve, double cf_target,
                     double cf_next_stage, double rate_mm_day, double rate_spread_mm_day,
                     struct hs_hydro_report *out)
{
    out->depth_m = out->area_m2 = out->volume_m3 = NAN;
    out->dissolved_salt_t = out->deposited_salt_t = NAN;
    out->net_evaporation_mm_day = out->net_evaporation_low_mm_day = NAN;
    out->net_evaporation_high_mm_day = out->expected_evaporation_mm_day = NAN;
    out->days_to_target_low = out->days_to_target_expected = out->days_to_target_high = NAN;
    out->days_to_next_stage_low = out->days_to_next_stage_expected = NAN;
    out->days_to_next_stage_high = NAN;
    out->rate_days = 0;
    out->balance_density_kg_m3 = h->balance_density_kg_m3;
    out->density_drift = h->drift;
    const struct hs_hydro_snapshot *s = &h->last;
    if (s->valid) {
        out->depth_m = s->level_m;
        out->area_m2 = s->area_m2;
        out->volume_m3 = s->volume_m3;
        /* Dissolved salt: V rho w [kg] -> [t]. */
        if (snapshot_has_brine(s))
            out->dissolved_salt_t = s->volume_m3 * s->density_kg_m3 * s->w_kg_kg / 1000.0;
    }
    if (h->cfg.crystalliser)
        out->deposited_salt_t = h->deposited_kg / 1000.0;

    double lo = NAN, mean = NAN, hi = NAN;
    if (isfinite(rate_mm_day)) {
        double sp = isfinite(rate_spread_mm_day) ? fabs(rate_spread_mm_day) : 0;
        mean = rate_mm_day;
        lo = rate_mm_day - sp;
        hi = rate_mm_day + sp;
    } else if (h->n_rates > 0) {
        int n = h->n_rates < h->cfg.window_days ? h->n_rates : h->cfg.window_days;
        if (hc_rate_spread(h->rates + h->n_rates - n, n, h->cfg.spread_z, &lo, &mean, &hi) != HC_OK)
            lo = mean = hi = NAN;
        else
            out->rate_days = n;
    }
    out->net_evaporation_mm_day = mean;
    out->net_evaporation_low_mm_day = lo;
    out->net_evaporation_high_mm_day = hi;

    if (isfinite(h->cfg.pan_mm_day) && isfinite(h->water_activity)) {
        double rh = isfinite(h->cfg.relative_humidity) ? h->cfg.relative_humidity : 0;
        double e;
        if (hc_evaporation_expected(h->cfg.pan_mm_day, h->cfg.pan_coefficient, h->water_activity,
                                    rh, &e) == HC_OK)
            out->expected_evaporation_mm_day = e;
    }
    if (isfinite(mean)) {
        const double e[3] = {hi, mean, lo};
        double d[3];
        forecast_range(h, curve, cf_target, e, d);
        out->days_to_target_low = d[0];
        out->days_to_target_expected = d[1];
        out->days_to_target_high = d[2];
        forecast_range(h, curve, cf_next_stage, e, d);
        out->days_to_next_stage_low = d[0];
        out->days_to_next_stage_expected = d[1];
        out->days_to_next_stage_high = d[2];
    }
}
