#include <math.h>
#include <string.h>

#include "hc_minerals.h"

enum { NA, K, MG, CA, CL, SO4, HCO3, CO3 };

struct mineral_def {
    signed char nu[HC_ION_COUNT];
    signed char water;
    double log_k25;   /* HMW84 Table 3 */
    hc_stage stage;
    const char *formula;
};

#define ION(na, k, mg, ca, cl, so4, co3) {na, k, mg, ca, cl, so4, 0, co3}
static const struct mineral_def defs[HC_MINERAL_COUNT] = {
    [HC_MIN_CALCITE] = {ION(0, 0, 0, 1, 0, 0, 1), 0, -8.406, HC_STAGE_CARBONATE, "CaCO3"},
    [HC_MIN_ARAGONITE] = {ION(0, 0, 0, 1, 0, 0, 1), 0, -8.219, HC_STAGE_CARBONATE, "CaCO3"},
    [HC_MIN_GYPSUM] = {ION(0, 0, 0, 1, 0, 1, 0), 2, -4.5805, HC_STAGE_GYPSUM, "CaSO4.2H2O"},
    [HC_MIN_ANHYDRITE] = {ION(0, 0, 0, 1, 0, 1, 0), 0, -4.3621, HC_STAGE_GYPSUM, "CaSO4"},
    [HC_MIN_HALITE] = {ION(1, 0, 0, 0, 1, 0, 0), 0, 1.5704, HC_STAGE_HALITE, "NaCl"},
    [HC_MIN_GLAUBERITE] = {ION(2, 0, 0, 1, 0, 2, 0), 0, -5.2445, HC_STAGE_GYPSUM,
                           "Na2Ca(SO4)2"},
    [HC_MIN_POLYHALITE] = {ION(0, 2, 1, 2, 0, 4, 0), 2, -13.7441, HC_STAGE_GYPSUM,
                           "K2Ca2Mg(SO4)4.2H2O"},
    [HC_MIN_MIRABILITE] = {ION(2, 0, 0, 0, 0, 1, 0), 10, -1.2278,
                           HC_STAGE_MAGNESIUM_SULFATE, "Na2SO4.10H2O"},
    [HC_MIN_THENARDITE] = {ION(2, 0, 0, 0, 0, 1, 0), 0, -0.2875,
                           HC_STAGE_MAGNESIUM_SULFATE, "Na2SO4"},
    [HC_MIN_EPSOMITE] = {ION(0, 0, 1, 0, 0, 1, 0), 7, -1.8811,
                         HC_STAGE_MAGNESIUM_SULFATE, "MgSO4.7H2O"},
    [HC_MIN_HEXAHYDRITE] = {ION(0, 0, 1, 0, 0, 1, 0), 6, -1.6351,
                            HC_STAGE_MAGNESIUM_SULFATE, "MgSO4.6H2O"},
    [HC_MIN_KIESERITE] = {ION(0, 0, 1, 0, 0, 1, 0), 1, -0.1227,
                          HC_STAGE_MAGNESIUM_SULFATE, "MgSO4.H2O"},
    [HC_MIN_BLOEDITE] = {ION(2, 0, 1, 0, 0, 2, 0), 4, -2.3469,
                         HC_STAGE_MAGNESIUM_SULFATE, "Na2Mg(SO4)2.4H2O"},
    [HC_MIN_SYLVITE] = {ION(0, 1, 0, 0, 1, 0, 0), 0, 0.8999, HC_STAGE_POTASH, "KCl"},
    [HC_MIN_CARNALLITE] = {ION(0, 1, 1, 0, 3, 0, 0), 6, 4.3304, HC_STAGE_POTASH,
                           "KMgCl3.6H2O"},
    [HC_MIN_KAINITE] = {ION(0, 1, 1, 0, 1, 1, 0), 3, -0.1926, HC_STAGE_POTASH,
                        "KMgClSO4.3H2O"},
    [HC_MIN_LEONITE] = {ION(0, 2, 1, 0, 0, 2, 0), 4, -3.9790, HC_STAGE_POTASH,
                        "K2Mg(SO4)2.4H2O"},
    [HC_MIN_SCHOENITE] = {ION(0, 2, 1, 0, 0, 2, 0), 6, -4.3277, HC_STAGE_POTASH,
                          "K2Mg(SO4)2.6H2O"},
    [HC_MIN_SYNGENITE] = {ION(0, 2, 0, 1, 0, 2, 0), 1, -7.4484, HC_STAGE_GYPSUM,
                          "K2Ca(SO4)2.H2O"},
    [HC_MIN_ARCANITE] = {ION(0, 2, 0, 0, 0, 1, 0), 0, -1.7763, HC_STAGE_POTASH, "K2SO4"},
    [HC_MIN_GLASERITE] = {ION(1, 3, 0, 0, 0, 2, 0), 0, -3.8027, HC_STAGE_POTASH,
                          "NaK3(SO4)2"},
    [HC_MIN_BISCHOFITE] = {ION(0, 0, 1, 0, 2, 0, 0), 6, 4.4554, HC_STAGE_BISCHOFITE,
                           "MgCl2.6H2O"},
};

