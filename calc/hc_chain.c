/* A pond of a chain as water, ion and tracer accounts (see hc_chain.h). */
#include "hc_chain.h"

#include <math.h>
#include <string.h>

hc_status hc_chain_brine_check(const hc_chain_brine *b)
{
    if (b == NULL || b->n < 2 || b->cf == NULL || b->density_kg_m3 == NULL ||
        b->density_ref_kg_m3 == NULL || b->water_activity == NULL || b->molality == NULL ||
        b->molar_mass_kg_mol == NULL || b->n_ions == 0 || b->n_ions > HC_MIX_MAX_IONS)
        return HC_ERR_ARGUMENT;
    for (size_t i = 0; i < b->n; i++) {
        if (!isfinite(b->cf[i]) || !isfinite(b->density_kg_m3[i]) ||
            !isfinite(b->density_ref_kg_m3[i]) || !isfinite(b->water_activity[i]))
            return HC_ERR_NOT_FINITE;
        if (b->cf[i] < 1 || (i > 0 && !(b->cf[i] > b->cf[i - 1])))
            return HC_ERR_ARGUMENT;
        for (size_t k = 0; k < b->n_ions; k++)
            if (!(b->molality[i * b->n_ions + k] >= 0))
                return HC_ERR_NEGATIVE;
    }
    return HC_OK;
}

hc_stage hc_chain_stage_at(const hc_chain_brine *b, double cf)
{
    hc_stage s = HC_STAGE_SEAWATER;
    for (int k = HC_STAGE_SEAWATER + 1; k < HC_STAGE_COUNT; k++)
        if (isfinite(b->stage_cf[k]) && cf >= b->stage_cf[k])
            s = (hc_stage)k;
    return s;
}

/* Row below cf and the fraction towards the next, linear in ln CF (the
 * path is sampled geometrically in CF). */
static void locate(const hc_chain_brine *b, double cf, size_t *lo, double *frac)
{
    if (cf <= b->cf[0]) {
        *lo = 0;
        *frac = 0;
        return;
    }
    if (cf >= b->cf[b->n - 1]) {
        *lo = b->n - 2;
        *frac = 1;
        return;
    }
    size_t a = 0, z = b->n - 1;
    while (z - a > 1) {
        size_t m = a + (z - a) / 2;
        if (b->cf[m] <= cf)
            a = m;
        else
            z = m;
    }
    *lo = a;
    *frac = log(cf / b->cf[a]) / log(b->cf[a + 1] / b->cf[a]);
}

static double lerp(const double *v, size_t lo, double f)
{
    return v[lo] + f * (v[lo + 1] - v[lo]);
}

hc_status hc_chain_point_at(const hc_chain_brine *b, double cf, hc_chain_point *out)
{
    if (b == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(cf))
        return HC_ERR_NOT_FINITE;
    size_t lo;
    double f;
    locate(b, cf, &lo, &f);
    out->cf = cf;
    out->density_kg_m3 = lerp(b->density_kg_m3, lo, f);
    out->density_ref_kg_m3 = lerp(b->density_ref_kg_m3, lo, f);
    out->water_activity = lerp(b->water_activity, lo, f);
    out->si_halite = b->si_halite != NULL ? lerp(b->si_halite, lo, f) : NAN;
    out->si_gypsum = b->si_gypsum != NULL ? lerp(b->si_gypsum, lo, f) : NAN;
    for (size_t k = 0; k < b->n_ions; k++) {
        double m0 = b->molality[lo * b->n_ions + k], m1 = b->molality[(lo + 1) * b->n_ions + k];
        out->molality[k] = m0 + f * (m1 - m0);
    }
    out->stage = hc_chain_stage_at(b, cf);
    return HC_OK;
}

/* The first CF whose reference density reaches rho (clamped to the ends). */
static double cf_at_density_ref(const hc_chain_brine *b, double rho)
{
    if (rho <= b->density_ref_kg_m3[0])
        return b->cf[0];
    for (size_t i = 0; i + 1 < b->n; i++) {
        double r0 = b->density_ref_kg_m3[i], r1 = b->density_ref_kg_m3[i + 1];
        if (rho <= r1 && r1 > r0) {
            double f = (rho - r0) / (r1 - r0);
            return b->cf[i] * exp(f * log(b->cf[i + 1] / b->cf[i]));
        }
    }
    return b->cf[b->n - 1];
}

/* Salt carried per kg of water by molalities m: sum m_i M_i [kg/kg]. */
static double salt_per_kg_water(const hc_chain_brine *b, const double *m)
{
    double s = 0;
    for (size_t k = 0; k < b->n_ions; k++)
        s += m[k] * b->molar_mass_kg_mol[k];
    return s;
}

/* A parcel of volume v of the path brine at cf. */
static hc_status parcel_at(const hc_chain_brine *b, double v_m3, double cf, hc_chain_parcel *out)
{
    hc_chain_point pt;
    hc_status st = hc_chain_point_at(b, cf, &pt);
    if (st != HC_OK)
        return st;
    memset(out, 0, sizeof *out);
    /* rho v = W (1 + sum m_i M_i) [kg] (hc_amount_from_volume). */
    out->water_kg = pt.density_kg_m3 * v_m3 / (1 + salt_per_kg_water(b, pt.molality));
    out->feed_water_kg = cf * out->water_kg;
    for (size_t k = 0; k < b->n_ions; k++)
        out->dissolved_mol[k] = pt.molality[k] * out->water_kg;
    return HC_OK;
}

