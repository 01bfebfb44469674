/* See hs_brine_eval.h. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_feed.h"
#include "hc_ion.h"
#include "hc_level.h"
#include "hc_seawater.h"
#include "hc_uncertainty.h"
#include "hs_accuracy.h"
#include "hs_brine_eval.h"
#include "hs_log.h"

#define PATH_TEMPERATURE_C 25.0 /* HMW84 is a 25 degC model (Harvie, Moller & Weare 1984) */

/* Stage onsets are tabled every 5 degC over the ponds' range. */
static const double onset_temperatures_c[] = {0, 5, 10, 15, 20, 25, 30, 35, 40, 45};
#define N_ONSET_T (sizeof onset_temperatures_c / sizeof onset_temperatures_c[0])

struct model {
    hc_path *path;
    hc_onset_table onsets;
    int onsets_ok;
    hc_brine_curve curve;
    double *arrays; /* one block for the curve's five columns */
    int curve_ok;
};

struct hs_brine_models {
    size_t n;             /* models[0] is seawater, models[1 + i] is feed i */
    struct model *models;
};

static void feed_from_site(const hs_feed *f, hc_feed_analysis *a)
{
    memset(a, 0, sizeof *a);
    /* hs_feed stores g per kg of feed water in g_kg[] whatever was written */
    a->unit = HC_FEED_G_PER_KG;
    a->conc[HC_ION_NA] = f->g_kg[HS_ION_NA];
    a->conc[HC_ION_K] = f->g_kg[HS_ION_K];
    a->conc[HC_ION_MG] = f->g_kg[HS_ION_MG];
    a->conc[HC_ION_CA] = f->g_kg[HS_ION_CA];
    a->conc[HC_ION_CL] = f->g_kg[HS_ION_CL];
    a->conc[HC_ION_SO4] = f->g_kg[HS_ION_SO4];
    a->conc[HC_ION_HCO3] = f->g_kg[HS_ION_HCO3];
    a->conc[HC_ION_CO3] = f->g_kg[HS_ION_CO3];
    a->br = f->g_kg[HS_ION_BR];
    a->sr = f->g_kg[HS_ION_SR];
    a->density_kg_m3 = NAN;
}

/* The hydrology curve of the path (thermodynamics' own conversion). */
static int build_curve(struct model *m)
{
    size_t n = hc_path_curve_rows(m->path);
    if (n < 2)
        return -1;
    m->arrays = calloc(5 * n, sizeof(double));
    if (m->arrays == NULL)
        return -1;
    double *cf = m->arrays, *rho = cf + n, *dis = rho + n, *dep = dis + n, *aw = dep + n;
    if (hc_path_curve(m->path, n, cf, rho, dis, dep, aw, &m->curve) != HC_OK) {
        hs_log(HSP_LOG_WARNING, "evaporation path: no hydrology curve");
        return -1;
    }
    return 0;
}

static int build_one(struct model *m, const hc_feed *feed, const char *what)
{
    hc_status st = hc_path_build(feed, PATH_TEMPERATURE_C, HC_PATH_FRACTIONAL, &m->path);
    if (st != HC_OK) {
        hs_log(HSP_LOG_ERR, "evaporation path of %s: %s", what, hc_status_text(st));
        return -1;
    }
    if (!hc_path_complete(m->path))
        hs_log(HSP_LOG_WARNING, "evaporation path of %s stops before bischofite; states past "
               "its end are flagged beyond-path", what);
    m->curve_ok = build_curve(m) == 0;
    m->onsets_ok = hc_onset_table_build(feed, onset_temperatures_c, N_ONSET_T,
                                        HC_PATH_FRACTIONAL, NULL, &m->onsets) == HC_OK;
    if (!m->onsets_ok)
        hs_log(HSP_LOG_WARNING, "stage onsets of %s over 0 to 45 degC could not be built; "
               "stages come from the %g degC path", what, PATH_TEMPERATURE_C);
    return 0;
}

