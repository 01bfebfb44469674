/* Brine mixing by conservation of water and ions, and the transfer planner
 * (see hc_mixing.h). */
#include "hc_mixing.h"

#include <math.h>

/* Error convention: hc_status. */
hc_status hc_amount_from_volume(const double *m, const double *mm, size_t n, double v_m3,
                                double rho, hc_brine_amount *out)
{
    if (m == NULL || mm == NULL || out == NULL || n == 0 || n > HC_MIX_MAX_IONS)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3) || !isfinite(rho))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < 0 || rho <= 0)
        return HC_ERR_NEGATIVE;
    double salt_per_kg_water = 0; /* sum m_i M_i [kg/kg] */
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(m[i]) || !isfinite(mm[i]))
            return HC_ERR_NOT_FINITE;
        if (m[i] < 0 || mm[i] <= 0)
            return HC_ERR_NEGATIVE;
        salt_per_kg_water += m[i] * mm[i];
    }
    out->n_ions = n;
    /* rho v = W (1 + sum m_i M_i) [kg]. */
    out->water_kg = rho * v_m3 / (1 + salt_per_kg_water);
    for (size_t i = 0; i < n; i++)
        out->mol[i] = m[i] * out->water_kg; /* [mol] */
    return HC_OK;
}

hc_status hc_amount_mix(const hc_brine_amount *a, const hc_brine_amount *b, hc_brine_amount *out)
{
    if (a == NULL || b == NULL || out == NULL || a->n_ions != b->n_ions ||
        a->n_ions > HC_MIX_MAX_IONS)
        return HC_ERR_ARGUMENT;
    hc_brine_amount r;
    r.n_ions = a->n_ions;
    r.water_kg = a->water_kg + b->water_kg; /* water is conserved */
    for (size_t i = 0; i < a->n_ions; i++)
        r.mol[i] = a->mol[i] + b->mol[i];   /* so is every ion */
    *out = r;
    return HC_OK;
}

hc_status hc_amount_molality(const hc_brine_amount *a, const double *mm, double *molality,
                             double *mass_kg)
{
    if (a == NULL || mm == NULL || molality == NULL || a->n_ions > HC_MIX_MAX_IONS)
        return HC_ERR_ARGUMENT;
    if (!(a->water_kg > 0))
        return HC_ERR_DOMAIN;
    double salt_kg = 0;
    for (size_t i = 0; i < a->n_ions; i++) {
        molality[i] = a->mol[i] / a->water_kg; /* [mol/kg] */
        salt_kg += a->mol[i] * mm[i];          /* [kg] */
    }
    if (mass_kg != NULL)
        *mass_kg = a->water_kg + salt_kg;
    return HC_OK;
}

static int pond_ok(const hc_plan_pond *p)
{
    return p != NULL && p->shape != NULL && p->molality != NULL && isfinite(p->level_m) &&
           isfinite(p->density_kg_m3) && p->level_m >= 0 && p->density_kg_m3 > 0;
}

/* The destination after receiving v_m3 of the source: molalities, mass and
 * model density. */
static hc_status mix_at(const hc_plan_input *in, const hc_brine_amount *dest, double v_m3,
                        double *molality, double *mass_kg, double *rho)
{
    hc_brine_amount moved, mix;
    hc_status st = hc_amount_from_volume(in->source->molality, in->molar_mass_kg_mol, in->n_ions,
                                         v_m3, in->source->density_kg_m3, &moved);
    if (st == HC_OK)
        st = hc_amount_mix(dest, &moved, &mix);
    if (st == HC_OK)
        st = hc_amount_molality(&mix, in->molar_mass_kg_mol, molality, mass_kg);
    if (st == HC_OK)
        st = in->density(molality, in->n_ions, in->t_c, in->density_ctx, rho);
    return st;
}

