/* Reading a built evaporation path per sample: no allocation. */
#include <math.h>
#include <string.h>

#include "hc_brine_cond.h"
#include "hc_brine_density.h"
#include "hc_path_private.h"
#include "hc_pss78.h"
#include "hc_seawater.h"

size_t hc_path_step_count(const hc_path *path) { return path->count; }
double hc_path_temperature(const hc_path *path) { return path->t_c; }
hc_path_mode hc_path_mode_of(const hc_path *path) { return path->mode; }
const hc_feed *hc_path_feed(const hc_path *path) { return &path->feed; }
int hc_path_complete(const hc_path *path) { return path->complete; }

/* Returns the step, NULL past the end. */
const hc_path_point *hc_path_step(const hc_path *path, size_t i)
{
    return i < path->count ? &path->points[i] : NULL;
}

/* Returns the amount, 0 for an invalid mineral. */
double hc_path_max_precipitated(const hc_path *path, hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return 0.0;
    return path->max_precipitated[mineral];
}

/* Returns the number of onsets. */
size_t hc_path_onsets(const hc_path *path, hc_path_onset *out, size_t max)
{
    for (size_t i = 0; i < path->onset_count && i < max; i++)
        out[i] = path->onsets[i];
    return path->onset_count;
}

/* Returns the CF, NaN when never reached or invalid. */
double hc_path_stage_cf(const hc_path *path, hc_stage stage)
{
    if ((int)stage < 0 || stage >= HC_STAGE_COUNT)
        return NAN;
    return path->stage_cf[stage];
}

/* Returns the stage at cf; *next (may be NULL) the next one reached. */
hc_stage hc_path_stage_at_cf(const hc_path *path, double cf, hc_stage *next)
{
    hc_stage cur = HC_STAGE_SEAWATER, nx = HC_STAGE_NONE;
    for (int s = 0; s < HC_STAGE_COUNT; s++) {
        double c = path->stage_cf[s];
        if (!isfinite(c))
            continue;
        if (c <= cf)
            cur = (hc_stage)s;
    }
    for (int s = cur + 1; s < HC_STAGE_COUNT; s++)
        if (isfinite(path->stage_cf[s]) && path->stage_cf[s] > cf) {
            nx = (hc_stage)s;
            break;
        }
    if (next != NULL)
        *next = nx;
    return cur;
}

/* Index i with cf(i) <= cf < cf(i+1), cf already within the path. */
static size_t segment(const hc_path *path, double cf)
{
    size_t lo = 0, hi = path->count - 1;
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (path->points[mid].concentration_factor <= cf)
            lo = mid;
        else
            hi = mid;
    }
    return lo;
}

static double lerp(double a, double b, double f) { return a + f * (b - a); }

/* Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_NEGATIVE. */
hc_status hc_path_point_at_cf(const hc_path *path, double cf, hc_path_point *out,
                              unsigned *warnings)
{
    if (!isfinite(cf))
        return HC_ERR_NOT_FINITE;
    if (cf <= 0.0)
        return HC_ERR_NEGATIVE;
    const hc_path_point *first = &path->points[0], *last = &path->points[path->count - 1];
    if (cf < first->concentration_factor) {
        if (warnings != NULL && cf < first->concentration_factor * (1.0 - 1e-9))
            *warnings |= HC_WARN_BELOW_FEED;
        *out = *first;
        return HC_OK;
    }
    if (cf >= last->concentration_factor) {
        if (warnings != NULL && cf > last->concentration_factor * (1.0 + 1e-9))
            *warnings |= HC_WARN_BEYOND_PATH;
        *out = *last;
        return HC_OK;
    }
    size_t i = segment(path, cf);
    const hc_path_point *a = &path->points[i], *b = &path->points[i + 1];
    double f = (log(cf) - log(a->concentration_factor)) /
               (log(b->concentration_factor) - log(a->concentration_factor));
    out->concentration_factor = cf;
    out->water_removed_fraction = lerp(a->water_removed_fraction, b->water_removed_fraction, f);
    for (int k = 0; k < HC_ION_COUNT; k++)
        out->molality[k] = lerp(a->molality[k], b->molality[k], f);
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        out->precipitated[m] = lerp(a->precipitated[m], b->precipitated[m], f);
        double sa = a->saturation_index[m], sb = b->saturation_index[m];
        out->saturation_index[m] = isfinite(sa) && isfinite(sb) ? lerp(sa, sb, f) : sb;
    }
    out->water_activity = lerp(a->water_activity, b->water_activity, f);
    out->ionic_strength = lerp(a->ionic_strength, b->ionic_strength, f);
    out->osmotic_coefficient = lerp(a->osmotic_coefficient, b->osmotic_coefficient, f);
    out->density_kg_m3 = lerp(a->density_kg_m3, b->density_kg_m3, f);
    out->salinity_g_kg = lerp(a->salinity_g_kg, b->salinity_g_kg, f);
    out->ph = lerp(a->ph, b->ph, f); /* NaN without carbonate */
    out->alkalinity = lerp(a->alkalinity, b->alkalinity, f);
    return HC_OK;
}