int hs_brine_models_build(const hs_site *site, hs_brine_models **out)
{
    hs_brine_models *models = calloc(1, sizeof *models);
    if (models == NULL)
        return -1;
    models->n = 1 + site->n_feeds;
    models->models = calloc(models->n, sizeof *models->models);
    if (models->models == NULL)
        goto fail;
    hc_feed seawater;
    if (hc_feed_seawater(35.0, &seawater) != HC_OK || /* S_P 35 reference seawater */
        build_one(&models->models[0], &seawater, "reference seawater") != 0)
        goto fail;
    for (size_t i = 0; i < site->n_feeds; i++) {
        int used = site->site.feed_index == (int)i;
        for (size_t p = 0; p < site->n_ponds && !used; p++)
            used = site->ponds[p].feed_index == (int)i;
        if (!used)
            continue;
        hc_feed_analysis a;
        hc_feed feed;
        feed_from_site(&site->feeds[i], &a);
        hc_status st = hc_feed_from_analysis(site->feeds[i].name, &a, &feed);
        if (st != HC_OK) {
            hs_log(HSP_LOG_ERR, "%s:%d: [feed %s]: %s", site->path, site->feeds[i].line,
                   site->feeds[i].name, hc_status_text(st));
            goto fail;
        }
        if (fabs(feed.imbalance_percent) > 5)
            hs_log(HSP_LOG_WARNING, "[feed %s]: the analysis is %.1f %% out of charge balance; "
                   "chloride adjusted by %.4f mol/kg", feed.name, feed.imbalance_percent,
                   feed.chloride_adjustment);
        if (build_one(&models->models[1 + i], &feed, site->feeds[i].name) != 0)
            goto fail;
    }
    *out = models;
    return 0;
fail:
    hs_brine_models_free(models);
    return -1;
}

void hs_brine_models_free(hs_brine_models *models)
{
    if (models == NULL)
        return;
    for (size_t i = 0; models->models != NULL && i < models->n; i++) {
        hc_path_free(models->models[i].path);
        free(models->models[i].arrays);
    }
    free(models->models);
    free(models);
}

static const struct model *model_of(const hs_brine_models *models, int feed_index)
{
    size_t i = feed_index < 0 ? 0 : 1 + (size_t)feed_index;
    if (i >= models->n || models->models[i].path == NULL)
        i = 0;
    return &models->models[i];
}

const hc_path *hs_brine_models_path(const hs_brine_models *models, int feed_index)
{
    return model_of(models, feed_index)->path;
}

const hc_brine_curve *hs_brine_models_curve(const hs_brine_models *models, int feed_index)
{
    const struct model *m = model_of(models, feed_index);
    return m->curve_ok ? &m->curve : NULL;
}

const hc_onset_table *hs_brine_models_onsets(const hs_brine_models *models, int feed_index)
{
    const struct model *m = model_of(models, feed_index);
    return m->onsets_ok ? &m->onsets : NULL;
}

/* ---- one pond ---- */

static const hs_reading *reading_of(const hs_site *site, size_t pond, hs_quantity q,
                                    const hs_reading *readings)
{
    const hs_signal *s = hs_site_signal(site, (int)pond, q);
    if (s == NULL)
        return NULL;
    return &readings[s - site->signals];
}

static int usable(const hs_reading *r)
{
    return r != NULL && r->have && isfinite(r->value) &&
           (r->quality == HS_QUALITY_GOOD || r->quality == HS_QUALITY_UNCERTAIN);
}

static void take(hs_pond_view *v, const hs_reading *r, int64_t now_ms)
{
    if (r->quality > v->quality)
        v->quality = r->quality;
    if (r->t_ms > v->t_ms)
        v->t_ms = r->t_ms;
    double age = (double)(now_ms - r->t_ms) / 1000.0;
    if (age > v->oldest_input_age_s || isnan(v->oldest_input_age_s))
        v->oldest_input_age_s = age;
}

/* Stage, next stage, saturation and water activity from the path at the
 * state's concentration factor, for a state computed by the seawater calc. */
