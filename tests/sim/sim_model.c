/* The simulator's pond model and register images.
 * Each pond holds a depth, a concentration factor CF (initial water mass /
 * remaining water mass, as calc uses it) and a temperature. Brine properties
 * come from calc, so that the daemon's inverse can be checked end to end:
 * - seawater range (S_P = 35 CF <= 42): density EOS-80 and conductivity
 *   PSS-78 (hc_eos80_rho, hc_pss78_c_from_sp);
 * - beyond: the feed's fractional evaporation path (hc_path_state_from_cf)
 *   for density and salinity, and calc's brine conductivity model as the
 *   daemon inverts it (hc_path_model_conductivity) for conductivity.
 * The rest is simple on purpose (a test tool, no source): evaporation 6 mm a
 * day on average, by season and by day, slowed by salinity; rain events
 * (built-in, or only the showers given with --rain);
 * pumps move depth from a pond to its next, mixing by water mass; weather
 * signals (air temperature, humidity, wind, sunshine) follow the day. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_brine_cond.h"
#include "hc_brine_density.h"
#include "hc_ion.h"
#include "hc_eos80.h"
#include "hc_level.h"
#include "hc_pss78.h"
#include "sim.h"

#define FEED_SP 35.0

typedef struct {
    double density_kg_m3;
    double conductivity_ms_cm;
    double salinity_g_kg;
} brine_props;

/* The path brine at cf with its water multiplied by dilution: density by
 * Laliberte's mixture model (hc_brine_density), conductivity by the brine
 * model at its salt fraction (hc_brine_conductivity; past halite onset the
 * model's join to PSS-78 has faded out). */
static void diluted_properties(const hc_path *path, double cf, double dilution, double t_c,
                               brine_props *out)
{
    hc_path_point pt;
    if (hc_path_point_at_cf(path, cf, &pt, NULL) != HC_OK)
        return;
    double m[HC_ION_COUNT];
    for (int i = 0; i < HC_ION_COUNT; i++)
        m[i] = pt.molality[i] / dilution;
    double solute = hc_solute_g_per_kg_water(m);
    out->salinity_g_kg = 1000.0 * solute / (1000.0 + solute);
    (void)hc_brine_density(m, t_c, &out->density_kg_m3);
    (void)hc_brine_conductivity(out->salinity_g_kg, t_c, &out->conductivity_ms_cm);
}

static void properties(const sim *s, int pond, double cf, double t_c, brine_props *out)
{
    double sp = FEED_SP * cf;
    out->density_kg_m3 = out->conductivity_ms_cm = out->salinity_g_kg = NAN;
    double dilution = s->ponds ? s->ponds[pond].dilution : 1.0;
    if (dilution > 1.0) {
        const hc_path *path = hs_paths_for(&s->paths, s->site.ponds[pond].feed_index);
        if (path)
            diluted_properties(path, cf, dilution, t_c, out);
        return;
    }
    if (sp <= 42.0) {
        (void)hc_eos80_rho(sp, t_c, 0.0, &out->density_kg_m3);
        (void)hc_pss78_c_from_sp(sp, t_c, 0.0, &out->conductivity_ms_cm);
        out->salinity_g_kg = sp * 35.16504 / 35.0;
        return;
    }
    const hc_path *path = hs_paths_for(&s->paths, s->site.ponds[pond].feed_index);
    hc_brine_state st;
    if (!path || hc_path_state_from_cf(path, cf, t_c, 20.0, 145.0, &st) != HC_OK)
        return;
    out->density_kg_m3 = st.density_kg_m3;
    out->salinity_g_kg = st.salinity_g_kg;
    (void)hc_path_model_conductivity(path, cf, t_c, &out->conductivity_ms_cm);
}

static double noise(sim *s, double amplitude)
{
    return amplitude * s->noise_scale * (2.0 * rand_r(&s->seed) / (double)RAND_MAX - 1.0);
}

/* N(0, 1) by Irwin-Hall: the sum of 12 uniforms less 6. */
static double gauss(sim *s)
{
    double g = 0.0;
    for (int k = 0; k < 12; k++)
        g += rand_r(&s->seed) / (double)RAND_MAX;
    return g - 6.0;
}

sim_device *sim_device_find(sim *s, int bus, uint8_t unit)
{
    for (size_t i = 0; i < s->n_devices; i++)
        if (s->devices[i].bus == bus && s->devices[i].unit == unit)
            return &s->devices[i];
    return NULL;
}

const sim_fault *sim_fault_for(const sim *s, int bus, int unit)
{
    for (size_t i = 0; i < s->n_faults; i++)
        if ((s->faults[i].bus == bus || s->faults[i].bus < 0) &&
            (s->faults[i].unit == 0 || s->faults[i].unit == unit))
            return &s->faults[i];
    return NULL;
}