/* Density of path point i at t_c (cached at the path temperature). */
static double density_at(const hc_path *path, size_t i, double t_c)
{
    if (t_c == path->t_c)
        return path->points[i].density_kg_m3;
    double rho;
    if (hc_brine_density(path->points[i].molality, t_c, &rho) != HC_OK)
        return NAN;
    return rho;
}

/* Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_TEMPERATURE_RANGE. */
hc_status hc_path_cf_at_density(const hc_path *path, double rho_kg_m3, double t_c, double *cf,
                                unsigned *warnings)
{
    if (!isfinite(rho_kg_m3) || !isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (t_c < -5.0 || t_c > 100.0)
        return HC_ERR_TEMPERATURE_RANGE;
    const size_t *idx = path->rising;
    size_t n = path->rising_count;
    double r0 = density_at(path, idx[0], t_c), rn = density_at(path, idx[n - 1], t_c);
    if (rho_kg_m3 <= r0) {
        if (warnings != NULL && rho_kg_m3 < r0 - 1e-9)
            *warnings |= HC_WARN_BELOW_FEED;
        *cf = path->points[idx[0]].concentration_factor;
        return HC_OK;
    }
    if (rho_kg_m3 >= rn) {
        if (warnings != NULL && rho_kg_m3 > rn + 1e-9)
            *warnings |= HC_WARN_BEYOND_PATH;
        *cf = path->points[idx[n - 1]].concentration_factor;
        return HC_OK;
    }
    size_t lo = 0, hi = n - 1;
    double rlo = r0, rhi = rn;
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        double rm = density_at(path, idx[mid], t_c);
        if (rm < rho_kg_m3) {
            lo = mid;
            rlo = rm;
        } else {
            hi = mid;
            rhi = rm;
        }
    }
    double la = log(path->points[idx[lo]].concentration_factor);
    double lb = log(path->points[idx[hi]].concentration_factor);
    double f = rhi > rlo ? (rho_kg_m3 - rlo) / (rhi - rlo) : 0.0;
    *cf = exp(la + fmin(1.0, fmax(0.0, f)) * (lb - la));
    return HC_OK;
}