static void enrich_from_path(const hc_path *path, hc_brine_state *s)
{
    hc_brine_state p;
    if (!isfinite(s->concentration_factor) ||
        hc_path_state_from_cf(path, s->concentration_factor, s->temperature_c,
                              s->reference_temperature_c, s->baume_modulus, &p) != HC_OK)
        return;
    s->stage = p.stage;
    s->next_stage = p.next_stage;
    s->next_stage_density_kg_m3 = p.next_stage_density_kg_m3;
    s->next_stage_density_ref_kg_m3 = p.next_stage_density_ref_kg_m3;
    memcpy(s->saturation_index, p.saturation_index, sizeof s->saturation_index);
    s->water_activity = p.water_activity;
}

/* Density source 1 (densitometer or hydrostatic pair). Without a path only
 * the seawater range of EOS-80 is known. */
static int state_from_density(const hs_site *site, const hc_path *path, double rho, double t_c,
                              hc_method method, hc_brine_state *s)
{
    hc_status st;
    if (path != NULL) {
        st = hc_path_state_from_density(path, rho, t_c, site->site.reference_temperature_c,
                                        site->site.baume_modulus, s);
    } else {
        hc_seawater_options opt;
        hc_seawater_options_default(&opt);
        opt.reference_temperature_c = site->site.reference_temperature_c;
        opt.baume_modulus = site->site.baume_modulus;
        st = hc_seawater_state_from_density(rho, t_c, 0.0, &opt, s);
    }
    if (st != HC_OK)
        return -1;
    s->method = method;
    return 0;
}

/* A density signal reading below the feed water (by more than this) or past
 * the end of the evaporation path (by more than the next) is a dead or
 * drifting sensor, never the
 * brine: a dead 4-20 mA loop reads 0, a densitometer in air or fresh water
 * reads ~1000. The margin allows the instrument's tolerance and a
 * rain-freshened surface over the intake (common practice, no source). */
#define BELOW_FEED_MARGIN_KG_M3 3.0
/* Past the end of the path the model itself is least sure (Pitzer at the
 * highest ionic strengths) and a real bittern may be a little denser: a
 * reading is set aside only when clearly beyond it (common practice, no
 * source); closer, it is kept as the measurement it is. */
#define BEYOND_PATH_MARGIN_KG_M3 20.0

/* 1 when the density source that gave s (from rho [kg/m3] at t_c [degC]) may
 * be used; else 0 with the reason's warning bit added to *rejected. */
static int density_signal_used(const hs_site *site, const hc_path *path, double rho, double t_c,
                               const hc_brine_state *s, unsigned *rejected)
{
    const hc_path_point *first = path != NULL ? hc_path_step(path, 0) : NULL;
    if (first == NULL)
        return 1; /* seawater only: no feed and no path to compare with */
    size_t n = hc_path_step_count(path);
    const hc_path_point *last = n > 0 ? hc_path_step(path, n - 1) : NULL;
    if ((s->warnings & HC_WARN_BEYOND_PATH) && last != NULL) {
        hc_brine_state end;
        if (hc_path_state_from_cf(path, last->concentration_factor, t_c,
                                  site->site.reference_temperature_c, site->site.baume_modulus,
                                  &end) != HC_OK ||
            !(rho <= end.density_kg_m3 + BEYOND_PATH_MARGIN_KG_M3)) {
            *rejected |= HC_WARN_DENSITY_SIGNAL_BEYOND_PATH;
            return 0;
        }
    }
    if (s->warnings & HC_WARN_BELOW_FEED) {
        hc_brine_state feed;
        if (hc_path_state_from_cf(path, first->concentration_factor, t_c,
                                  site->site.reference_temperature_c, site->site.baume_modulus,
                                  &feed) != HC_OK ||
            !(rho >= feed.density_kg_m3 - BELOW_FEED_MARGIN_KG_M3)) {
            *rejected |= HC_WARN_DENSITY_SIGNAL_BELOW_FEED;
            return 0;
        }
    }
    return 1;
}

/* Density source 2: PSS-78 inside its range; beyond it the site calibration
 * (cal, may be NULL) or the path's brine conductivity model, both flagged
 * by hc_path. Returns 0, or -1 with a reason in note. */
