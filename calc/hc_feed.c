#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hc_brine_density.h"
#include "hc_feed.h"
#include "hc_seawater.h"

#define M_BR 79.904 /* g/mol, IUPAC 2013 */
#define M_SR 87.62

/* Moles per kg solution -> model molality; lumps Br and Sr, keeps the
 * carbonate alkalinity, balances with Cl. mol[] and the lumped species are per kg of solution. */
static hc_status finish(const double mol[HC_ION_COUNT], double br, double sr, double water,
                        hc_feed *out)
{
    if (!(water > 0.4))
        return HC_ERR_DOMAIN;
    double m[HC_ION_COUNT];
    for (int i = 0; i < HC_ION_COUNT; i++)
        m[i] = mol[i] / water;
    m[HC_ION_CL] += br / water;
    m[HC_ION_CA] += sr / water;
    out->imbalance_eq = hc_charge_balance(m);
    double cat_eq = 0.0;
    for (int i = HC_CATION_FIRST; i < HC_CATION_END; i++)
        cat_eq += m[i] * hc_ion_charge((hc_ion)i);
    if (!(cat_eq > 0.0))
        return HC_ERR_ARGUMENT;
    out->imbalance_percent = 100.0 * out->imbalance_eq / cat_eq;
    out->carbonate_alkalinity = m[HC_ION_HCO3] + 2.0 * m[HC_ION_CO3];
    double residual = hc_charge_balance(m); /* > 0: too few anions */
    if (m[HC_ION_CL] + residual < 0.0)
        return HC_ERR_DOMAIN;
    m[HC_ION_CL] += residual;
    out->chloride_adjustment = residual;
    memcpy(out->molality, m, sizeof m);
    out->water_mass_fraction = water;
    return HC_OK;
}

/* Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_SALINITY_RANGE. */
hc_status hc_feed_seawater(double sp, hc_feed *out)
{
    if (!isfinite(sp))
        return HC_ERR_NOT_FINITE;
    if (sp < 2.0 || sp > 42.0)
        return HC_ERR_SALINITY_RANGE;
    /* The reference composition as it stands (hc_seawater: Millero et al.
     * 2008, Table 4), then lumped and balanced here like any analysis. */
    hc_sw_composition c;
    hc_status st = hc_seawater_composition(sp, 0, &c);
    if (st != HC_OK)
        return st;
    memset(out, 0, sizeof *out);
    snprintf(out->name, sizeof out->name, "seawater");
    static const struct { hc_sw_ion from; hc_ion to; } map[] = {
        {HC_SW_NA, HC_ION_NA}, {HC_SW_K, HC_ION_K}, {HC_SW_MG, HC_ION_MG},
        {HC_SW_CA, HC_ION_CA}, {HC_SW_CL, HC_ION_CL}, {HC_SW_SO4, HC_ION_SO4},
        {HC_SW_HCO3, HC_ION_HCO3}, {HC_SW_CO3, HC_ION_CO3},
    };
    double water = 1.0 - c.salinity_g_kg / 1000.0, mol[HC_ION_COUNT] = {0};
    for (size_t i = 0; i < sizeof map / sizeof map[0]; i++)
        mol[map[i].to] = c.molality[map[i].from] * water; /* per kg of seawater */
    st = finish(mol, c.molality[HC_SW_BR] * water, c.molality[HC_SW_SR] * water, water, out);
    out->practical_salinity = sp;
    return st;
}

/* Grams per kg of solution from an analysis at an assumed density. */
static void to_g_per_kg(const hc_feed_analysis *a, double rho, double g[HC_ION_COUNT],
                        double *br, double *sr)
{
    double f = a->unit == HC_FEED_G_PER_KG ? 1.0 : 1.0 / rho; /* mg/L / (kg/m3) = g/kg */
    for (int i = 0; i < HC_ION_COUNT; i++)
        g[i] = a->conc[i] * f;
    *br = a->br * f;
    *sr = a->sr * f;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_feed_from_analysis(const char *name, const hc_feed_analysis *a, hc_feed *out)
{
    if (a->unit != HC_FEED_G_PER_KG && a->unit != HC_FEED_MG_PER_L)
        return HC_ERR_ARGUMENT;
    double any = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (!isfinite(a->conc[i]))
            return HC_ERR_NOT_FINITE;
        if (a->conc[i] < 0.0)
            return HC_ERR_NEGATIVE;
        any += a->conc[i];
    }
    if (!isfinite(a->br) || !isfinite(a->sr))
        return HC_ERR_NOT_FINITE;
    if (a->br < 0.0 || a->sr < 0.0)
        return HC_ERR_NEGATIVE;
    if (!(any > 0.0))
        return HC_ERR_ARGUMENT;
    memset(out, 0, sizeof *out);
    snprintf(out->name, sizeof out->name, "%s", name != NULL ? name : "site");
    out->practical_salinity = NAN;

    /* mg/L needs the density; when not given, iterate with the brine model
     * (three passes change the density by less than 1e-6 kg/m3). */
    double rho = a->unit == HC_FEED_MG_PER_L && isfinite(a->density_kg_m3) ? a->density_kg_m3
                                                                            : 1000.0;
    int passes = a->unit == HC_FEED_MG_PER_L && !isfinite(a->density_kg_m3) ? 6 : 1;
    hc_status st = HC_OK;
    for (int pass = 0; pass < passes; pass++) {
        double g[HC_ION_COUNT], br, sr, total;
        to_g_per_kg(a, rho, g, &br, &sr);
        total = br + sr;
        double mol[HC_ION_COUNT];
        for (int i = 0; i < HC_ION_COUNT; i++) {
            mol[i] = g[i] / hc_ion_molar_mass((hc_ion)i);
            total += g[i];
        }
        if (total > 600.0)
            return HC_ERR_DOMAIN;
        st = finish(mol, br / M_BR, sr / M_SR, 1.0 - total / 1000.0, out);
        if (st != HC_OK)
            return st;
        if (passes > 1 && hc_brine_density(out->molality, 20.0, &rho) != HC_OK)
            return HC_ERR_DOMAIN;
    }
    return st;
}