/* Returns HC_OK or an error listed in hc_path.h. */
hc_status hc_path_state_from_cf(const hc_path *path, double cf, double t_c, double t_ref_c,
                                double baume_modulus, hc_brine_state *out)
{
    if (!isfinite(cf) || !isfinite(t_c) || !isfinite(t_ref_c) || !isfinite(baume_modulus))
        return HC_ERR_NOT_FINITE;
    if (!(baume_modulus > 0.0))
        return HC_ERR_ARGUMENT;
    unsigned warn = 0;
    hc_path_point p;
    hc_status st = hc_path_point_at_cf(path, cf, &p, &warn);
    if (st != HC_OK)
        return st;
    hc_brine_state s;
    hc_state_clear(&s);
    st = hc_brine_density(p.molality, t_c, &s.density_kg_m3);
    if (st == HC_OK)
        st = hc_brine_density(p.molality, t_ref_c, &s.density_ref_kg_m3);
    if (st != HC_OK)
        return st;
    /* SG t_ref/t_ref = rho(t_ref) / rho_w(t_ref) (hc_baume.h), as
     * hc_brine_specific_gravity does [1] */
    s.specific_gravity = s.density_ref_kg_m3 / hc_water_density_lc(t_ref_c);
    s.temperature_c = t_c;
    s.reference_temperature_c = t_ref_c;
    s.baume_modulus = baume_modulus;
    /* Heavy-liquid scale: deg Be = m (1 - 1/SG) (NBS Circular 59, 1916) [deg Be] */
    s.baume = baume_modulus * (1.0 - 1.0 / s.specific_gravity);
    s.salinity_g_kg = p.salinity_g_kg;
    s.concentration_factor = p.concentration_factor;
    /* Before anything deposits, seawater's practical salinity scales with CF. */
    double sp = path->feed.practical_salinity * p.concentration_factor;
    if (isfinite(sp) && sp <= 42.0 &&
        !(p.concentration_factor >= path->stage_cf[HC_STAGE_GYPSUM]))
        s.practical_salinity = sp;
    s.stage = hc_path_stage_at_cf(path, p.concentration_factor, &s.next_stage);
    if (s.next_stage != HC_STAGE_NONE) {
        hc_path_point q;
        if (hc_path_point_at_cf(path, path->stage_cf[s.next_stage], &q, NULL) == HC_OK &&
            (hc_brine_density(q.molality, t_c, &s.next_stage_density_kg_m3) != HC_OK ||
             hc_brine_density(q.molality, t_ref_c, &s.next_stage_density_ref_kg_m3) != HC_OK)) {
            s.next_stage_density_kg_m3 = NAN;
            s.next_stage_density_ref_kg_m3 = NAN;
        }
    }
    memcpy(s.saturation_index, p.saturation_index, sizeof s.saturation_index);
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        if (!isfinite(s.saturation_index[m]))
            s.saturation_index[m] = NAN;
    s.water_activity = p.water_activity;
    s.method = HC_METHOD_COMPOSITION;
    s.warnings = warn;
    /* Past the halite onset density barely moves with CF (the same brine
     * reads CF 61 at 40 degC and 131 at 15 degC through the model): the CF
     * is reported, flagged, and decided on nowhere. */
    if (isfinite(path->stage_cf[HC_STAGE_HALITE]) &&
        p.concentration_factor >= path->stage_cf[HC_STAGE_HALITE])
        s.warnings |= HC_WARN_CF_UNCERTAIN;
    if (t_c < 0.0 || t_c > 50.0)
        s.warnings |= HC_WARN_TEMPERATURE_EXTRAPOLATED;
    *out = s;
    return HC_OK;
}

/* A brine the path cannot place (denser than its end, or lighter than the
 * feed): s holds the path's end (or first) brine; ratio is the measured
 * density over that brine's at the same temperature. The measurement is
 * kept: density and SG scale by ratio (the end brine's thermal expansion
 * refers it to t_ref), Baume follows from that SG, and what only the path
 * could say (CF, salinity, saturation, water activity, next stage) becomes
 * unknown. A NaN ratio (nothing measured: conductivity beyond the model)
 * leaves density, SG and Baume unknown too. The stage stays the last (or
 * first) one the path knows. */
static void keep_measurement(hc_brine_state *s, double ratio)
{
    s->density_kg_m3 *= ratio;
    s->density_ref_kg_m3 *= ratio;
    s->specific_gravity *= ratio;
    /* Heavy-liquid scale: deg Be = m (1 - 1/SG) (NBS Circular 59, 1916) [deg Be] */
    s->baume = s->baume_modulus * (1.0 - 1.0 / s->specific_gravity);
    s->concentration_factor = NAN;
    s->salinity_g_kg = NAN;
    s->practical_salinity = NAN;
    s->next_stage = HC_STAGE_NONE;
    s->next_stage_density_kg_m3 = NAN;
    s->next_stage_density_ref_kg_m3 = NAN;
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        s->saturation_index[m] = NAN;
    s->water_activity = NAN;
}