static int state_from_conductivity(const hs_site *site, const hc_path *path,
                                   const hc_calibration *cal, double c, double t_c,
                                   hc_brine_state *s, char *note, size_t note_len)
{
    hc_seawater_options opt;
    hc_seawater_options_default(&opt);
    opt.reference_temperature_c = site->site.reference_temperature_c;
    opt.baume_modulus = site->site.baume_modulus;
    hc_status st = hc_seawater_state_from_conductivity(c, t_c, 0.0, &opt, s);
    if (st == HC_OK) {
        if (path != NULL)
            enrich_from_path(path, s);
        return 0;
    }
    if (path == NULL) {
        snprintf(note, note_len, "conductivity %.1f mS/cm at %.1f degC: %s", c, t_c,
                 st == HC_ERR_SALINITY_RANGE
                     ? "beyond PSS-78 (S_P 42), and no evaporation path of the feed"
                     : hc_status_text(st));
        return -1;
    }
    st = hc_path_state_from_conductivity(path, c, t_c, site->site.reference_temperature_c,
                                         site->site.baume_modulus, cal, s);
    if (st != HC_OK && cal != NULL) /* the calibration refuses: the model still may answer */
        st = hc_path_state_from_conductivity(path, c, t_c, site->site.reference_temperature_c,
                                             site->site.baume_modulus, NULL, s);
    if (st != HC_OK) {
        snprintf(note, note_len, "conductivity %.1f mS/cm at %.1f degC gives no brine state: %s",
                 c, t_c, hc_status_text(st));
        return -1;
    }
    return 0;
}

/* Density source 3: an operator's hydrometer reading, SG at t_ref/t_ref.
 * rho(t_ref) = SG rho_w(t_ref) (heavy-liquid SG; rho_w by Laliberte &
 * Cooper 2004 eq. 8, as hc_path uses), then the path brine of that density
 * evaluated at the pond's temperature. */
static int state_from_manual(const hs_site *site, const hc_path *path, const hs_pond_aids *a,
                             double t_c, hc_brine_state *s)
{
    double cf;
    unsigned warn = 0;
    double rho_ref = a->manual_sg * hc_water_density_lc(a->manual_t_ref_c);
    if (path == NULL ||
        hc_path_cf_at_density(path, rho_ref, a->manual_t_ref_c, &cf, &warn) != HC_OK ||
        hc_path_state_from_cf(path, cf, t_c, site->site.reference_temperature_c,
                              site->site.baume_modulus, s) != HC_OK)
        return -1;
    s->method = HC_METHOD_MANUAL;
    s->warnings |= warn;
    return 0;
}

static int manual_usable(const hs_pond_aids *a, int64_t now_ms)
{
    return a != NULL && isfinite(a->manual_sg) && isfinite(a->manual_t_ref_c) &&
           a->manual_max_age_ms > 0 && a->manual_t_ms <= now_ms + 60000 &&
           now_ms - a->manual_t_ms <= a->manual_max_age_ms;
}

hc_stage hs_stage_at_density_ref(const hs_brine_models *models, int feed_index,
                                 double rho_ref_kg_m3, double t_ref_c)
{
    double cf;
    if (models == NULL || !isfinite(rho_ref_kg_m3))
        return HC_STAGE_NONE;
    /* onsets at the reference temperature itself, judged by density */
    const hc_onset_table *onsets = hs_brine_models_onsets(models, feed_index);
    if (onsets != NULL)
        return hc_onset_table_stage_ref(onsets, rho_ref_kg_m3, t_ref_c);
    const hc_path *path = hs_brine_models_path(models, feed_index);
    if (path == NULL || hc_path_cf_at_density(path, rho_ref_kg_m3, t_ref_c, &cf, NULL) != HC_OK)
        return HC_STAGE_NONE;
    return hc_path_stage_at_cf(path, cf, NULL);
}

void hs_pond_aids_clear(hs_pond_aids *aids)
{
    memset(aids, 0, sizeof *aids);
    aids->calibration = NULL;
    aids->manual_sg = NAN;
    aids->manual_t_ref_c = NAN;
}