/* A starting CF in the middle of the pond's density band (at 20 C). */
static double initial_cf(const sim *s, int pond)
{
    const hs_pond *p = &s->site.ponds[pond];
    double lo = isnan(p->density_in_kg_m3) ? 1025.0 : p->density_in_kg_m3;
    double hi = isnan(p->density_out_kg_m3) ? lo + 10.0 : p->density_out_kg_m3;
    double target = 0.5 * (lo + hi), sp, cf;
    if (hc_eos80_sp_from_rho(target, 20.0, 0.0, &sp) == HC_OK && sp <= 42.0)
        return sp > 1.0 ? sp / FEED_SP : 1.0 / FEED_SP;
    const hc_path *path = hs_paths_for(&s->paths, p->feed_index);
    if (path && hc_path_cf_at_density(path, target, 20.0, &cf, NULL) == HC_OK)
        return cf;
    return 1.0;
}

int sim_model_init(sim *s)
{
    s->ponds = calloc(s->site.n_ponds ? s->site.n_ponds : 1, sizeof *s->ponds);
    if (!s->ponds || hs_paths_build(&s->site, &s->paths) != 0)
        return -1;
    /* CF rises no further than 95 % of the shortest path used. */
    s->max_cf = 1.2;
    for (size_t i = 0; i < s->site.n_ponds; i++) {
        const hc_path *path = hs_paths_for(&s->paths, s->site.ponds[i].feed_index);
        size_t n = path ? hc_path_step_count(path) : 0;
        double last = n ? 0.95 * hc_path_step(path, n - 1)->concentration_factor : 1.2;
        if (i == 0 || last < s->max_cf)
            s->max_cf = last;
    }
    for (size_t i = 0; i < s->site.n_ponds; i++) {
        const hs_pond *p = &s->site.ponds[i];
        sim_pond *q = &s->ponds[i];
        double lo = isnan(p->level_min_m) ? 0.2 : p->level_min_m;
        double hi = isnan(p->level_max_m) ? lo + 0.5 : p->level_max_m;
        q->depth_m = 0.5 * (lo + hi);
        q->cf = initial_cf(s, (int)i);
        q->dilution = 1.0;
        q->temperature_c = 22.0;
    }
    /* One register image per (bus, unit) that signals use. */
    for (size_t g = 0; g < s->site.n_signals; g++) {
        const hs_signal *sg = &s->site.signals[g];
        if (sim_device_find(s, sg->bus_index, sg->point.unit_id))
            continue;
        int hold = 1, input = 1, coils = 1;
        for (size_t h = 0; h < s->site.n_signals; h++) {
            const hs_signal *o = &s->site.signals[h];
            if (o->bus_index != sg->bus_index || o->point.unit_id != sg->point.unit_id)
                continue;
            int end = o->point.address + (int)hp_type_registers(o->point.type);
            if (o->point.table == HP_TABLE_INPUT && end > input)
                input = end;
            if (o->point.table == HP_TABLE_HOLDING && end > hold)
                hold = end;
            if (o->quantity == HS_Q_PUMP_RUN && o->point.address + 1 > coils)
                coils = o->point.address + 1;
        }
        sim_device *grown = realloc(s->devices, (s->n_devices + 1) * sizeof *grown);
        if (!grown)
            return -1;
        s->devices = grown;
        sim_device *d = &s->devices[s->n_devices];
        d->bus = sg->bus_index;
        d->unit = sg->point.unit_id;
        d->map = modbus_mapping_new(coils, 0, hold, input);
        if (!d->map) {
            fprintf(stderr, "halostage-sim: out of memory for registers\n");
            return -1;
        }
        s->n_devices++;
    }
    sim_model_step(s, 0.0);
    return 0;
}

void sim_model_free(sim *s)
{
    for (size_t i = 0; i < s->n_devices; i++)
        modbus_mapping_free(s->devices[i].map);
    free(s->devices);
    free(s->ponds);
    hs_paths_free(&s->paths);
    s->devices = NULL;
    s->ponds = NULL;
}

/* Sunshine 0..1 at the simulated time of day: a half sine, 6 h to 18 h. */
static double sun_now(const sim *s)
{
    double day = fmod(s->sim_time_s, 86400.0) / 86400.0;
    return fmax(0.0, sin(2.0 * M_PI * (day - 0.25)));
}

