/* Parameter tables of the Pitzer model. 25 degC values: Harvie, Moller &
 * Weare (1984, GCA 48, 723), Tables 1 and 2 (carbonate pairs from the same
 * tables). Temperature functions: Moller (1988, GCA 52, 821), eq. 13 with
 * the Table 1 coefficients, used only as increments from 298.15 K. */
#include <math.h>
#include <string.h>

#include "hc_pitzer.h"
#include "hc_state.h"

enum { NA, K, MG, CA };       /* cation rows */
enum { CL, SO4, HCO3, CO3 };  /* anion columns */

/* beta0, beta1, beta2, Cphi (HMW84 Table 1) */
static const double hmw_binary[HC_PITZER_NCAT][HC_PITZER_NAN][4] = {
    [NA] = {[CL] = {0.0765, 0.2664, 0, 0.00127},   [SO4] = {0.01958, 1.113, 0, 0.00497},
            [HCO3] = {0.0277, 0.0411, 0, 0},       [CO3] = {0.0399, 1.389, 0, 0.0044}},
    [K] = {[CL] = {0.04835, 0.2122, 0, -0.00084},  [SO4] = {0.04995, 0.7793, 0, 0},
           [HCO3] = {0.0296, -0.013, 0, -0.008},   [CO3] = {0.1488, 1.43, 0, -0.0015}},
    [MG] = {[CL] = {0.35235, 1.6815, 0, 0.00519},  [SO4] = {0.221, 3.343, -37.23, 0.025},
            [HCO3] = {0.329, 0.6072, 0, 0},        [CO3] = {0, 0, 0, 0}},
    [CA] = {[CL] = {0.3159, 1.614, 0, -0.00034},   [SO4] = {0.20, 3.1973, -54.24, 0},
            [HCO3] = {0.40, 2.977, 0, 0},          [CO3] = {0, 0, 0, 0}},
};

/* theta (HMW84 Table 2) */
static const double hmw_theta_c[HC_PITZER_NCAT][HC_PITZER_NCAT] = {
    [NA] = {[K] = -0.012, [MG] = 0.07, [CA] = 0.07},
    [K] = {[NA] = -0.012, [MG] = 0.0, [CA] = 0.032},
    [MG] = {[NA] = 0.07, [K] = 0.0, [CA] = 0.007},
    [CA] = {[NA] = 0.07, [K] = 0.032, [MG] = 0.007},
};
static const double hmw_theta_a[HC_PITZER_NAN][HC_PITZER_NAN] = {
    [CL] = {[SO4] = 0.02, [HCO3] = 0.03, [CO3] = -0.02},
    [SO4] = {[CL] = 0.02, [HCO3] = 0.01, [CO3] = 0.02},
    [HCO3] = {[CL] = 0.03, [SO4] = 0.01, [CO3] = -0.04},
    [CO3] = {[CL] = -0.02, [SO4] = 0.02, [HCO3] = -0.04},
};

/* psi (HMW84 Table 2): cation pair with a common anion, then anion pair
 * with a common cation. Listed once; mirrored at set-up. */
struct triplet { int i, j, k; double psi; };
static const struct triplet hmw_psi_cca[] = {
    {NA, K, CL, -0.0018},  {NA, K, SO4, -0.010},
    {NA, MG, CL, -0.012},  {NA, MG, SO4, -0.015},
    {NA, CA, CL, -0.007},  {NA, CA, SO4, -0.055},
    {K, MG, CL, -0.022},   {K, MG, SO4, -0.048},
    {K, CA, CL, -0.025},   {K, CA, SO4, 0.0},
    {MG, CA, CL, -0.012},  {MG, CA, SO4, 0.024},
    /* carbonate triplets (HMW84 Table 2, as transcribed in the pytzer library) */
    {NA, K, HCO3, -0.003}, {NA, K, CO3, 0.003},
};
static const struct triplet hmw_psi_aac[] = {
    {CL, SO4, NA, 0.0014}, {CL, SO4, K, 0.0},
    {CL, SO4, MG, -0.004}, {CL, SO4, CA, -0.018},
    /* carbonate triplets (HMW84 Table 2, as transcribed in the pytzer library;
     * Peiper & Pitzer 1982 fitted -0.0143 for Na,Cl,HCO3, HMW84 lists -0.15) */
    {CL, HCO3, NA, -0.15},  {CL, HCO3, MG, -0.096},
    {CL, CO3, NA, 0.0085},  {CL, CO3, K, 0.004},
    {SO4, HCO3, NA, -0.005}, {SO4, HCO3, MG, -0.161},
    {SO4, CO3, NA, -0.005}, {SO4, CO3, K, -0.009},
    {HCO3, CO3, NA, 0.002}, {HCO3, CO3, K, 0.012},
};