/* Returns HC_OK or an error listed in hc_path.h. */
hc_status hc_path_state_from_density(const hc_path *path, double rho_kg_m3, double t_c,
                                     double t_ref_c, double baume_modulus, hc_brine_state *out)
{
    unsigned warn = 0;
    double cf;
    hc_status st = hc_path_cf_at_density(path, rho_kg_m3, t_c, &cf, &warn);
    if (st != HC_OK)
        return st;
    st = hc_path_state_from_cf(path, cf, t_c, t_ref_c, baume_modulus, out);
    if (st != HC_OK)
        return st;
    /* Report the density as measured, never as the model rounds or clamps it. */
    if (warn & (HC_WARN_BELOW_FEED | HC_WARN_BEYOND_PATH))
        keep_measurement(out, rho_kg_m3 / out->density_kg_m3);
    else
        out->density_kg_m3 = rho_kg_m3;
    out->warnings |= warn;
    out->method = HC_METHOD_DENSITY_INPUT;
    return HC_OK;
}

/* Model conductivity of path point i at t_c [mS/cm]. */
/* The brine model is anchored to PSS-78 where the two meet (S_P 42): at
 * the join it is scaled to PSS-78's conductivity exactly, and the scale
 * fades linearly in ln CF to none at twice the join's CF, so that a
 * reading crossing S_P 42 moves density and CF continuously. */
struct cond_anchor {
    double cf_join;   /* CF at S_P 42 [1]; NaN: no anchor (feed without S_P) */
    double ln_scale;  /* ln(C_PSS78(42, t) / model(cf_join, t)) [1] */
};

static struct cond_anchor anchor_at(const hc_path *path, double t_c)
{
    struct cond_anchor a = {NAN, 0.0};
    double sp = path->feed.practical_salinity, c42, k42;
    hc_path_point j;
    if (!(sp > 0.0) || sp >= HC_PSS78_SP_MAX)
        return a;
    double cf; /* the CF the seawater calculation gives S_P 42 (water mass ratio) */
    if (hc_seawater_cf(HC_PSS78_SP_MAX, sp, &cf) != HC_OK ||
        hc_pss78_c_from_sp(HC_PSS78_SP_MAX, t_c, 0.0, &c42) != HC_OK ||
        hc_path_point_at_cf(path, cf, &j, NULL) != HC_OK ||
        hc_brine_conductivity(j.salinity_g_kg, t_c, &k42) != HC_OK || !(k42 > 0.0))
        return a;
    a.cf_join = cf;
    a.ln_scale = log(c42 / k42);
    return a;
}

static double anchored(double k, double cf, const struct cond_anchor *a)
{
    if (isfinite(a->cf_join) && cf < 2.0 * a->cf_join) {
        /* weight 1 up to the join, 0 from 2 cf_join, linear in ln CF [1] */
        double w = cf <= a->cf_join ? 1.0 : 1.0 - log(cf / a->cf_join) / log(2.0);
        k *= exp(w * a->ln_scale);
    }
    return k;
}

static double model_cond(const hc_path *path, size_t i, double t_c, const struct cond_anchor *a)
{
    double k;
    if (hc_brine_conductivity(path->points[i].salinity_g_kg, t_c, &k) != HC_OK)
        return NAN;
    return anchored(k, path->points[i].concentration_factor, a);
}

/* Returns HC_OK or an error of hc_path_point_at_cf / hc_brine_conductivity. */
hc_status hc_path_model_conductivity(const hc_path *path, double cf, double t_c,
                                     double *cond_ms_cm)
{
    hc_path_point p;
    double k;
    hc_status st = hc_path_point_at_cf(path, cf, &p, NULL);
    if (st == HC_OK)
        st = hc_brine_conductivity(p.salinity_g_kg, t_c, &k);
    if (st != HC_OK)
        return st;
    struct cond_anchor a = anchor_at(path, t_c);
    *cond_ms_cm = anchored(k, p.concentration_factor, &a);
    return HC_OK;
}

