/* Pond state from signal values; see hs_pond_state.h. */
#include <math.h>

#include "hc_level.h"
#include "hc_seawater.h"
#include "hs_pond_state.h"

void hs_pond_inputs_clear(hs_pond_inputs *in)
{
    for (int q = 0; q < HS_QUANTITY_COUNT; q++) {
        in->present[q] = false;
        in->quality[q] = HP_Q_COMM_FAIL;
        in->value[q] = NAN;
    }
}

double hs_signal_si(const hs_signal *g, double value)
{
    return value * g->si_factor + g->si_offset;
}

void hs_pond_inputs_put(hs_pond_inputs *in, const hs_signal *g, hp_quality quality,
                        double value)
{
    in->present[g->quantity] = true;
    in->quality[g->quantity] = quality;
    in->value[g->quantity] = quality == HP_Q_GOOD ? hs_signal_si(g, value) : NAN;
}

static double good(const hs_pond_inputs *in, hs_quantity q)
{
    return in->present[q] && in->quality[q] == HP_Q_GOOD ? in->value[q] : NAN;
}

static void compute_level(const hs_site *site, const hs_pond *p, const hs_pond_inputs *in,
                          double rho, double g, hs_pond_result *out)
{
    double d;
    if (in->present[HS_Q_LEVEL_PRESSURE]) {
        double pa = good(in, HS_Q_LEVEL_PRESSURE);
        if (isnan(pa))
            out->level_problem = "no good level-pressure reading";
        else if (isnan(rho))
            out->level_problem = "the level needs the pond's brine density, which is unknown";
        else if (hc_depth_from_pressure(pa, rho, g, p->pressure_height_m, &d) == HC_OK)
            out->depth_m = d;
        else
            out->level_problem = "the level-pressure sensor is out of the brine";
    } else if (in->present[HS_Q_LEVEL_DISTANCE]) {
        double dist = good(in, HS_Q_LEVEL_DISTANCE);
        if (isnan(dist))
            out->level_problem = "no good level-distance reading";
        else if (hc_depth_from_distance(dist, p->distance_height_m, &d) == HC_OK)
            out->depth_m = d;
        else
            out->level_problem = "the level-distance reading is below the pond floor";
    }
    (void)site;
}

void hs_pond_compute(const hs_site *site, size_t pond, const hs_pond_inputs *in,
                     const hc_path *path, hs_pond_result *out)
{
    const hs_pond *p = &site->ponds[pond];
    hc_seawater_options opt;
    double g;
    hc_seawater_options_default(&opt);
    opt.reference_temperature_c = site->site.reference_temperature_c;
    opt.baume_modulus = site->site.baume_modulus;
    if (hc_gravity(site->site.latitude_deg, site->site.elevation_m, &g) != HC_OK)
        g = HC_STANDARD_GRAVITY;

    hc_state_clear(&out->state);
    out->depth_m = NAN;
    out->problem = NULL;
    out->level_problem = NULL;

    double t = good(in, HS_Q_TEMPERATURE);
    double rho = good(in, HS_Q_DENSITY);
    hc_method method = HC_METHOD_DENSITOMETER;
    if (isnan(rho) && !isnan(p->pressure_spacing_m)) {
        double lo = good(in, HS_Q_LEVEL_PRESSURE), hi = good(in, HS_Q_PRESSURE_UPPER);
        if (!isnan(lo) && !isnan(hi) &&
            hc_density_from_pressure_pair(lo, hi, p->pressure_spacing_m, g, &rho) != HC_OK)
            rho = NAN;
        method = HC_METHOD_HYDROSTATIC;
    }
    double cond = good(in, HS_Q_CONDUCTIVITY);
    hc_status st = HC_ERR_ARGUMENT;
    if (isnan(t)) {
        out->problem = "no good temperature reading";
    } else if (!isnan(rho)) {
        st = hc_seawater_state_from_density(rho, t, 0.0, &opt, &out->state);
        if (st == HC_ERR_SALINITY_RANGE && path)
            st = hc_path_state_from_density(path, rho, t, opt.reference_temperature_c,
                                            opt.baume_modulus, &out->state);
        if (st == HC_OK)
            out->state.method = method;
        else
            out->problem = st == HC_ERR_SALINITY_RANGE
                ? "density beyond the seawater range of EOS-80 (S_P 42), and no evaporation "
                  "path of the feed to go on with"
                : hc_status_text(st);
    } else if (!isnan(cond)) {
        st = hc_seawater_state_from_conductivity(cond, t, 0.0, &opt, &out->state);
        if (st == HC_ERR_SALINITY_RANGE && path)
            st = hc_path_state_from_conductivity(path, cond, t, opt.reference_temperature_c,
                                                 opt.baume_modulus, NULL, &out->state);
        if (st != HC_OK)
            out->problem = st == HC_ERR_SALINITY_RANGE
                ? "conductivity beyond PSS-78 (S_P 42), and no evaporation path of the feed "
                  "to go on with"
                : hc_status_text(st);
    } else {
        out->problem = "no good density, pressure pair or conductivity reading";
    }
    if (st != HC_OK) {
        hc_state_clear(&out->state);
        out->state.temperature_c = t;
        out->state.density_kg_m3 = rho;
        out->state.reference_temperature_c = opt.reference_temperature_c;
        out->state.baume_modulus = opt.baume_modulus;
        if (!isnan(rho))
            out->state.method = method;
    }
    compute_level(site, p, in, out->state.density_kg_m3, g, out);
}
