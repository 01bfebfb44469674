#include <math.h>

#include "hc_brine_density.h"
#include "hc_eos80.h"

/* Laliberte (2009) Table (density parameters c0..c4) [S]. */
static const double lal[HC_SALT_COUNT][5] = {
    [HC_SALT_NACL] = {-0.00324112223655149, 0.0636354335906616, 1.01371399467365,
                      0.0145951015210159, 3317.34854426537},
    [HC_SALT_KCL] = {-0.855928945959145, 6.04073571306402, 2.81787416217166,
                     0.0253924645877338, 2681.61723465886},
    [HC_SALT_MGCL2] = {-0.0215001423271867, 0.0441202083909434, 1.53227586827304,
                       -0.0098078506056196, -3478.36496883693},
    [HC_SALT_MGSO4] = {98.1201663080777, 59.265764731786, -0.0303404982114453,
                       0.000503619228557116, 1763.7594229147},
    [HC_SALT_CACL2] = {-9.72893747074295, 14.7005352975276, 4.19033341468332,
                       0.0397403624277021, 2708.12778894614},
    [HC_SALT_NA2SO4] = {4.45025449497252e-6, 9.12086519621226e-6, 0.0840358370073922,
                        0.00465767525381795, 4349.50513887423},
    [HC_SALT_K2SO4] = {7.10599369467468e-6, 4.6555866279207e-5, 0.349566841181191,
                       0.00751053641501126, 4200.09377806549},
    /* surrogates (header): the parameters of the sodium salt of the same
     * charge type, applied to the carbonate's own mass */
    [HC_SALT_NA2CO3] = {4.45025449497252e-6, 9.12086519621226e-6, 0.0840358370073922,
                        0.00465767525381795, 4349.50513887423},
    [HC_SALT_NAHCO3] = {-0.00324112223655149, 0.0636354335906616, 1.01371399467365,
                        0.0145951015210159, 3317.34854426537},
};

/* Molar masses [g/mol] of the salts (sums of hc_ion_molar_mass). */
static double salt_molar_mass(hc_salt s)
{
    double na = hc_ion_molar_mass(HC_ION_NA), k = hc_ion_molar_mass(HC_ION_K);
    double mg = hc_ion_molar_mass(HC_ION_MG), ca = hc_ion_molar_mass(HC_ION_CA);
    double cl = hc_ion_molar_mass(HC_ION_CL), so4 = hc_ion_molar_mass(HC_ION_SO4);
    switch (s) {
    case HC_SALT_NACL: return na + cl;
    case HC_SALT_KCL: return k + cl;
    case HC_SALT_MGCL2: return mg + 2 * cl;
    case HC_SALT_MGSO4: return mg + so4;
    case HC_SALT_CACL2: return ca + 2 * cl;
    case HC_SALT_NA2SO4: return 2 * na + so4;
    case HC_SALT_K2SO4: return 2 * k + so4;
    case HC_SALT_NA2CO3: return 2 * na + hc_ion_molar_mass(HC_ION_CO3);
    case HC_SALT_NAHCO3: return na + hc_ion_molar_mass(HC_ION_HCO3);
    default: return NAN;
    }
}

/* rho_w = (((((-2.8054253e-10 t + 1.0556302e-7) t - 4.6170461e-5) t
 * - 0.0079870401) t + 16.945176) t + 999.83952) / (1 + 0.01687985 t) [kg/m3],
 * Laliberte & Cooper (2004) eq. 8 (after Kell 1975). */
double hc_water_density_lc(double t_c)
{
    double t = t_c;
    return (((((-2.8054253e-10 * t + 1.0556302e-7) * t - 4.6170461e-5) * t - 0.0079870401) * t +
             16.945176) * t + 999.83952) / (1.0 + 0.01687985 * t);
}

/* Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_NEGATIVE. */
hc_status hc_brine_salts(const double molality[HC_ION_COUNT], double salt[HC_SALT_COUNT])
{
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (!isfinite(molality[i]))
            return HC_ERR_NOT_FINITE;
        if (molality[i] < 0.0)
            return HC_ERR_NEGATIVE;
    }
    for (int s = 0; s < HC_SALT_COUNT; s++)
        salt[s] = 0.0;
    double na = molality[HC_ION_NA], k = molality[HC_ION_K];
    double mg = molality[HC_ION_MG], ca = molality[HC_ION_CA];
    double so4 = molality[HC_ION_SO4];
    double x;
    x = fmin(mg, so4);
    salt[HC_SALT_MGSO4] = x; mg -= x; so4 -= x;
    x = fmin(na / 2.0, so4);
    salt[HC_SALT_NA2SO4] = x; na -= 2.0 * x; so4 -= x;
    x = fmin(k / 2.0, so4);
    salt[HC_SALT_K2SO4] = x; k -= 2.0 * x; so4 -= x;
    /* Sulfate left over (a brine richer in sulfate than Mg + Na/2 + K/2,
     * such as calcium sulfate alone) counts as MgSO4, the closest
     * parameterised 2-2 salt, in place of the calcium it belongs to. */
    x = fmin(ca, so4);
    salt[HC_SALT_MGSO4] += x; ca -= x;
    /* Carbonate and bicarbonate with the sodium left (header). */
    x = fmin(na / 2.0, molality[HC_ION_CO3]);
    salt[HC_SALT_NA2CO3] = x; na -= 2.0 * x;
    x = fmin(na, molality[HC_ION_HCO3]);
    salt[HC_SALT_NAHCO3] = x; na -= x;
    /* The remaining cations pair with chloride. */
    salt[HC_SALT_CACL2] = ca;
    salt[HC_SALT_KCL] = k;
    salt[HC_SALT_MGCL2] = mg;
    salt[HC_SALT_NACL] = na;
    return HC_OK;
}

