/* Evaluation of the Pitzer equations (Harvie, Moller & Weare 1984, eqs. 1-6;
 * Pitzer 1991, "Activity Coefficients in Electrolyte Solutions", ch. 3). */
#include <math.h>
#include <stddef.h>

#include "hc_pitzer.h"

#define PITZER_B 1.2 /* b [kg^1/2 mol^-1/2], HMW84 */

static const int cz[HC_PITZER_NCAT] = {1, 1, 2, 2};
static const int az[HC_PITZER_NAN] = {1, 2, 1, 2};

/* Pitzer (1975) eq. 47: J(x) = x / (4 + C1 x^-C2 exp(-C3 x^C4)), and its
 * derivative J'(x), both for x > 0. */
static void j_function(double x, double *j, double *jp)
{
    const double c1 = 4.581, c2 = 0.7237, c3 = 0.0120, c4 = 0.528;
    double e = c1 * pow(x, -c2) * exp(-c3 * pow(x, c4));
    double d = 4.0 + e;
    double dd = e * (-c2 / x - c3 * c4 * pow(x, c4 - 1.0));
    *j = x / d;
    *jp = 1.0 / d - x * dd / (d * d);
}

/* E-theta and E-theta' for like-signed charges 1 and 2 (the only unsymmetrical
 * pair in this system), Pitzer (1975) eqs. 23-24:
 * Etheta = zi zj / (4I) [J(xij) - J(xii)/2 - J(xjj)/2], x = 6 zi zj A_phi sqrt(I). */
static void e_theta_12(double a_phi, double ionic, double *eth, double *ethp)
{
    double sq = sqrt(ionic);
    double x12 = 6.0 * 2.0 * a_phi * sq, x11 = 6.0 * a_phi * sq, x22 = 6.0 * 4.0 * a_phi * sq;
    double j12, j11, j22, jp12, jp11, jp22;
    j_function(x12, &j12, &jp12);
    j_function(x11, &j11, &jp11);
    j_function(x22, &j22, &jp22);
    double zz = 2.0;
    *eth = zz / (4.0 * ionic) * (j12 - 0.5 * j11 - 0.5 * j22);
    *ethp = -*eth / ionic +
            zz / (8.0 * ionic * ionic) * (x12 * jp12 - 0.5 * x11 * jp11 - 0.5 * x22 * jp22);
}

/* g(x) = 2 [1 - (1 + x) e^-x] / x^2 (Pitzer 1991, ch. 3). */
static double g_fun(double x)
{
    return 2.0 * (1.0 - (1.0 + x) * exp(-x)) / (x * x);
}

/* g'(x) = -2 [1 - (1 + x + x^2/2) e^-x] / x^2. */
static double gp_fun(double x)
{
    return -2.0 * (1.0 - (1.0 + x + 0.5 * x * x) * exp(-x)) / (x * x);
}

/* Below this ionic strength the Pitzer sums equal the limiting law to far
 * better than 1e-6 in ln gamma (the next terms are O(I)) [mol/kg]. */
#define DILUTE_LIMIT_MOL_KG 1e-10