static void depth_of(const hs_site *site, size_t pond, const hs_reading *readings, double g,
                     hs_pond_view *v)
{
    const hs_pond *p = &site->ponds[pond];
    const hs_reading *lp = reading_of(site, pond, HS_Q_LEVEL_PRESSURE, readings);
    const hs_reading *ld = reading_of(site, pond, HS_Q_LEVEL_DISTANCE, readings);
    v->depth_m = NAN;
    v->depth_quality = HS_QUALITY_BAD;
    if (usable(lp)) {
        /* the pond's own brine, not water: a 1.25 brine read as water
         * overstates depth by 25 % (hydrostatics) */
        double rho = v->have_state ? v->state.density_kg_m3 : NAN;
        hs_quality q = lp->quality;
        if (!isfinite(rho)) {
            rho = 1000.0; /* no brine density: read as water, and say so */
            if (q < HS_QUALITY_UNCERTAIN)
                q = HS_QUALITY_UNCERTAIN;
        } else if (v->quality > q) {
            q = v->quality;
        }
        if (hc_depth_from_pressure(lp->value, rho, g, p->pressure_height_m, &v->depth_m) == HC_OK)
            v->depth_quality = q;
        else
            v->depth_m = NAN;
    } else if (usable(ld)) {
        if (hc_depth_from_distance(ld->value, p->distance_height_m, &v->depth_m) == HC_OK)
            v->depth_quality = ld->quality;
        else
            v->depth_m = NAN;
    } else if (lp != NULL || ld != NULL) {
        const hs_reading *r = lp != NULL ? lp : ld;
        v->depth_quality = r->have ? r->quality : HS_QUALITY_BAD;
    }
}

/* ---- uncertainty: the chosen source as a function of its inputs ---- */

typedef enum { SRC_DENSITY, SRC_HYDROSTATIC, SRC_CONDUCTIVITY, SRC_MANUAL } source_kind;

/* Inputs x[] per source (hc_unc_propagate perturbs each by its u):
 *   density       rho [kg/m3], t [degC]
 *   hydrostatic   p_lower [Pa], p_upper [Pa], dz [m], t [degC]
 *   conductivity  kappa [mS/cm], t [degC], brine model offset [1],
 *                 calibration SG offset [1]
 *   manual        SG [1], t [degC] */
struct source_method {
    source_kind kind;
    hc_method method;
    const hs_site *site;
    const hc_path *path;
    const hc_calibration *cal;
    const hs_pond_aids *aids;
    double g_m_s2;
};

static hc_status source_state(const double *x, const void *ctx, double *y)
{
    const struct source_method *m = ctx;
    hc_brine_state s;
    hc_state_clear(&s);
    int rc = -1;
    switch (m->kind) {
    case SRC_DENSITY:
        rc = state_from_density(m->site, m->path, x[0], x[1], m->method, &s);
        break;
    case SRC_HYDROSTATIC: {
        double rho;
        rc = hc_density_from_pressure_pair(x[0], x[1], x[2], m->g_m_s2, &rho) == HC_OK
                 ? state_from_density(m->site, m->path, rho, x[3], m->method, &s)
                 : -1;
        break;
    }
    case SRC_CONDUCTIVITY: {
        char note[8];
        double kappa = x[0] * (1.0 + x[2]);
        if (m->cal != NULL && x[3] != 0.0) {
            hc_calibration shifted = *m->cal; /* the fit moved by its residual */
            for (size_t k = 0; k < shifted.knots; k++)
                shifted.sg[k] += x[3];
            rc = state_from_conductivity(m->site, m->path, &shifted, kappa, x[1], &s, note,
                                         sizeof note);
        } else {
            rc = state_from_conductivity(m->site, m->path, m->cal, kappa, x[1], &s, note,
                                         sizeof note);
        }
        break;
    }
    case SRC_MANUAL: {
        hs_pond_aids a = *m->aids;
        a.manual_sg = x[0];
        rc = state_from_manual(m->site, m->path, &a, x[1], &s);
        break;
    }
    }
    if (rc != 0)
        return HC_ERR_DOMAIN;
    hc_unc_outputs(&s, y);
    return HC_OK;
}