/* The SI value a signal should show now. */
static double signal_si(sim *s, const hs_signal *sg, double g)
{
    const hs_pond *p = &s->site.ponds[sg->pond_index];
    const sim_pond *q = &s->ponds[sg->pond_index];
    brine_props b;
    properties(s, sg->pond_index, q->cf, q->temperature_c, &b);
    double rho = b.density_kg_m3;
    switch (sg->quantity) {
    case HS_Q_CONDUCTIVITY:
        if (s->cond_noise_pct > 0)
            return b.conductivity_ms_cm * (1.0 + s->cond_noise_pct / 100.0 * gauss(s));
        return b.conductivity_ms_cm * (1.0 + noise(s, 0.002));
    case HS_Q_TEMPERATURE: return q->temperature_c + noise(s, 0.05);
    case HS_Q_LEVEL_PRESSURE:
        return fmax(0.0, rho * g * (q->depth_m - p->pressure_height_m)) + noise(s, 5.0);
    case HS_Q_PRESSURE_UPPER:
        return fmax(0.0, rho * g * (q->depth_m - p->pressure_height_m - p->pressure_spacing_m))
               + noise(s, 5.0);
    case HS_Q_LEVEL_DISTANCE: return p->distance_height_m - q->depth_m + noise(s, 0.001);
    case HS_Q_DENSITY: return rho + noise(s, 0.1);
    case HS_Q_RAIN: return q->rain_total_m;
    case HS_Q_PUMP_RUN: return q->pumping ? 1.0 : 0.0;
    /* Weather at the pond (invented, simple): air a little cooler than the
     * brine, drier and windier by day, 950 W/m2 at noon. */
    case HS_Q_AIR_TEMPERATURE: return q->temperature_c - 2.0 + noise(s, 0.1);
    case HS_Q_HUMIDITY: return 0.75 - 0.3 * sun_now(s) + noise(s, 0.01);
    case HS_Q_WIND_SPEED: return 2.0 + 2.0 * sun_now(s) + noise(s, 0.2);
    case HS_Q_SOLAR_RADIATION: return 950.0 * sun_now(s);
    default: return NAN;
    }
}

static void write_signal(sim *s, const hs_signal *sg, double g)
{
    sim_device *d = sim_device_find(s, sg->bus_index, sg->point.unit_id);
    if (!d)
        return;
    const hp_point *pt = &sg->point;
    double raw = (signal_si(s, sg, g) / sg->si_factor - pt->offset) / pt->scale;
    const sim_fault *f = sim_fault_for(s, sg->bus_index, pt->unit_id);
    if (f && f->kind == SIM_FAULT_STUCK)
        return; /* the registers keep their last value */
    if (f && (f->kind == SIM_FAULT_NAN || f->kind == SIM_FAULT_SENTINEL)) {
        bool is_float = pt->type == HP_FLOAT32 || pt->type == HP_FLOAT64;
        if (f->kind == SIM_FAULT_NAN && is_float)
            raw = NAN;
        else
            raw = pt->n_sentinels ? pt->sentinels[0] : 65535.0;
    }
    uint16_t *table = pt->table == HP_TABLE_INPUT ? d->map->tab_input_registers
                                                  : d->map->tab_registers;
    hp_encode(raw, pt->type, pt->byte_order, pt->word_order, table + pt->address);
}

/* Metres of scripted rain on a pond during the step that ends now: each
 * shower falls evenly over its hour. */
static double scripted_rain(const sim *s, int pond, double dt_s)
{
    double t1 = s->sim_time_s - s->start_time_s, t0 = t1 - dt_s, m = 0.0;
    for (size_t k = 0; k < s->n_rains; k++) {
        const sim_rain *r = &s->rains[k];
        if (r->pond >= 0 && r->pond != pond)
            continue;
        double a = r->at_h * 3600.0, b = a + 3600.0;
        double overlap = fmin(t1, b) - fmax(t0, a);
        if (overlap > 0)
            m += r->mm / 1000.0 * overlap / 3600.0;
    }
    return m;
}