/* Returns HC_OK or an error listed in hc_path.h. */
hc_status hc_path_state_from_conductivity(const hc_path *path, double cond_ms_cm, double t_c,
                                          double t_ref_c, double baume_modulus,
                                          const hc_calibration *cal, hc_brine_state *out)
{
    if (!isfinite(cond_ms_cm) || !isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (cond_ms_cm < 0.0)
        return HC_ERR_NEGATIVE;
    unsigned warn = 0;
    double cf;
    hc_status st;
    hc_method method;
    double cal_sg = NAN;
    if (cal != NULL) {
        double sg, rho_ref;
        st = hc_calibration_sg(cal, cond_ms_cm, t_c, &sg, &warn);
        cal_sg = sg;
        if (st != HC_OK)
            return st;
        rho_ref = sg * hc_water_density_lc(cal->t_ref_c);
        st = hc_path_cf_at_density(path, rho_ref, cal->t_ref_c, &cf, &warn);
        if (st != HC_OK)
            return st;
        method = HC_METHOD_SITE_CALIBRATION;
    } else {
        if (t_c < -5.0 || t_c > 60.0)
            return HC_ERR_TEMPERATURE_RANGE;
        /* The model rises with CF; search the points for the reading. */
        struct cond_anchor an = anchor_at(path, t_c);
        size_t n = path->count, lo = 0, hi = n - 1;
        double k0 = model_cond(path, 0, t_c, &an), kn = model_cond(path, n - 1, t_c, &an);
        if (!isfinite(k0) || !isfinite(kn))
            return HC_ERR_SALINITY_RANGE;
        if (cond_ms_cm <= k0) {
            cf = path->points[0].concentration_factor;
            if (cond_ms_cm < k0 * (1.0 - 1e-9))
                warn |= HC_WARN_BELOW_FEED;
        } else if (cond_ms_cm >= kn) {
            cf = path->points[n - 1].concentration_factor;
            warn |= HC_WARN_BEYOND_PATH;
        } else {
            double klo = k0, khi = kn;
            while (hi - lo > 1) {
                size_t mid = (lo + hi) / 2;
                double km = model_cond(path, mid, t_c, &an);
                if (km < cond_ms_cm) {
                    lo = mid;
                    klo = km;
                } else {
                    hi = mid;
                    khi = km;
                }
            }
            double la = log(path->points[lo].concentration_factor);
            double lb = log(path->points[hi].concentration_factor);
            double f = khi > klo ? (cond_ms_cm - klo) / (khi - klo) : 0.0;
            cf = exp(la + f * (lb - la));
        }
        warn |= HC_WARN_BRINE_MODEL;
        method = HC_METHOD_BRINE_CONDUCTIVITY;
    }
    st = hc_path_state_from_cf(path, cf, t_c, t_ref_c, baume_modulus, out);
    if (st != HC_OK)
        return st;
    if (warn & (HC_WARN_BELOW_FEED | HC_WARN_BEYOND_PATH)) {
        /* The calibration's SG is the operators' own measure: kept. The
         * brine model gives no density past its end: unknown, never the
         * end brine's. */
        double ratio = NAN;
        hc_path_point end;
        double rho_end;
        if (cal != NULL && hc_path_point_at_cf(path, cf, &end, NULL) == HC_OK &&
            hc_brine_density(end.molality, cal->t_ref_c, &rho_end) == HC_OK)
            ratio = cal_sg * hc_water_density_lc(cal->t_ref_c) / rho_end;
        keep_measurement(out, ratio);
    }
    double halite = path->stage_cf[HC_STAGE_HALITE];
    if (isfinite(halite) && cf >= 0.9 * halite)
        warn |= HC_WARN_CONDUCTIVITY_WEAK | HC_WARN_DENSITY_PREFERRED;
    out->warnings |= warn;
    out->method = method;
    return HC_OK;
}