/* Fills the state's uncertainty fields through the method that made it. */
static void add_uncertainty(const struct source_method *m, const double *x, const double *u,
                            size_t n, hc_brine_state *s)
{
    double u_y[HC_UNC_OUTPUTS];
    if (hc_unc_propagate(source_state, m, x, u, n, u_y) == HC_OK)
        hc_unc_store(u_y, s);
}

static double u_signal(const hs_site *site, size_t pond, hs_quantity q, double value)
{
    const hs_signal *sig = hs_site_signal(site, (int)pond, q);
    return sig != NULL ? hc_unc_from_accuracy(hs_signal_accuracy(sig, value)) : 0.0;
}

static void uncertainty_of(const hs_site *site, size_t pond, const struct source_method *m,
                           const hs_reading *temp, const hs_reading *dens,
                           const hs_reading *lower, const hs_reading *upper,
                           const hs_reading *cond, hc_brine_state *s)
{
    double t = temp->value;
    double u_t = u_signal(site, pond, HS_Q_TEMPERATURE, t);
    switch (m->kind) {
    case SRC_DENSITY: {
        double x[2] = {dens->value, t};
        double u[2] = {u_signal(site, pond, HS_Q_DENSITY, dens->value), u_t};
        add_uncertainty(m, x, u, 2, s);
        break;
    }
    case SRC_HYDROSTATIC: {
        double x[4] = {lower->value, upper->value, site->ponds[pond].pressure_spacing_m, t};
        double u[4] = {u_signal(site, pond, HS_Q_LEVEL_PRESSURE, lower->value),
                       u_signal(site, pond, HS_Q_PRESSURE_UPPER, upper->value),
                       hc_unc_from_accuracy(HS_SPACING_ACCURACY_M), u_t};
        add_uncertainty(m, x, u, 4, s);
        break;
    }
    case SRC_CONDUCTIVITY: {
        double x[4] = {cond->value, t, 0.0, 0.0};
        double u[4] = {u_signal(site, pond, HS_Q_CONDUCTIVITY, cond->value), u_t,
                       s->method == HC_METHOD_BRINE_CONDUCTIVITY ? HC_UNC_BRINE_MODEL_REL : 0.0,
                       s->method == HC_METHOD_SITE_CALIBRATION && m->cal != NULL
                           ? m->cal->rms_residual
                           : 0.0};
        add_uncertainty(m, x, u, 4, s);
        break;
    }
    case SRC_MANUAL: {
        double x[2] = {m->aids->manual_sg, t};
        double u[2] = {hc_unc_from_resolution(HS_HYDROMETER_RESOLUTION_SG), u_t};
        add_uncertainty(m, x, u, 2, s);
        break;
    }
    }
}