void sim_model_step(sim *s, double dt_s)
{
    double g = 9.80665;
    (void)hc_gravity(s->site.site.latitude_deg, 0.0, &g);
    pthread_mutex_lock(&s->lock);
    s->sim_time_s += dt_s;
    double day = fmod(s->sim_time_s, 86400.0) / 86400.0;          /* 0..1 from midnight */
    double season = sin(2.0 * M_PI * fmod(s->sim_time_s, 365.25 * 86400.0) /
                        (365.25 * 86400.0));
    double sun = fmax(0.0, sin(2.0 * M_PI * (day - 0.25)));       /* 6 h to 18 h */
    /* Rain: on average one event every ~10 simulated days, lasting ~2 h. */
    static const double rain_rate_m_s = 4e-3 / 3600.0;
    bool raining = s->n_rains == 0 && fmod(s->sim_time_s / 3600.0, 240.0) < 2.0 && season < 0.3;
    for (size_t i = 0; i < s->site.n_ponds; i++) {
        sim_pond *q = &s->ponds[i];
        const hs_pond *p = &s->site.ponds[i];
        q->temperature_c = 22.0 + 6.0 * season + 7.0 * (sun - 0.3);
        /* 6 mm/day mean, twice as fast at noon, slower in salty brine (water
         * activity falls to ~0.75 at halite saturation, Salhotra et al. 1985). */
        double activity = 1.0 - 0.25 * fmin(1.0, (q->cf - 1.0) / 10.0);
        double evap_m_s = 6e-3 / 86400.0 * (1.0 + 0.4 * season) * 2.0 * sun * activity;
        /* Salts stay: the water mass, and so CF, follows the depth. Past
         * halite onset rain dilutes the brine instead (the deposit stays on
         * the floor), and evaporation takes that water back first. */
        double before = q->depth_m;
        q->depth_m = fmax(0.01, q->depth_m - evap_m_s * dt_s);
        double dried = before / q->depth_m; /* >= 1 */
        if (q->dilution > 1.0) {
            q->dilution /= dried;
            dried = 1.0;
            if (q->dilution < 1.0) {
                dried = 1.0 / q->dilution;
                q->dilution = 1.0;
            }
        }
        q->cf = fmin(s->max_cf, q->cf * dried);
        double rain_m = scripted_rain(s, (int)i, dt_s) + (raining ? rain_rate_m_s * dt_s : 0.0);
        if (rain_m > 0) {
            const hc_path *path = hs_paths_for(&s->paths, p->feed_index);
            double halite_cf = path ? hc_path_stage_cf(path, HC_STAGE_HALITE) : NAN;
            double wetter = (q->depth_m + rain_m) / q->depth_m;
            if (isfinite(halite_cf) && q->cf > halite_cf)
                q->dilution *= wetter;
            else
                q->cf /= wetter;
            q->depth_m += rain_m;
            q->rain_total_m += rain_m;
        }
        /* Pumps: the coil at the pump-run address starts the pond's pump;
         * it moves 50 mm/h of depth down the chain, and stops itself at
         * level_min (the sim's own interlock). */
        const hs_signal *run = hs_site_signal(&s->site, (int)i, HS_Q_PUMP_RUN);
        sim_device *d = run ? sim_device_find(s, run->bus_index, run->point.unit_id) : NULL;
        q->pumping = d && d->map->tab_bits[run->point.address] &&
                     (isnan(p->level_min_m) || q->depth_m > p->level_min_m) && p->next_index >= 0;
        if (q->pumping && dt_s > 0) {
            double moved = 0.05 / 3600.0 * dt_s;
            sim_pond *nx = &s->ponds[p->next_index];
            double a_from = isnan(p->floor_area_m2) ? 1e4 : p->floor_area_m2;
            const hs_pond *pn = &s->site.ponds[p->next_index];
            double a_to = isnan(pn->floor_area_m2) ? 1e4 : pn->floor_area_m2;
            double add = moved * a_from / a_to;
            /* Feed-water equivalents add up: W c = W1 c1 + W2 c2. */
            nx->cf = (nx->cf * nx->depth_m + q->cf * add) / (nx->depth_m + add);
            nx->depth_m += add;
            q->depth_m -= moved;
        }
    }
    for (size_t k = 0; k < s->site.n_signals; k++)
        write_signal(s, &s->site.signals[k], g);
    pthread_mutex_unlock(&s->lock);
}

/* Writes the model's true pond values as one JSON object, atomically
 * (temporary file, then rename), so tests can compare what the daemon
 * infers with what the simulator holds. */
int sim_truth_write(sim *s, const char *path)
{
    char tmp[512];
    snprintf(tmp, sizeof tmp, "%s.tmp", path);
    FILE *f = fopen(tmp, "w");
    if (!f)
        return -1;
    pthread_mutex_lock(&s->lock);
    fprintf(f, "{\"time_s\": %.3f, \"ponds\": {", s->sim_time_s);
    for (size_t i = 0; i < s->site.n_ponds; i++) {
        const sim_pond *q = &s->ponds[i];
        brine_props b;
        properties(s, (int)i, q->cf, q->temperature_c, &b);
        brine_props r;
        properties(s, (int)i, q->cf, s->site.site.reference_temperature_c, &r);
        fprintf(f, "%s\"%s\": {\"concentration_factor\": %.6f, \"salinity_g_kg\": %.4f, "
                "\"temperature_c\": %.4f, \"depth_m\": %.6f, \"density_kg_m3\": %.4f, "
                "\"density_ref_kg_m3\": %.4f, \"rain_total_m\": %.6f, "
                "\"conductivity_ms_cm\": %.4f, \"pumping\": %s}",
                i ? ", " : "", s->site.ponds[i].name, q->cf, b.salinity_g_kg, q->temperature_c,
                q->depth_m, b.density_kg_m3, r.density_kg_m3, q->rain_total_m,
                b.conductivity_ms_cm, q->pumping ? "true" : "false");
    }
    fprintf(f, "}}\n");
    pthread_mutex_unlock(&s->lock);
    if (fclose(f) != 0)
        return -1;
    return rename(tmp, path);
}
