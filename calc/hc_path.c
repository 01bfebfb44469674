/* Building the evaporation path (see hc_path.h for the method). */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_equilibrium.h"
#include "hc_path_private.h"

#define MAX_SPLIT_DEPTH 6   /* a failing step is retried as up to 64 sub-steps */
#define STEPS_PAST_END 5    /* steps kept after bischofite begins */
#define MAX_STEPS 5000

struct run {
    const hc_pitzer_params *pitzer;
    const hc_mineral_set *set;
    hc_path_mode mode;
    double total[HC_ION_COUNT];      /* equilibrium mode: everything in the system [mol] */
    double dissolved[HC_ION_COUNT];  /* fractional mode: what the brine holds [mol] */
    double evaporated;               /* [kg], per kg of feed water */
    double water;                    /* liquid water [kg] */
    double n[HC_MINERAL_COUNT];      /* equilibrium: solids present; fractional: last step's */
    unsigned char present[HC_MINERAL_COUNT];
    double cumulative[HC_MINERAL_COUNT]; /* [mol per kg feed water] */
    hc_equilibrium eq;
    int caco3;                       /* the CaCO3 phase waiting to nucleate, or -1 */
    double caco3_onset_si;           /* SI at which it nucleates */
};

/* One evaporation step of d_evap kg. Returns HC_OK or the solver's error;
 * on error *r is unchanged. */
static hc_status advance_once(struct run *r, double d_evap)
{
    struct run next = *r;
    hc_status st;
    if (r->mode == HC_PATH_FRACTIONAL) {
        double n[HC_MINERAL_COUNT] = {0};
        double base_w = r->water - d_evap;
        if (!(base_w > 0.0))
            return HC_ERR_DOMAIN;
        st = hc_equilibrate(r->pitzer, r->set, r->dissolved, base_w, next.present, n, &next.eq);
        if (st != HC_OK)
            return st;
        for (int i = 0; i < HC_ION_COUNT; i++) /* totals: ion pairs stay with their ions */
            next.dissolved[i] = next.eq.total[i] * next.eq.water_kg;
        for (int m = 0; m < HC_MINERAL_COUNT; m++) {
            next.cumulative[m] += n[m];
            next.n[m] = n[m];
        }
    } else {
        double base_w = 1.0 - (r->evaporated + d_evap);
        if (!(base_w > 0.0))
            return HC_ERR_DOMAIN;
        st = hc_equilibrate(r->pitzer, r->set, r->total, base_w, next.present, next.n, &next.eq);
        if (st != HC_OK)
            return st;
        memcpy(next.cumulative, next.n, sizeof next.n);
    }
    next.water = next.eq.water_kg;
    next.evaporated = r->evaporated + d_evap;
    *r = next;
    return HC_OK;
}

/* CaCO3 nucleation: the CaCO3 phase stays out until its SI reaches
 * r->caco3_onset_si, then joins and the brine is brought back to
 * equilibrium at the same water. Returns HC_OK or the solver's error. */
static hc_status nucleate(struct run *r, hc_mineral_set *set)
{
    if (r->caco3 < 0 || set->enabled[r->caco3] ||
        !(r->eq.saturation_index[r->caco3] >= r->caco3_onset_si))
        return HC_OK;
    set->enabled[r->caco3] = 1;
    return advance_once(r, 0.0);
}

/* A step, split in halves (recursively) when the solver fails. */
static hc_status advance(struct run *r, double d_evap, int depth)
{
    hc_status st = advance_once(r, d_evap);
    if (st == HC_OK || depth >= MAX_SPLIT_DEPTH)
        return st;
    struct run save = *r;
    st = advance(r, 0.5 * d_evap, depth + 1);
    if (st == HC_OK)
        st = advance(r, 0.5 * d_evap, depth + 1);
    if (st != HC_OK)
        *r = save;
    return st;
}

/* The point of the current state. */
static void record(const struct run *r, const hc_feed *feed, double t_c, hc_path_point *p)
{
    memset(p, 0, sizeof *p);
    p->concentration_factor = 1.0 / r->water;
    p->water_removed_fraction = r->evaporated;
    /* Free ions with the neutral ion pairs counted in their ions, so that
     * the dissolved mass (and the density from it) misses nothing. */
    memcpy(p->molality, r->eq.molality, sizeof p->molality);
    p->molality[HC_ION_CA] += r->eq.carbonate.caco3_pair;
    p->molality[HC_ION_MG] += r->eq.carbonate.mgco3_pair;
    p->molality[HC_ION_CO3] += r->eq.carbonate.caco3_pair + r->eq.carbonate.mgco3_pair;
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        p->precipitated[m] = r->cumulative[m] * feed->water_mass_fraction;
    memcpy(p->saturation_index, r->eq.saturation_index, sizeof p->saturation_index);
    p->water_activity = r->eq.pitzer.water_activity;
    p->ionic_strength = r->eq.pitzer.ionic_strength;
    p->osmotic_coefficient = r->eq.pitzer.osmotic_coefficient;
    p->ph = r->eq.carbonate.ph;
    p->alkalinity = r->eq.carbonate.alkalinity;
    if (hc_brine_density(p->molality, t_c, &p->density_kg_m3) != HC_OK)
        p->density_kg_m3 = NAN;
    double g = hc_solute_g_per_kg_water(p->molality);
    p->salinity_g_kg = 1000.0 * g / (1000.0 + g);
}