void hs_pond_evaluate(const hs_site *site, size_t pond, const hs_reading *readings,
                      const hs_brine_models *models, const hs_pond_aids *aids, double g_m_s2,
                      int64_t now_ms, hs_pond_view *v)
{
    memset(v, 0, sizeof *v);
    hc_state_clear(&v->state);
    v->quality = HS_QUALITY_GOOD;
    v->oldest_input_age_s = NAN;
    const hs_pond *p = &site->ponds[pond];
    const hc_path *path = models != NULL ? hs_brine_models_path(models, p->feed_index) : NULL;
    const hc_calibration *cal = aids != NULL ? aids->calibration : NULL;
    int manual_ok = manual_usable(aids, now_ms) && path != NULL;
    const hs_reading *temp = reading_of(site, pond, HS_Q_TEMPERATURE, readings);
    const hs_reading *dens = reading_of(site, pond, HS_Q_DENSITY, readings);
    const hs_reading *lower = reading_of(site, pond, HS_Q_LEVEL_PRESSURE, readings);
    const hs_reading *upper = reading_of(site, pond, HS_Q_PRESSURE_UPPER, readings);
    const hs_reading *cond = reading_of(site, pond, HS_Q_CONDUCTIVITY, readings);
    unsigned rejected = 0; /* HC_WARN_DENSITY_SIGNAL_*: why a density signal was not used */

    if (!usable(temp)) {
        snprintf(v->note, sizeof v->note, "no usable temperature");
        goto no_state;
    }
    take(v, temp, now_ms);
    double t_c = temp->value;
    struct source_method m = {.site = site, .path = path, .cal = cal, .aids = aids,
                              .g_m_s2 = g_m_s2};
    /* Density signals below the feed or past the path are set aside (their
     * warning says so) and the next source is tried. */
    if (dens != NULL && !usable(dens))
        rejected |= HC_WARN_DENSITY_SIGNAL_BAD;
    double rho_pair = NAN;
    int pair_ok = usable(lower) && usable(upper) && isfinite(p->pressure_spacing_m);
    if (pair_ok &&
        hc_density_from_pressure_pair(lower->value, upper->value, p->pressure_spacing_m, g_m_s2,
                                      &rho_pair) != HC_OK)
        rho_pair = NAN;
    if (usable(dens) && state_from_density(site, path, dens->value, t_c,
                                           HC_METHOD_DENSITOMETER, &v->state) == 0 &&
        density_signal_used(site, path, dens->value, t_c, &v->state, &rejected)) {
        take(v, dens, now_ms);
        m.kind = SRC_DENSITY;
        m.method = HC_METHOD_DENSITOMETER;
    } else if (isfinite(rho_pair) &&
               state_from_density(site, path, rho_pair, t_c, HC_METHOD_HYDROSTATIC,
                                  &v->state) == 0 &&
               density_signal_used(site, path, rho_pair, t_c, &v->state, &rejected)) {
        take(v, lower, now_ms);
        take(v, upper, now_ms);
        m.kind = SRC_HYDROSTATIC;
        m.method = HC_METHOD_HYDROSTATIC;
    } else if (usable(cond) && state_from_conductivity(site, path, cal, cond->value, t_c,
                                                       &v->state, v->note, sizeof v->note) == 0) {
        /* Conductivity says little near and past halite saturation
         * (CRC Handbook: NaCl and MgCl2 conductivity flatten and fall): a recent hydrometer reading knows better. */
        hc_brine_state man;
        if ((v->state.warnings & HC_WARN_CONDUCTIVITY_WEAK) && manual_ok &&
            state_from_manual(site, path, aids, t_c, &man) == 0) {
            man.warnings |= HC_WARN_CONDUCTIVITY_WEAK;
            v->state = man;
            m.kind = SRC_MANUAL;
        } else {
            take(v, cond, now_ms);
            m.kind = SRC_CONDUCTIVITY;
        }
    } else if (manual_ok && state_from_manual(site, path, aids, t_c, &v->state) == 0) {
        v->note[0] = '\0';
        m.kind = SRC_MANUAL;
    } else {
        if (v->note[0] == '\0')
            snprintf(v->note, sizeof v->note, "%s",
                     pair_ok && !rejected ? "hydrostatic density out of range"
                                          : "no usable density or conductivity");
        goto no_state;
    }
    v->state.warnings |= rejected;
    m.method = v->state.method;
    uncertainty_of(site, pond, &m, temp, dens, lower, upper, cond, &v->state);
    v->have_state = 1;
    /* stage and next stage at the pond's own temperature */
    const hc_onset_table *onsets = models != NULL ? hs_brine_models_onsets(models, p->feed_index)
                                                  : NULL;
    if (onsets != NULL)
        hc_onset_table_restage(onsets, &v->state);
    depth_of(site, pond, readings, g_m_s2, v);
    return;
no_state:
    hc_state_clear(&v->state);
    /* what is known still shows (commissioning reads it from --once) */
    v->state.temperature_c = usable(temp) ? temp->value : NAN;
    v->state.reference_temperature_c = site->site.reference_temperature_c;
    v->state.baume_modulus = site->site.baume_modulus;
    v->state.warnings |= rejected;
    if (rejected && v->note[0] == '\0')
        snprintf(v->note, sizeof v->note, "density signal not used and no other source");
    v->quality = HS_QUALITY_BAD;
    depth_of(site, pond, readings, g_m_s2, v);
}
