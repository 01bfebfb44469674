/* Stage onsets over temperature (see hc_onset_table.h). */
#include <math.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_onset_table.h"

static void keep_onsets(const hc_path *path, hc_onset_table *out)
{
    size_t i = out->n++;
    out->t_c[i] = hc_path_temperature(path);
    for (int s = 0; s < HC_STAGE_COUNT; s++) {
        hc_path_point q;
        out->stage_cf[i][s] = hc_path_stage_cf(path, (hc_stage)s);
        if (!isfinite(out->stage_cf[i][s]) ||
            hc_path_point_at_cf(path, out->stage_cf[i][s], &q, NULL) != HC_OK) {
            out->stage_cf[i][s] = NAN;
            continue;
        }
        memcpy(out->molality[i][s], q.molality, sizeof q.molality);
    }
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_onset_table_build(const hc_feed *feed, const double *t_c, size_t n,
                               hc_path_mode mode, const hc_path_options *options,
                               hc_onset_table *out)
{
    if (feed == NULL || t_c == NULL || out == NULL || n == 0 || n > HC_ONSET_TABLE_MAX)
        return HC_ERR_ARGUMENT;
    for (size_t i = 1; i < n; i++)
        if (!(t_c[i] > t_c[i - 1]))
            return HC_ERR_ARGUMENT;
    hc_onset_table t;
    memset(&t, 0, sizeof t);
    for (size_t i = 0; i < n; i++) {
        hc_path *path = NULL;
        if (hc_path_build_ex(feed, t_c[i], mode, options, &path) != HC_OK)
            continue;
        keep_onsets(path, &t);
        hc_path_free(path);
    }
    if (t.n == 0)
        return HC_ERR_NO_CONVERGENCE;
    *out = t;
    return HC_OK;
}

/* Returns HC_OK or HC_ERR_ARGUMENT. */
hc_status hc_onset_table_from_paths(const hc_path *const *paths, size_t n, hc_onset_table *out)
{
    if (paths == NULL || out == NULL || n == 0 || n > HC_ONSET_TABLE_MAX)
        return HC_ERR_ARGUMENT;
    for (size_t i = 1; i < n; i++)
        if (!(hc_path_temperature(paths[i]) > hc_path_temperature(paths[i - 1])))
            return HC_ERR_ARGUMENT;
    memset(out, 0, sizeof *out);
    for (size_t i = 0; i < n; i++)
        keep_onsets(paths[i], out);
    return HC_OK;
}

/* The table row lo and weight f of row lo + 1 at t_c (f = 0 outside). */
static void bracket(const hc_onset_table *table, double t_c, size_t *lo, double *f)
{
    size_t n = table->n;
    *lo = 0;
    *f = 0.0;
    if (n == 1 || !(t_c > table->t_c[0]))
        return;
    if (t_c >= table->t_c[n - 1]) {
        *lo = n - 1;
        return;
    }
    while (*lo + 2 < n && table->t_c[*lo + 1] <= t_c)
        (*lo)++;
    /* linear interpolation in temperature [1] */
    *f = (t_c - table->t_c[*lo]) / (table->t_c[*lo + 1] - table->t_c[*lo]);
}

void hc_onset_table_at(const hc_onset_table *table, double t_c, double stage_cf[HC_STAGE_COUNT])
{
    size_t lo;
    double f;
    bracket(table, t_c, &lo, &f);
    if (f == 0.0) {
        memcpy(stage_cf, table->stage_cf[lo], sizeof table->stage_cf[0]);
        return;
    }
    for (int s = 0; s < HC_STAGE_COUNT; s++) {
        double a = table->stage_cf[lo][s], b = table->stage_cf[lo + 1][s];
        if (isfinite(a) && isfinite(b))
            stage_cf[s] = a + f * (b - a);
        else
            stage_cf[s] = f < 0.5 ? a : b; /* reached at one neighbour: the nearer decides */
    }
}

static hc_stage stage_of(const double stage_cf[HC_STAGE_COUNT], double cf, hc_stage *next)
{
    hc_stage cur = HC_STAGE_SEAWATER, nx = HC_STAGE_NONE;
    for (int s = 0; s < HC_STAGE_COUNT; s++)
        if (isfinite(stage_cf[s]) && stage_cf[s] <= cf)
            cur = (hc_stage)s;
    for (int s = cur + 1; s < HC_STAGE_COUNT; s++)
        if (isfinite(stage_cf[s]) && stage_cf[s] > cf) {
            nx = (hc_stage)s;
            break;
        }
    if (next != NULL)
        *next = nx;
    return cur;
}

hc_stage hc_onset_table_stage(const hc_onset_table *table, double cf, double t_c, hc_stage *next)
{
    double at[HC_STAGE_COUNT];
    hc_onset_table_at(table, t_c, at);
    return stage_of(at, cf, next);
}

/* Returns HC_OK or HC_ERR_ARGUMENT. */
hc_status hc_onset_table_brine(const hc_onset_table *table, hc_stage stage, double t_c,
                               double molality[HC_ION_COUNT])
{
    if ((int)stage < 0 || stage >= HC_STAGE_COUNT || !isfinite(t_c))
        return HC_ERR_ARGUMENT;
    size_t lo;
    double f;
    bracket(table, t_c, &lo, &f);
    size_t hi = f > 0.0 ? lo + 1 : lo;
    int a = isfinite(table->stage_cf[lo][stage]), b = isfinite(table->stage_cf[hi][stage]);
    if (!a && !b)
        return HC_ERR_ARGUMENT;
    if (!a || !b) { /* reached at one neighbour: the nearer decides, as for the CF */
        size_t k = f < 0.5 ? lo : hi;
        if (!isfinite(table->stage_cf[k][stage]))
            return HC_ERR_ARGUMENT;
        memcpy(molality, table->molality[k][stage], sizeof table->molality[k][stage]);
        return HC_OK;
    }
    for (int i = 0; i < HC_ION_COUNT; i++) /* linear in temperature [mol/kg] */
        molality[i] = table->molality[lo][stage][i] +
                      f * (table->molality[hi][stage][i] - table->molality[lo][stage][i]);
    return HC_OK;
}

void hc_onset_table_restage(const hc_onset_table *table, hc_brine_state *state)
{
    double cf = state->concentration_factor, t = state->temperature_c;
    if (!isfinite(cf) || !isfinite(t))
        return;
    state->stage = hc_onset_table_stage(table, cf, t, &state->next_stage);
    state->next_stage_density_kg_m3 = NAN;
    state->next_stage_density_ref_kg_m3 = NAN;
    double m[HC_ION_COUNT];
    if (state->next_stage == HC_STAGE_NONE ||
        hc_onset_table_brine(table, state->next_stage, t, m) != HC_OK)
        return;
    if (hc_brine_density(m, t, &state->next_stage_density_kg_m3) != HC_OK)
        state->next_stage_density_kg_m3 = NAN;
    if (!isfinite(state->reference_temperature_c) ||
        hc_brine_density(m, state->reference_temperature_c,
                         &state->next_stage_density_ref_kg_m3) != HC_OK)
        state->next_stage_density_ref_kg_m3 = NAN;
}

hc_stage hc_onset_table_stage_ref(const hc_onset_table *table, double rho_ref_kg_m3,
                                  double t_ref_c)
{
    if (!isfinite(rho_ref_kg_m3) || !isfinite(t_ref_c))
        return HC_STAGE_NONE;
    hc_stage cur = HC_STAGE_SEAWATER;
    for (int s = HC_STAGE_SEAWATER + 1; s < HC_STAGE_COUNT; s++) {
        double m[HC_ION_COUNT], rho;
        if (hc_onset_table_brine(table, (hc_stage)s, t_ref_c, m) != HC_OK ||
            hc_brine_density(m, t_ref_c, &rho) != HC_OK)
            continue;
        if (rho <= rho_ref_kg_m3)
            cur = (hc_stage)s;
    }
    return cur;
}
