/* EOS-80 density; coefficients from Millero & Poisson (1981) and Millero
 * et al. (1980), as listed in Fofonoff & Millard (1983) UNESCO Tech. Pap.
 * Mar. Sci. 44. Temperatures below are IPTS-68 [degC], pressure in bar. */
#include <math.h>
#include <stddef.h>

#include "hc_eos80.h"

static double t68_from_t90(double t90_c)
{
    return 1.00024 * t90_c; /* Saunders (1990), as used by TEOS-10 [degC] */
}

/* SMOW density, Bigg (1967), t68 [degC] -> [kg/m3] */
static double smow(double t)
{
    return 999.842594 +
           t * (6.793952e-2 + t * (-9.095290e-3 + t * (1.001685e-4 +
                                                       t * (-1.120083e-6 + t * 6.536332e-9))));
}

/* One-atmosphere density rho(S,t,0), Millero & Poisson (1981) [kg/m3] */
static double rho_surface(double s, double t)
{
    double a = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)));
    double b = -5.72466e-3 + t * (1.0227e-4 - t * 1.6546e-6);
    double c = 4.8314e-4;
    return smow(t) + s * (a + sqrt(s) * b + s * c);
}

/* Secant bulk modulus K(S,t,p), Millero et al. (1980) [bar], p [bar] */
static double secant_bulk_modulus(double s, double t, double p)
{
    double s15 = s * sqrt(s);
    /* pure water terms */
    double kw = 19652.21 + t * (148.4206 + t * (-2.327105 + t * (1.360477e-2 - t * 5.155288e-5)));
    double aw = 3.239908 + t * (1.43713e-3 + t * (1.16092e-4 - t * 5.77905e-7));
    double bw = 8.50935e-5 + t * (-6.12293e-6 + t * 5.2787e-8);
    /* salinity terms */
    double k0 = kw + s * (54.6746 + t * (-0.603459 + t * (1.09987e-2 - t * 6.1670e-5))) +
                s15 * (7.944e-2 + t * (1.6483e-2 - t * 5.3009e-4));
    double a = aw + s * (2.2838e-3 + t * (-1.0981e-5 - t * 1.6078e-6)) + s15 * 1.91075e-4;
    double b = bw + s * (-9.9348e-7 + t * (2.0816e-8 + t * 9.1697e-10));
    return k0 + p * (a + p * b);
}

/* rho(S,t,p) = rho(S,t,0) / (1 - p/K), t68 [degC], p [bar] */
static double rho_full(double s, double t68, double p_bar)
{
    double r0 = rho_surface(s, t68);
    if (p_bar == 0.0)
        return r0;
    return r0 / (1.0 - p_bar / secant_bulk_modulus(s, t68, p_bar));
}

static hc_status check_t_p(double t90_c, double p_dbar)
{
    if (!isfinite(t90_c) || !isfinite(p_dbar))
        return HC_ERR_NOT_FINITE;
    if (t90_c < HC_EOS80_T_MIN_C || t90_c > HC_EOS80_T_MAX_C)
        return HC_ERR_TEMPERATURE_RANGE;
    if (p_dbar < 0.0 || p_dbar > HC_EOS80_P_MAX_DBAR)
        return HC_ERR_PRESSURE_RANGE;
    return HC_OK;
}

hc_status hc_eos80_rho(double sp, double t90_c, double p_dbar, double *rho_kg_m3)
{
    if (!isfinite(sp))
        return HC_ERR_NOT_FINITE;
    hc_status st = check_t_p(t90_c, p_dbar);
    if (st != HC_OK)
        return st;
    if (sp < 0.0)
        return HC_ERR_NEGATIVE;
    if (sp > HC_EOS80_SP_MAX)
        return HC_ERR_SALINITY_RANGE;
    *rho_kg_m3 = rho_full(sp, t68_from_t90(t90_c), p_dbar / 10.0);
    return HC_OK;
}

double hc_eos80_rho_water(double t90_c)
{
    if (!isfinite(t90_c) || t90_c < HC_EOS80_T_MIN_C || t90_c > HC_EOS80_T_MAX_C)
        return NAN;
    return smow(t68_from_t90(t90_c));
}

int hc_eos80_t_extrapolated(double t90_c)
{
    return t90_c > HC_EOS80_T_VALID_MAX_C && t90_c <= HC_EOS80_T_MAX_C;
}

hc_status hc_eos80_sp_from_rho(double rho_kg_m3, double t90_c, double p_dbar, double *sp)
{
    if (!isfinite(rho_kg_m3))
        return HC_ERR_NOT_FINITE;
    hc_status st = check_t_p(t90_c, p_dbar);
    if (st != HC_OK)
        return st;
    double t = t68_from_t90(t90_c);
    double p = p_dbar / 10.0;
    double rho0 = rho_full(0.0, t, p);
    double rho_max = rho_full(HC_EOS80_SP_MAX, t, p);
    if (rho_kg_m3 < rho0)
        return HC_ERR_DOMAIN;
    if (rho_kg_m3 > rho_max)
        return HC_ERR_SALINITY_RANGE;

    /* Newton in S with a central-difference slope; rho is smooth and
     * nearly linear in S (drho/dS ~ 0.75 kg/m3), so this converges fast. */
    double s = HC_EOS80_SP_MAX * (rho_kg_m3 - rho0) / (rho_max - rho0);
    for (int i = 0; i < 30; i++) {
        double h = 1e-4;
        double lo = s - h < 0.0 ? 0.0 : s - h;
        double hi = s + h > HC_EOS80_SP_MAX ? HC_EOS80_SP_MAX : s + h;
        double slope = (rho_full(hi, t, p) - rho_full(lo, t, p)) / (hi - lo);
        double f = rho_full(s, t, p) - rho_kg_m3;
        double step = f / slope;
        s -= step;
        if (s < 0.0)
            s = 0.0;
        if (s > HC_EOS80_SP_MAX)
            s = HC_EOS80_SP_MAX;
        if (fabs(f) < 1e-10) {
            *sp = s;
            return HC_OK;
        }
    }
    return HC_ERR_NO_CONVERGENCE;
}