/* Laliberte (2009): rho_app,i = (c0 (1 - w_w) + c1) exp(1e-6 (t + c4)^2)
 * / ((1 - w_w) + c2 + c3 t); 1/rho = w_w / rho_w + sum w_i / rho_app,i. */
static double mixture_density(const double salt[HC_SALT_COUNT], double t_c)
{
    double mass[HC_SALT_COUNT], total = 1000.0; /* grams per kg water */
    for (int s = 0; s < HC_SALT_COUNT; s++) {
        mass[s] = salt[s] * salt_molar_mass((hc_salt)s);
        total += mass[s];
    }
    double w_solute = (total - 1000.0) / total;
    double inv = (1000.0 / total) / hc_water_density_lc(t_c);
    for (int s = 0; s < HC_SALT_COUNT; s++) {
        if (mass[s] <= 0.0)
            continue;
        const double *c = lal[s];
        double tt = t_c + c[4];
        double app = (c[0] * w_solute + c[1]) * exp(1e-6 * tt * tt) /
                     (w_solute + c[2] + c[3] * t_c);
        inv += (mass[s] / total) / app;
    }
    return 1.0 / inv;
}

/* EOS-80 density of seawater of S_P = 35 at one atmosphere [kg/m3]
 * (hc_eos80_rho); beyond EOS-80's -2..40 degC the offset is taken at the
 * nearer end, where it changes by less than 0.02 kg/m3 per degree. */
static double eos80_s35(double t_c)
{
    double rho;
    if (hc_eos80_rho(35.0, fmin(40.0, fmax(-2.0, t_c)), 0.0, &rho) != HC_OK)
        return NAN;
    return rho;
}

/* The model composition of reference seawater at S_P = 35 (hc_feed_seawater:
 * Millero et al. 2008, Br in Cl, Sr in Ca, carbonate dropped, Cl balanced). */
static const double seawater35[HC_ION_COUNT] = {
    [HC_ION_NA] = 0.48606, [HC_ION_K] = 0.01058, [HC_ION_MG] = 0.05474,
    [HC_ION_CA] = 0.01075, [HC_ION_CL] = 0.56909, [HC_ION_SO4] = 0.02927,
};

/* Checks shared by both entry points; fills salt[] and the solute mass. */
static hc_status prepare(const double molality[HC_ION_COUNT], double t_c,
                         double salt[HC_SALT_COUNT], double *g_per_kg_water)
{
    if (!isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (t_c < -5.0 || t_c > 100.0)
        return HC_ERR_TEMPERATURE_RANGE;
    hc_status st = hc_brine_salts(molality, salt);
    if (st != HC_OK)
        return st;
    double g = hc_solute_g_per_kg_water(molality);
    if (g / (1000.0 + g) > 0.6)
        return HC_ERR_SALINITY_RANGE;
    *g_per_kg_water = g;
    return HC_OK;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_brine_density_mixture(const double molality[HC_ION_COUNT], double t_c,
                                   double *rho_kg_m3)
{
    double salt[HC_SALT_COUNT], g;
    hc_status st = prepare(molality, t_c, salt, &g);
    if (st != HC_OK)
        return st;
    *rho_kg_m3 = mixture_density(salt, t_c);
    return HC_OK;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_brine_density(const double molality[HC_ION_COUNT], double t_c, double *rho_kg_m3)
{
    double salt[HC_SALT_COUNT], g;
    hc_status st = prepare(molality, t_c, salt, &g);
    if (st != HC_OK)
        return st;
    /* The EOS-80 join (header): exact at S = 35, zero for pure water. */
    double sw_salt[HC_SALT_COUNT];
    hc_brine_salts(seawater35, sw_salt);
    double tc = fmin(40.0, fmax(-2.0, t_c));
    double offset = eos80_s35(tc) - mixture_density(sw_salt, tc);
    double g35 = hc_solute_g_per_kg_water(seawater35);
    double share = fmin(1.0, g / g35);
    *rho_kg_m3 = mixture_density(salt, t_c) + share * offset;
    return HC_OK;
}

/* Returns HC_OK or an error of hc_brine_density. */
hc_status hc_brine_specific_gravity(const double molality[HC_ION_COUNT], double t_ref_c,
                                    double *sg)
{
    double rho;
    hc_status st = hc_brine_density(molality, t_ref_c, &rho);
    if (st != HC_OK)
        return st;
    *sg = rho / hc_water_density_lc(t_ref_c);
    return HC_OK;
}