/* Moller (1988) eq. 13: P(T) = a1 + a2 T + a3/T + a4 ln T + a5/(T-263)
 * + a6 T^2 + a7/(680-T) + a8/(T-227), T in K. */
static double moller_eq13(const double a[8], double tk)
{
    return a[0] + a[1] * tk + a[2] / tk + a[3] * log(tk) + a[4] / (tk - 263.0) +
           a[5] * tk * tk + a[6] / (680.0 - tk) + a[7] / (tk - 227.0);
}

/* Moller (1988) Table 1 coefficients. */
static const double m88_aphi[8] = {3.36901532e-1, -6.32100430e-4, 9.14252359e00,
                                   -1.35143986e-2, 2.26089488e-3, 1.92118597e-6,
                                   4.52586464e+1, 0};
static const double m88_nacl_b0[8] = {1.43783204e+1, 5.60767406e-3, -4.22185236e+2,
                                      -2.51226677e00, 0, -2.61718135e-6,
                                      4.43854508e00, -1.70502337e00};
static const double m88_nacl_b1[8] = {-4.83060685e-1, 1.40677479e-3, 1.19311989e+2,
                                      0, 0, 0, 0, -4.23433299e00};
static const double m88_nacl_cphi[8] = {-1.00588714e-1, -1.80529413e-5, 8.61185543e00,
                                        1.24880954e-2, 0, 3.41172108e-8,
                                        6.83040995e-2, 2.93922611e-1};
static const double m88_caso4_b2[8] = {-1.29399287e+2, 4.00431027e-1, 0, 0, 0, 0, 0, 0};

/* Increment of a Moller (1988) function from 298.15 K to tk. */
static double m88_delta(const double a[8], double tk)
{
    return moller_eq13(a, tk) - moller_eq13(a, 298.15);
}

static const int cation_z[HC_PITZER_NCAT] = {1, 1, 2, 2};
static const int anion_z[HC_PITZER_NAN] = {1, 2, 1, 2};

/* Returns HC_OK, HC_ERR_NOT_FINITE or HC_ERR_TEMPERATURE_RANGE. */
hc_status hc_pitzer_params_at(double t_c, hc_pitzer_params *out)
{
    if (!isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (t_c < -5.0 || t_c > 80.0)
        return HC_ERR_TEMPERATURE_RANGE;
    memset(out, 0, sizeof *out);
    out->t_c = t_c;
    out->warnings = (t_c < 0.0 || t_c > 50.0) ? HC_WARN_TEMPERATURE_EXTRAPOLATED : 0u;
    double tk = t_c + 273.15;
    /* HMW84 used A_phi = 0.392 at 25 degC. */
    out->a_phi = 0.392 + m88_delta(m88_aphi, tk);

    for (int c = 0; c < HC_PITZER_NCAT; c++) {
        for (int a = 0; a < HC_PITZER_NAN; a++) {
            out->beta0[c][a] = hmw_binary[c][a][0];
            out->beta1[c][a] = hmw_binary[c][a][1];
            out->beta2[c][a] = hmw_binary[c][a][2];
            double cphi = hmw_binary[c][a][3];
            if (c == NA && a == CL) {
                out->beta0[c][a] += m88_delta(m88_nacl_b0, tk);
                out->beta1[c][a] += m88_delta(m88_nacl_b1, tk);
                cphi += m88_delta(m88_nacl_cphi, tk);
            }
            if (c == CA && a == SO4)
                out->beta2[c][a] += m88_delta(m88_caso4_b2, tk);
            out->cmx[c][a] = cphi / (2.0 * sqrt((double)(cation_z[c] * anion_z[a])));
            /* HMW84: alpha1 = 1.4, alpha2 = 12 for 2-2 pairs, else alpha1 = 2. */
            if (cation_z[c] == 2 && anion_z[a] == 2) {
                out->alpha1[c][a] = 1.4;
                out->alpha2[c][a] = 12.0;
            } else {
                out->alpha1[c][a] = 2.0;
                out->alpha2[c][a] = 0.0;
            }
        }
    }
    memcpy(out->theta_cc, hmw_theta_c, sizeof out->theta_cc);
    memcpy(out->theta_aa, hmw_theta_a, sizeof out->theta_aa);
    for (size_t i = 0; i < sizeof hmw_psi_cca / sizeof hmw_psi_cca[0]; i++) {
        const struct triplet *t = &hmw_psi_cca[i];
        out->psi_cca[t->i][t->j][t->k] = t->psi;
        out->psi_cca[t->j][t->i][t->k] = t->psi;
    }
    for (size_t i = 0; i < sizeof hmw_psi_aac / sizeof hmw_psi_aac[0]; i++) {
        const struct triplet *t = &hmw_psi_aac[i];
        out->psi_aac[t->i][t->j][t->k] = t->psi;
        out->psi_aac[t->j][t->i][t->k] = t->psi;
    }
    return HC_OK;
}