/* Returns HC_OK, HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE or HC_ERR_SALINITY_RANGE. */
hc_status hc_pitzer_eval(const hc_pitzer_params *p, const double molality[HC_ION_COUNT],
                         hc_pitzer_result *out)
{
    double sum_m = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (!isfinite(molality[i]))
            return HC_ERR_NOT_FINITE;
        if (molality[i] < 0.0)
            return HC_ERR_NEGATIVE;
        sum_m += molality[i];
    }
    double ionic = hc_ionic_strength(molality);
    if (ionic > 40.0)
        return HC_ERR_SALINITY_RANGE;
    out->ionic_strength = ionic;
    if (ionic <= 0.0) {
        out->osmotic_coefficient = 1.0;
        out->water_activity = 1.0;
        for (int i = 0; i < HC_ION_COUNT; i++) {
            out->ln_gamma[i] = 0.0;
            out->gamma[i] = 1.0;
        }
        return HC_OK;
    }
    if (ionic < DILUTE_LIMIT_MOL_KG) {
        /* The pure-water limit: g(x) and E-theta lose every digit as I -> 0
         * (0/0), while all but the Debye-Hueckel term vanish. Limiting law
         * from HMW84 eqs. 1-4 as I -> 0 (f^gamma -> -3 A_phi sqrt(I);
         * Pitzer 1991, ch. 3): ln gamma_i = -3 A_phi z_i^2 sqrt(I) [1],
         * phi = 1 - 2 A_phi I^1.5 / sum m [1]. */
        double sq0 = sqrt(ionic);
        for (int i = 0; i < HC_ION_COUNT; i++) {
            double z = hc_ion_charge((hc_ion)i);
            out->ln_gamma[i] = -3.0 * p->a_phi * z * z * sq0;
            out->gamma[i] = exp(out->ln_gamma[i]);
        }
        out->osmotic_coefficient = 1.0 - 2.0 * p->a_phi * ionic * sq0 / sum_m;
        /* ln a_w = -phi M_w sum m (HMW84 eq. 1) [1] */
        out->water_activity = exp(-out->osmotic_coefficient * HC_WATER_KG_PER_MOL * sum_m);
        return HC_OK;
    }

    const double *mc = molality;                  /* cations Na K Mg Ca */
    const double *ma = molality + HC_ANION_FIRST; /* anions Cl SO4 HCO3 CO3 */
    double sq = sqrt(ionic);
    double big_z = 0.0; /* Z = sum m_i |z_i| */
    for (int c = 0; c < HC_PITZER_NCAT; c++)
        big_z += mc[c] * cz[c];
    for (int a = 0; a < HC_PITZER_NAN; a++)
        big_z += ma[a] * az[a];

    double bmx[HC_PITZER_NCAT][HC_PITZER_NAN], bphi[HC_PITZER_NCAT][HC_PITZER_NAN];
    double bprime[HC_PITZER_NCAT][HC_PITZER_NAN];
    for (int c = 0; c < HC_PITZER_NCAT; c++) {
        for (int a = 0; a < HC_PITZER_NAN; a++) {
            double x1 = p->alpha1[c][a] * sq;
            double b = p->beta0[c][a] + p->beta1[c][a] * g_fun(x1);
            double bf = p->beta0[c][a] + p->beta1[c][a] * exp(-x1);
            double bp = p->beta1[c][a] * gp_fun(x1);
            if (p->alpha2[c][a] > 0.0) {
                double x2 = p->alpha2[c][a] * sq;
                b += p->beta2[c][a] * g_fun(x2);
                bf += p->beta2[c][a] * exp(-x2);
                bp += p->beta2[c][a] * gp_fun(x2);
            }
            bmx[c][a] = b;
            bphi[c][a] = bf;
            bprime[c][a] = bp / ionic;
        }
    }

    double eth, ethp;
    e_theta_12(p->a_phi, ionic, &eth, &ethp);
    double phi_cc[HC_PITZER_NCAT][HC_PITZER_NCAT], phip_cc[HC_PITZER_NCAT][HC_PITZER_NCAT];
    double phi_aa[HC_PITZER_NAN][HC_PITZER_NAN], phip_aa[HC_PITZER_NAN][HC_PITZER_NAN];
    for (int i = 0; i < HC_PITZER_NCAT; i++)
        for (int j = 0; j < HC_PITZER_NCAT; j++) {
            int unsym = cz[i] != cz[j];
            phi_cc[i][j] = p->theta_cc[i][j] + (unsym ? eth : 0.0);
            phip_cc[i][j] = unsym ? ethp : 0.0;
        }
    for (int i = 0; i < HC_PITZER_NAN; i++)
        for (int j = 0; j < HC_PITZER_NAN; j++) {
            int unsym = az[i] != az[j];
            phi_aa[i][j] = p->theta_aa[i][j] + (unsym ? eth : 0.0);
            phip_aa[i][j] = unsym ? ethp : 0.0;
        }

    /* F (HMW84 eq. 2) and the common sums. */
    double fden = 1.0 + PITZER_B * sq;
    double f = -p->a_phi * (sq / fden + 2.0 / PITZER_B * log(fden));
    double sum_mmc = 0.0; /* sum_c sum_a m_c m_a C_ca */
    double osm = -p->a_phi * ionic * sq / fden;
    for (int c = 0; c < HC_PITZER_NCAT; c++)
        for (int a = 0; a < HC_PITZER_NAN; a++) {
            double mm = mc[c] * ma[a];
            f += mm * bprime[c][a];
            sum_mmc += mm * p->cmx[c][a];
            osm += mm * (bphi[c][a] + big_z * p->cmx[c][a]);
        }
    for (int i = 0; i < HC_PITZER_NCAT; i++)
        for (int j = i + 1; j < HC_PITZER_NCAT; j++) {
            double mm = mc[i] * mc[j];
            f += mm * phip_cc[i][j];
            double s = phi_cc[i][j] + ionic * phip_cc[i][j];
            for (int a = 0; a < HC_PITZER_NAN; a++)
                s += ma[a] * p->psi_cca[i][j][a];
            osm += mm * s;
        }
    for (int i = 0; i < HC_PITZER_NAN; i++)
        for (int j = i + 1; j < HC_PITZER_NAN; j++) {
            double mm = ma[i] * ma[j];
            f += mm * phip_aa[i][j];
            double s = phi_aa[i][j] + ionic * phip_aa[i][j];
            for (int c = 0; c < HC_PITZER_NCAT; c++)
                s += mc[c] * p->psi_aac[i][j][c];
            osm += mm * s;
        }

    /* Cations (HMW84 eq. 3). */
    for (int m = 0; m < HC_PITZER_NCAT; m++) {
        double lg = cz[m] * cz[m] * f + cz[m] * sum_mmc;
        for (int a = 0; a < HC_PITZER_NAN; a++)
            lg += ma[a] * (2.0 * bmx[m][a] + big_z * p->cmx[m][a]);
        for (int c = 0; c < HC_PITZER_NCAT; c++) {
            if (c == m)
                continue;
            double s = 2.0 * phi_cc[m][c];
            for (int a = 0; a < HC_PITZER_NAN; a++)
                s += ma[a] * p->psi_cca[m][c][a];
            lg += mc[c] * s;
        }
        for (int a = 0; a < HC_PITZER_NAN; a++)
            for (int b = a + 1; b < HC_PITZER_NAN; b++)
                lg += ma[a] * ma[b] * p->psi_aac[a][b][m];
        out->ln_gamma[HC_CATION_FIRST + m] = lg;
    }
    /* Anions (HMW84 eq. 4). */
    for (int x = 0; x < HC_PITZER_NAN; x++) {
        double lg = az[x] * az[x] * f + az[x] * sum_mmc;
        for (int c = 0; c < HC_PITZER_NCAT; c++)
            lg += mc[c] * (2.0 * bmx[c][x] + big_z * p->cmx[c][x]);
        for (int a = 0; a < HC_PITZER_NAN; a++) {
            if (a == x)
                continue;
            double s = 2.0 * phi_aa[x][a];
            for (int c = 0; c < HC_PITZER_NCAT; c++)
                s += mc[c] * p->psi_aac[x][a][c];
            lg += ma[a] * s;
        }
        for (int c = 0; c < HC_PITZER_NCAT; c++)
            for (int d = c + 1; d < HC_PITZER_NCAT; d++)
                lg += mc[c] * mc[d] * p->psi_cca[c][d][x];
        out->ln_gamma[HC_ANION_FIRST + x] = lg;
    }
    for (int i = 0; i < HC_ION_COUNT; i++)
        out->gamma[i] = exp(out->ln_gamma[i]);

    /* Osmotic coefficient (HMW84 eq. 1) and ln a_w = -phi M_w sum m_i. */
    double phi = 1.0 + 2.0 / sum_m * osm;
    out->osmotic_coefficient = phi;
    out->water_activity = exp(-phi * HC_WATER_KG_PER_MOL * sum_m);
    return HC_OK;
}

/* ln g+- = (nu+ ln g+ + nu- ln g-) / (nu+ + nu-), with nu+ = |z-|, nu- = |z+|
 * after reduction by their common factor. Returns NaN for a bad pair. */
double hc_pitzer_mean_gamma(const hc_pitzer_result *r, hc_ion cation, hc_ion anion)
{
    int zc = hc_ion_charge(cation), za = -hc_ion_charge(anion);
    if (zc <= 0 || za <= 0)
        return NAN;
    int nu_c = za, nu_a = zc;
    if (nu_c == nu_a)
        nu_c = nu_a = 1;
    double lg = (nu_c * r->ln_gamma[cation] + nu_a * r->ln_gamma[anion]) / (nu_c + nu_a);
    return exp(lg);
}