hc_status hc_plan_transfer(const hc_plan_input *in, hc_plan_result *out)
{
    if (in == NULL || out == NULL || in->density == NULL || in->molar_mass_kg_mol == NULL ||
        in->n_ions == 0 || in->n_ions > HC_MIX_MAX_IONS || !pond_ok(in->source) ||
        !pond_ok(in->dest))
        return HC_ERR_ARGUMENT;
    if (!isfinite(in->target_density_kg_m3) || !isfinite(in->tolerance_kg_m3) ||
        !isfinite(in->t_c))
        return HC_ERR_NOT_FINITE;
    if (in->target_density_kg_m3 <= 0 || in->tolerance_kg_m3 <= 0)
        return HC_ERR_NEGATIVE;
    out->interlocks = 0;
    /* unknown until found: an unreachable target leaves every figure NaN
     * (JSON null), never 0 (an empty pond) */
    out->volume_m3 = NAN;
    out->mix_density_kg_m3 = NAN;
    out->source_level_after_m = NAN;
    out->dest_level_after_m = NAN;
    out->dest_volume_after_m3 = NAN;
    out->mix_mass_kg = NAN;
    for (size_t i = 0; i < HC_MIX_MAX_IONS; i++)
        out->mix_molality[i] = NAN;

    double vs_m3, vd_m3;
    hc_status st = hc_shape_at_level(in->source->shape, in->source->level_m, &vs_m3, NULL);
    if (st == HC_OK)
        st = hc_shape_at_level(in->dest->shape, in->dest->level_m, &vd_m3, NULL);
    if (st != HC_OK)
        return st;
    hc_brine_amount dest;
    st = hc_amount_from_volume(in->dest->molality, in->molar_mass_kg_mol, in->n_ions, vd_m3,
                               in->dest->density_kg_m3, &dest);
    if (st != HC_OK)
        return st;

    /* Search over the source's share x of the mixed volume, v = x vd / (1 - x),
     * so that the bracket is finite whatever the volumes. */
    double mol[HC_MIX_MAX_IONS], mass, rho0, rho1, target = in->target_density_kg_m3;
    const double x_max = 1 - 1e-6;
    double base = vd_m3 > 1e-9 ? vd_m3 : 1e-9;
    st = mix_at(in, &dest, 0, mol, &mass, &rho0);
    if (st == HC_OK)
        st = mix_at(in, &dest, x_max * base / (1 - x_max), mol, &mass, &rho1);
    if (st != HC_OK)
        return st;
    double dir = rho1 > rho0 ? 1 : -1;
    if ((target - rho0) * dir < -in->tolerance_kg_m3 || (rho1 - target) * dir < -in->tolerance_kg_m3) {
        out->interlocks = HC_PLAN_UNREACHABLE;
        return HC_ERR_DOMAIN;
    }
    double lo = 0, hi = x_max, x = 0, rho = rho0;
    for (int i = 0; i < 200 && fabs(rho - target) > in->tolerance_kg_m3; i++) {
        x = 0.5 * (lo + hi);
        st = mix_at(in, &dest, x * base / (1 - x), mol, &mass, &rho);
        if (st != HC_OK)
            return st;
        if ((rho - target) * dir < 0)
            lo = x;
        else
            hi = x;
    }
    double v = x * base / (1 - x);
    st = mix_at(in, &dest, v, out->mix_molality, &mass, &out->mix_density_kg_m3);
    if (st != HC_OK)
        return st;
    out->volume_m3 = v;
    out->mix_mass_kg = mass;
    /* Volume after mixing from the mix's own density [m3]. */
    out->dest_volume_after_m3 = mass / out->mix_density_kg_m3;

    if (v > vs_m3) {
        out->interlocks |= HC_PLAN_SOURCE_SHORT;
    } else {
        st = hc_shape_level_of_volume(in->source->shape, vs_m3 - v, &out->source_level_after_m);
        if (st != HC_OK)
            return st;
        if (isfinite(in->source->min_level_m) && out->source_level_after_m < in->source->min_level_m)
            out->interlocks |= HC_PLAN_SOURCE_BELOW_MIN;
    }
    st = hc_shape_level_of_volume(in->dest->shape, out->dest_volume_after_m3,
                                  &out->dest_level_after_m);
    if (st == HC_ERR_DOMAIN) {
        out->dest_level_after_m = INFINITY; /* beyond the survey: overflows */
        out->interlocks |= HC_PLAN_DEST_ABOVE_MAX;
    } else if (st != HC_OK) {
        return st;
    } else if (isfinite(in->dest->max_level_m) && out->dest_level_after_m > in->dest->max_level_m) {
        out->interlocks |= HC_PLAN_DEST_ABOVE_MAX;
    }
    if ((isfinite(in->dest->band_low_kg_m3) && out->mix_density_kg_m3 < in->dest->band_low_kg_m3) ||
        (isfinite(in->dest->band_high_kg_m3) && out->mix_density_kg_m3 > in->dest->band_high_kg_m3))
        out->interlocks |= HC_PLAN_DEST_OUT_OF_BAND;
    return HC_OK;
}