/* Halite: van 't Hoff data, Delta_r H [J/mol] and Delta_r Cp [J/(mol K)] at
 * 25 degC from the NBS tables (Wagman et al. 1982) [from memory]:
 * dH = -240.12 - 167.159 + 411.153 kJ; dCp = 46.4 - 136.4 - 50.50. */
struct vant_hoff { hc_mineral mineral; double dh, dcp; };
static const struct vant_hoff vh[] = {
    {HC_MIN_HALITE, 3874.0, -140.5},
};

/* Gypsum: log10 K(T) = A + B T + C/T + D log10 T with the coefficients of
 * the PHREEQC database phreeqc.dat (Parkhurst & Appelo 2013, USGS Techniques
 * and Methods 6-A43), used as a change from 25 degC. */
static double gypsum_analytic(double tk)
{
    return 68.2401 - 3221.51 / tk - 25.0627 * log10(tk);
}

/* Calcite and aragonite: log10 K(T) = a + b T + c/T + d log10 T, Plummer &
 * Busenberg (1982, GCA 46, 1011) Table 5, used as a change from 25 degC. */
static double caco3_analytic(hc_mineral m, double tk)
{
    double c = m == HC_MIN_CALCITE ? 2839.319 : 2903.293;
    double a = m == HC_MIN_CALCITE ? -171.9065 : -171.9773;
    return a - 0.077993 * tk + c / tk + 71.595 * log10(tk);
}

/* Returns the coefficient, 0 for invalid arguments. */
int hc_mineral_ion_coeff(hc_mineral mineral, hc_ion ion)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT || (int)ion < 0 || ion >= HC_ION_COUNT)
        return 0;
    return defs[mineral].nu[ion];
}

/* Returns the count, 0 for an invalid mineral. */
int hc_mineral_water(hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return 0;
    return defs[mineral].water;
}

double hc_mineral_molar_mass(hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return 0.0;
    /* M = sum nu_i M_i + n_w M_w; ion masses in g/mol, water in kg/mol. */
    double g_mol = defs[mineral].water * HC_WATER_KG_PER_MOL * 1000.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        g_mol += defs[mineral].nu[i] * hc_ion_molar_mass((hc_ion)i);
    return g_mol / 1000.0;
}

/* Returns the formula, NULL for an invalid mineral. */
const char *hc_mineral_formula(hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return NULL;
    return defs[mineral].formula;
}

/* Returns the stage, HC_STAGE_NONE for an invalid mineral. */
hc_stage hc_mineral_stage(hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return HC_STAGE_NONE;
    return defs[mineral].stage;
}

/* Returns 1 or 0. */
int hc_mineral_has_temperature_function(hc_mineral mineral)
{
    if (mineral == HC_MIN_GYPSUM || mineral == HC_MIN_CALCITE || mineral == HC_MIN_ARAGONITE)
        return 1;
    for (size_t i = 0; i < sizeof vh / sizeof vh[0]; i++)
        if (vh[i].mineral == mineral)
            return 1;
    return 0;
}