hc_status hc_chain_pond_fill(const hc_chain_brine *b, double v_m3, double rho_ref, hc_chain_pond *out)
{
    if (b == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3) || !isfinite(rho_ref))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < 0 || !(rho_ref > 0))
        return HC_ERR_NEGATIVE;
    hc_chain_parcel p;
    hc_status st = parcel_at(b, v_m3, cf_at_density_ref(b, rho_ref), &p);
    if (st != HC_OK)
        return st;
    memset(out, 0, sizeof *out);
    hc_chain_add(out, &p);
    return HC_OK;
}

hc_status hc_chain_feed_parcel(const hc_chain_brine *b, double v_m3, hc_chain_parcel *out)
{
    if (b == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < 0)
        return HC_ERR_NEGATIVE;
    return parcel_at(b, v_m3, b->cf[0], out);
}

static hc_status view_of(const hc_chain_brine *b, double water, double feed, const double *mol,
                         hc_chain_view *out)
{
    if (!(water > 0)) {
        memset(out, 0, sizeof *out);
        out->cf = NAN;
        return HC_ERR_DOMAIN;
    }
    out->cf = feed / water;
    hc_status st = hc_chain_point_at(b, out->cf, &out->point);
    if (st != HC_OK)
        return st;
    double salt = 0;
    for (size_t k = 0; k < b->n_ions; k++)
        salt += mol[k] * b->molar_mass_kg_mol[k];
    out->mass_kg = water + salt;
    out->volume_m3 = out->mass_kg / out->point.density_kg_m3;
    return HC_OK;
}

hc_status hc_chain_view_of(const hc_chain_brine *b, const hc_chain_pond *p, hc_chain_view *out)
{
    if (b == NULL || p == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (p->water_kg == 0 && p->feed_water_kg == 0) { /* an empty pond */
        memset(out, 0, sizeof *out);
        out->cf = NAN;
        out->point.cf = NAN;
        out->point.density_kg_m3 = out->point.density_ref_kg_m3 = NAN;
        out->point.water_activity = out->point.si_halite = out->point.si_gypsum = NAN;
        out->point.stage = HC_STAGE_NONE;
        return HC_OK;
    }
    return view_of(b, p->water_kg, p->feed_water_kg, p->dissolved_mol, out);
}

hc_status hc_chain_view_with(const hc_chain_brine *b, const hc_chain_pond *p,
                             const hc_chain_parcel *add, hc_chain_view *out)
{
    if (b == NULL || p == NULL || add == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    double mol[HC_MIX_MAX_IONS];
    for (size_t k = 0; k < b->n_ions; k++)
        mol[k] = p->dissolved_mol[k] + add->dissolved_mol[k];
    return view_of(b, p->water_kg + add->water_kg, p->feed_water_kg + add->feed_water_kg, mol, out);
}

hc_status hc_chain_take(const hc_chain_brine *b, hc_chain_pond *p, double v_m3, hc_chain_parcel *out)
{
    if (b == NULL || p == NULL || out == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < 0)
        return HC_ERR_NEGATIVE;
    memset(out, 0, sizeof *out);
    if (v_m3 == 0)
        return HC_OK;
    hc_chain_view v;
    hc_status st = hc_chain_view_of(b, p, &v);
    if (st != HC_OK)
        return st;
    if (!(v.volume_m3 > 0) || v_m3 > v.volume_m3)
        return HC_ERR_DOMAIN;
    double f = v_m3 / v.volume_m3; /* the same share of every liquid account */
    out->water_kg = f * p->water_kg;
    out->feed_water_kg = f * p->feed_water_kg;
    p->water_kg -= out->water_kg;
    p->feed_water_kg -= out->feed_water_kg;
    for (size_t k = 0; k < b->n_ions; k++) {
        out->dissolved_mol[k] = f * p->dissolved_mol[k];
        p->dissolved_mol[k] -= out->dissolved_mol[k];
    }
    return HC_OK;
}

void hc_chain_add(hc_chain_pond *p, const hc_chain_parcel *in)
{
    p->water_kg += in->water_kg;
    p->feed_water_kg += in->feed_water_kg;
    for (size_t k = 0; k < HC_MIX_MAX_IONS; k++)
        p->dissolved_mol[k] += in->dissolved_mol[k];
}

hc_status hc_chain_settle(const hc_chain_brine *b, hc_chain_pond *p)
{
    if (b == NULL || p == NULL)
        return HC_ERR_ARGUMENT;
    if (!(p->water_kg > 0))
        return HC_OK;
    hc_chain_point pt;
    hc_status st = hc_chain_point_at(b, p->feed_water_kg / p->water_kg, &pt);
    if (st != HC_OK)
        return st;
    for (size_t k = 0; k < b->n_ions; k++) {
        double keep = pt.molality[k] * p->water_kg; /* what the path holds dissolved [mol] */
        double excess = p->dissolved_mol[k] - keep;
        if (excess > 0) {
            p->dissolved_mol[k] -= excess;
            p->deposited_mol[k] += excess;
        }
    }
    return HC_OK;
}

hc_status hc_chain_weather(const hc_chain_brine *b, hc_chain_pond *p, double evaporate_kg,
                           double rain_kg, double *evaporated_kg)
{
    if (b == NULL || p == NULL || evaporated_kg == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(evaporate_kg) || !isfinite(rain_kg))
        return HC_ERR_NOT_FINITE;
    if (rain_kg < 0)
        return HC_ERR_NEGATIVE;
    double e = evaporate_kg;
    double cap = p->water_kg * (1 - 1e-6);
    if (e > cap)
        e = cap;
    p->water_kg += rain_kg - e;
    *evaporated_kg = e;
    return hc_chain_settle(b, p);
}

double hc_chain_deposit_kg(const hc_chain_brine *b, const hc_chain_pond *p)
{
    double m = 0;
    for (size_t k = 0; k < b->n_ions; k++)
        m += p->deposited_mol[k] * b->molar_mass_kg_mol[k];
    return m;
}