/* Onset of mineral m, which has first deposited at point `cur`; prev and
 * prev2 (may be NULL) are the two points before. The CF is where the SI trend
 * of the previous points reaches `threshold` (0, or the CaCO3 nucleation
 * SI), kept within [prev, cur]. */
static void onset_between(hc_mineral m, double threshold, const hc_path_point *prev2,
                          const hc_path_point *prev, const hc_path_point *cur, hc_path_onset *o)
{
    double l1 = log(prev->concentration_factor), l2 = log(cur->concentration_factor);
    double s1 = prev->saturation_index[m] - threshold, lon = l1;
    if (s1 < 0.0 && isfinite(s1)) {
        lon = l2;
        if (prev2 != NULL && isfinite(prev2->saturation_index[m])) {
            double l0 = log(prev2->concentration_factor);
            double s0 = prev2->saturation_index[m] - threshold;
            if (s1 > s0 && l1 > l0)
                lon = l1 - s1 * (l1 - l0) / (s1 - s0);
        }
        lon = fmin(fmax(lon, l1), l2);
    }
    double f = l2 > l1 ? (lon - l1) / (l2 - l1) : 0.0;
    o->mineral = m;
    o->concentration_factor = exp(lon);
    o->water_removed_fraction = prev->water_removed_fraction +
                                f * (cur->water_removed_fraction - prev->water_removed_fraction);
    o->density_kg_m3 = prev->density_kg_m3 + f * (cur->density_kg_m3 - prev->density_kg_m3);
    o->water_activity = prev->water_activity + f * (cur->water_activity - prev->water_activity);
    double mol[HC_ION_COUNT];
    for (int i = 0; i < HC_ION_COUNT; i++)
        mol[i] = prev->molality[i] + f * (cur->molality[i] - prev->molality[i]);
    /* SG at 60/60 degF and the US Baume scale (modulus 145), DOMAIN sec. 3. */
    if (hc_brine_specific_gravity(mol, 15.556, &o->specific_gravity) != HC_OK)
        o->specific_gravity = NAN;
    o->baume = 145.0 * (1.0 - 1.0 / o->specific_gravity);
}

static int onset_cmp(const void *a, const void *b)
{
    double x = ((const hc_path_onset *)a)->concentration_factor;
    double y = ((const hc_path_onset *)b)->concentration_factor;
    return (x > y) - (x < y);
}