/* Halite: ln K(T) = ln K(T0) + dH/R (1/T0 - 1/T) + dCp/R (ln(T/T0) + T0/T - 1),
 * the integrated Gibbs-Helmholtz equation with a constant dCp; gypsum: the
 * analytic expression above. Both as changes from HMW84's 25 degC value.
 * Returns HC_OK, HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE, HC_ERR_ARGUMENT. */
hc_status hc_mineral_log_k(hc_mineral mineral, double t_c, double *log_k)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return HC_ERR_ARGUMENT;
    if (!isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (t_c < -5.0 || t_c > 80.0)
        return HC_ERR_TEMPERATURE_RANGE;
    const double r_gas = 8.314462618, t0 = 298.15;
    double tk = t_c + 273.15;
    double lk = defs[mineral].log_k25;
    for (size_t i = 0; i < sizeof vh / sizeof vh[0]; i++) {
        if (vh[i].mineral != mineral)
            continue;
        double ln_inc = vh[i].dh / r_gas * (1.0 / t0 - 1.0 / tk) +
                        vh[i].dcp / r_gas * (log(tk / t0) + t0 / tk - 1.0);
        lk += ln_inc / log(10.0);
    }
    if (mineral == HC_MIN_GYPSUM)
        lk += gypsum_analytic(tk) - gypsum_analytic(t0);
    if (mineral == HC_MIN_CALCITE || mineral == HC_MIN_ARAGONITE)
        lk += caco3_analytic(mineral, tk) - caco3_analytic(mineral, t0);
    *log_k = lk;
    return HC_OK;
}

/* Returns HC_OK or the error of hc_mineral_set_at_pco2. */
hc_status hc_mineral_set_at(double t_c, unsigned flags, hc_mineral_set *out)
{
    return hc_mineral_set_at_pco2(t_c, flags, HC_LOG_PCO2_AIR, out);
}

/* Returns HC_OK, the error of hc_mineral_log_k or of hc_carbonate_params_at. */
hc_status hc_mineral_set_at_pco2(double t_c, unsigned flags, double log_p_co2,
                                 hc_mineral_set *out)
{
    memset(out, 0, sizeof *out);
    out->t_c = t_c;
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        hc_status st = hc_mineral_log_k((hc_mineral)m, t_c, &out->log_k[m]);
        if (st != HC_OK)
            return st;
        out->enabled[m] = 1;
    }
    if (!(flags & HC_MINERALS_WITH_ANHYDRITE))
        out->enabled[HC_MIN_ANHYDRITE] = 0;
    /* One CaCO3 phase at a time: aragonite unless calcite is asked for. */
    out->enabled[(flags & HC_MINERALS_CALCITE) ? HC_MIN_ARAGONITE : HC_MIN_CALCITE] = 0;
    if (flags & HC_MINERALS_NO_CARBONATE) {
        out->enabled[HC_MIN_ARAGONITE] = out->enabled[HC_MIN_CALCITE] = 0;
    } else {
        hc_status st = hc_carbonate_params_at(t_c, log_p_co2, &out->carbonate);
        if (st != HC_OK)
            return st;
        out->open_to_co2 = 1;
    }
    if (t_c < 0.0 || t_c > 50.0)
        out->warnings |= HC_WARN_TEMPERATURE_EXTRAPOLATED;
    return HC_OK;
}

/* log10 IAP = [sum nu_i ln(m_i gamma_i) + n_w ln a_w] / ln 10. */
double hc_mineral_log_iap(hc_mineral mineral, const double molality[HC_ION_COUNT],
                          const hc_pitzer_result *r)
{
    const struct mineral_def *d = &defs[mineral];
    double ln_iap = d->water * log(r->water_activity);
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (d->nu[i] == 0)
            continue;
        if (molality[i] <= 0.0)
            return -HUGE_VAL;
        ln_iap += d->nu[i] * (log(molality[i]) + r->ln_gamma[i]);
    }
    return ln_iap / log(10.0);
}

/* Returns HC_OK. */
hc_status hc_saturation_indices(const hc_mineral_set *set, const double molality[HC_ION_COUNT],
                                const hc_pitzer_result *r, double si[HC_MINERAL_COUNT])
{
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        si[m] = hc_mineral_log_iap((hc_mineral)m, molality, r) - set->log_k[m];
    return HC_OK;
}