/* Returns HC_OK or an error listed in hc_path.h. */
hc_status hc_path_build_ex(const hc_feed *feed, double t_c, hc_path_mode mode,
                           const hc_path_options *options, hc_path **out)
{
    hc_path_options opt = {0};
    if (options != NULL)
        opt = *options;
    if (mode != HC_PATH_FRACTIONAL && mode != HC_PATH_EQUILIBRIUM)
        return HC_ERR_ARGUMENT;
    if (opt.step == 0.0)
        opt.step = 0.02;
    if (opt.max_cf == 0.0)
        opt.max_cf = 2000.0;
    if (!(opt.step > 0.001 && opt.step <= 0.2) || !(opt.max_cf > 1.0 && opt.max_cf <= 1e5))
        return HC_ERR_ARGUMENT;
    if (!(opt.log_p_co2 >= -8.0 && opt.log_p_co2 <= 0.0))
        return HC_ERR_ARGUMENT;
    hc_pitzer_params pitzer;
    hc_mineral_set set;
    hc_status st = hc_pitzer_params_at(t_c, &pitzer);
    if (st != HC_OK)
        return st;
    if (opt.caco3_onset_si == 0.0)
        opt.caco3_onset_si = HC_CACO3_ONSET_SI;
    if (!(opt.caco3_onset_si < 2.0))
        return HC_ERR_ARGUMENT;
    if (opt.log_p_co2 == 0.0)
        opt.log_p_co2 = HC_LOG_PCO2_AIR;
    st = hc_mineral_set_at_pco2(t_c, opt.mineral_flags, opt.log_p_co2, &set);
    if (st != HC_OK)
        return st;

    size_t cap = (size_t)(log(opt.max_cf) / opt.step) + 16;
    hc_path *path = calloc(1, sizeof *path);
    hc_path_point *pts = calloc(cap, sizeof *pts);
    if (path == NULL || pts == NULL) {
        free(path);
        free(pts);
        return HC_ERR_DOMAIN;
    }
    path->feed = *feed;
    path->t_c = t_c;
    path->mode = mode;
    path->points = pts;
    for (int s = 0; s < HC_STAGE_COUNT; s++)
        path->stage_cf[s] = NAN;
    path->stage_cf[HC_STAGE_SEAWATER] = 1.0;

    struct run r;
    memset(&r, 0, sizeof r);
    r.pitzer = &pitzer;
    r.set = &set;
    r.mode = mode;
    r.water = 1.0;
    memcpy(r.total, feed->molality, sizeof r.total);
    memcpy(r.dissolved, feed->molality, sizeof r.dissolved);
    /* CaCO3 waits for its nucleation SI (a negative setting: equilibrium). */
    r.caco3 = set.enabled[HC_MIN_ARAGONITE] ? HC_MIN_ARAGONITE
              : set.enabled[HC_MIN_CALCITE] ? HC_MIN_CALCITE : -1;
    r.caco3_onset_si = opt.caco3_onset_si;
    if (r.caco3 >= 0 && opt.caco3_onset_si > 0.0)
        set.enabled[r.caco3] = 0;
    else
        r.caco3 = -1;
    st = advance(&r, 0.0, 0);
    if (st == HC_OK)
        st = nucleate(&r, &set);
    if (st != HC_OK)
        goto fail;
    record(&r, feed, t_c, &pts[0]);
    path->count = 1;

    unsigned char seen[HC_MINERAL_COUNT] = {0};
    /* Minerals the feed itself deposits begin at CF 1. */
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        if (!(r.cumulative[m] > 0.0))
            continue;
        seen[m] = 1;
        onset_between((hc_mineral)m, 0.0, NULL, &pts[0], &pts[0],
                      &path->onsets[path->onset_count++]);
        hc_stage s = hc_mineral_stage((hc_mineral)m);
        if (s >= 0 && !(path->stage_cf[s] <= 1.0))
            path->stage_cf[s] = 1.0;
    }
    int past_end = -1;
    for (int k = 1; k < MAX_STEPS && path->count < cap; k++) {
        double target = 1.0 - exp(-opt.step * k);
        if (target <= r.evaporated)
            continue;
        if (advance(&r, target - r.evaporated, 0) != HC_OK || nucleate(&r, &set) != HC_OK)
            break; /* the path stops here; hc_path_complete tells */
        hc_path_point *cur = &pts[path->count];
        record(&r, feed, t_c, cur);
        if (!(cur->concentration_factor > pts[path->count - 1].concentration_factor))
            continue; /* hydrate water given back; keep CF increasing */
        path->count++;
        for (int m = 0; m < HC_MINERAL_COUNT; m++) {
            path->max_precipitated[m] = fmax(path->max_precipitated[m], cur->precipitated[m]);
            if (seen[m] || !(r.cumulative[m] > 0.0))
                continue;
            seen[m] = 1;
            const hc_path_point *prev = &pts[path->count - 2];
            const hc_path_point *prev2 = path->count >= 3 ? &pts[path->count - 3] : NULL;
            double thr = (m == HC_MIN_ARAGONITE || m == HC_MIN_CALCITE) && opt.caco3_onset_si > 0.0
                             ? opt.caco3_onset_si : 0.0;
            onset_between((hc_mineral)m, thr, prev2, prev, cur,
                          &path->onsets[path->onset_count]);
            double cf = path->onsets[path->onset_count].concentration_factor;
            path->onset_count++;
            hc_stage s = hc_mineral_stage((hc_mineral)m);
            if (s >= 0 && !(path->stage_cf[s] <= cf))
                path->stage_cf[s] = cf;
            if (m == HC_MIN_BISCHOFITE)
                past_end = 0;
        }
        if (past_end >= 0 && ++past_end > STEPS_PAST_END)
            break;
        if (cur->concentration_factor > opt.max_cf)
            break;
    }
    if (path->count < 2) {
        st = HC_ERR_NO_CONVERGENCE;
        goto fail;
    }
    path->rising = malloc(path->count * sizeof *path->rising);
    if (path->rising == NULL) {
        st = HC_ERR_DOMAIN;
        goto fail;
    }
    double top = -HUGE_VAL;
    for (size_t i = 0; i < path->count; i++)
        if (pts[i].density_kg_m3 > top) {
            top = pts[i].density_kg_m3;
            path->rising[path->rising_count++] = i;
        }
    path->complete = seen[HC_MIN_BISCHOFITE];
    qsort(path->onsets, path->onset_count, sizeof path->onsets[0], onset_cmp);
    /* A stage begins no later than any stage after it (a later stage's
     * mineral may appear first only when the earlier one never does). */
    for (int s = HC_STAGE_COUNT - 2; s >= 0; s--)
        if (isfinite(path->stage_cf[s]) && isfinite(path->stage_cf[s + 1]) &&
            path->stage_cf[s] > path->stage_cf[s + 1])
            path->stage_cf[s] = path->stage_cf[s + 1];
    *out = path;
    return HC_OK;
fail:
    free(path->rising);
    free(pts);
    free(path);
    return st;
}

/* Returns as hc_path_build_ex with default options. */
hc_status hc_path_build(const hc_feed *feed, double t_c, hc_path_mode mode, hc_path **out)
{
    return hc_path_build_ex(feed, t_c, mode, NULL, out);
}

/* Frees a path from hc_path_build; NULL is allowed. */
void hc_path_free(hc_path *path)
{
    if (path == NULL)
        return;
    free(path->points);
    free(path->rising);
    free(path);
}
