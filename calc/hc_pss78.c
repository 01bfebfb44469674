/* PSS-78 practical salinity; formulas and coefficients from Fofonoff &
 * Millard (1983) UNESCO Tech. Pap. Mar. Sci. 44, and Hill et al. (1986). */
#include <math.h>
#include <stddef.h>

#include "hc_pss78.h"
#include "hc_state.h"

/* S = sum a_i Rt^(i/2) + f(t) sum b_i Rt^(i/2) (UNESCO 44, eq. for S) [1] */
static const double pss_a[6] = {0.0080, -0.1692, 25.3851, 14.0941, -7.0261, 2.7081};
static const double pss_b[6] = {0.0005, -0.0056, -0.0066, -0.0375, 0.0636, -0.0144};
/* f(t) = (t - 15) / (1 + k (t - 15)), t IPTS-68 [degC] */
static const double pss_k = 0.0162;
/* rt(t) = C(35,t,0) / C(35,15,0) (UNESCO 44, rt polynomial) [1] */
static const double pss_c[5] = {0.6766097, 2.00564e-2, 1.104259e-4, -6.9698e-7, 1.0031e-9};
/* Rp = 1 + p (e1 + e2 p + e3 p^2) / (1 + d1 t + d2 t^2 + R (d3 + d4 t)), p [dbar] */
static const double pss_d[4] = {3.426e-2, 4.464e-4, 4.215e-1, -3.107e-3};
static const double pss_e[3] = {2.070e-5, -6.370e-10, 3.989e-15};
/* Hill et al. (1986) constants a0, b0 [1] */
static const double hill_a0 = 0.008;
static const double hill_b0 = 0.0005;

/* IPTS-68 from ITS-90 (Saunders 1990, as used by TEOS-10) [degC] */
static double t68_from_t90(double t90_c)
{
    return 1.00024 * t90_c;
}

/* f(t68) of the salinity temperature term [1] */
static double ft68(double t68)
{
    return (t68 - 15.0) / (1.0 + pss_k * (t68 - 15.0));
}

/* rt(t68) = C(35,t,0)/C(35,15,0) [1] */
static double rt_poly(double t68)
{
    return pss_c[0] + t68 * (pss_c[1] + t68 * (pss_c[2] + t68 * (pss_c[3] + t68 * pss_c[4])));
}

/* PSS-78 polynomial in x = sqrt(Rt) and its derivative dS/dx [1] */
static double pss_poly(double x, double ft, double *ds_dx)
{
    double s = 0.0, d = 0.0;
    for (int i = 5; i >= 0; i--)
        s = s * x + (pss_a[i] + ft * pss_b[i]);
    for (int i = 5; i >= 1; i--)
        d = d * x + i * (pss_a[i] + ft * pss_b[i]);
    if (ds_dx != NULL)
        *ds_dx = d;
    return s;
}

/* Hill et al. (1986) raw salinity below 2, as a function of x = sqrt(Rt):
 * S_hill = S - a0 / (1 + 1.5 X + X^2) - b0 f(t) / (1 + Y^0.5 + Y + Y^1.5),
 * X = 400 Rt, Y = 100 Rt [1]; also its derivative dS_hill/dx. */
static double hill_raw(double x, double ft, double *ds_dx)
{
    double dsp;
    double sp = pss_poly(x, ft, &dsp);
    double big_x = 400.0 * x * x;
    double y = 10.0 * x; /* sqrt(Y) */
    double part1 = 1.0 + big_x * (1.5 + big_x);
    double part2 = 1.0 + y * (1.0 + y * (1.0 + y));
    if (ds_dx != NULL) {
        double dpart1 = (1.5 + 2.0 * big_x) * 800.0 * x;
        double dpart2 = (1.0 + 2.0 * y + 3.0 * y * y) * 10.0;
        *ds_dx = dsp + hill_a0 * dpart1 / (part1 * part1) +
                 hill_b0 * ft * dpart2 / (part2 * part2);
    }
    return sp - hill_a0 / part1 - hill_b0 * ft / part2;
}

/* Newton on x = sqrt(Rt) for pss_poly(x) = target; the polynomial is
 * monotone in x over 0..42 so this converges from x = sqrt(S/35) in a few
 * steps to machine precision. Returns NaN if it does not. */
static double x_for_pss(double target, double ft)
{
    double x = sqrt(target / 35.0);
    for (int i = 0; i < 20; i++) {
        double d;
        double f = pss_poly(x, ft, &d) - target;
        double step = f / d;
        x -= step;
        if (x < 0.0)
            x = 0.0;
        if (fabs(step) < 1e-15)
            return x;
    }
    return NAN;
}

/* Scale factor that makes the Hill extension join PSS-78 at S = 2
 * (TEOS-10, IOC et al. 2010, appendix E.3): 2 / S_hill_raw(Rt at S=2). */
static double hill_ratio(double ft)
{
    double x2 = x_for_pss(HC_PSS78_SP_MIN, ft);
    return HC_PSS78_SP_MIN / hill_raw(x2, ft, NULL);
}

static hc_status check_t_p(double t90_c, double p_dbar)
{
    if (!isfinite(t90_c) || !isfinite(p_dbar))
        return HC_ERR_NOT_FINITE;
    if (t90_c < HC_PSS78_T_MIN_C || t90_c > HC_PSS78_T_MAX_C)
        return HC_ERR_TEMPERATURE_RANGE;
    if (p_dbar < 0.0 || p_dbar > HC_PSS78_P_MAX_DBAR)
        return HC_ERR_PRESSURE_RANGE;
    return HC_OK;
}

hc_status hc_pss78_sp_from_c(double cond_ms_cm, double t90_c, double p_dbar,
                             double *sp, unsigned *warnings)
{
    if (!isfinite(cond_ms_cm))
        return HC_ERR_NOT_FINITE;
    hc_status st = check_t_p(t90_c, p_dbar);
    if (st != HC_OK)
        return st;
    if (cond_ms_cm < 0.0)
        return HC_ERR_NEGATIVE;

    double t = t68_from_t90(t90_c);
    double ft = ft68(t);
    double r = cond_ms_cm / HC_PSS78_C35_MS_CM; /* R = C / C(35,15,0) */
    double rp = 1.0 + p_dbar * (pss_e[0] + p_dbar * (pss_e[1] + p_dbar * pss_e[2])) /
                          (1.0 + t * (pss_d[0] + t * pss_d[1]) + r * (pss_d[2] + pss_d[3] * t));
    double rt = r / (rp * rt_poly(t)); /* Rt = R / (Rp rt) */
    double x = sqrt(rt);
    double s = pss_poly(x, ft, NULL);
    unsigned warn = 0;

    /* 1e-9 absorbs rounding, so that C(42) maps back to 42 */
    if (s > HC_PSS78_SP_MAX + 1e-9)
        return HC_ERR_SALINITY_RANGE;
    if (s < HC_PSS78_SP_MIN) {
        s = hill_ratio(ft) * hill_raw(x, ft, NULL);
        if (s < 0.0) /* rounding at C = 0 only */
            s = 0.0;
        warn = HC_WARN_HILL_EXTENSION;
    }
    if (sp != NULL)
        *sp = s;
    if (warnings != NULL)
        *warnings |= warn;
    return HC_OK;
}

hc_status hc_pss78_c_from_sp(double sp, double t90_c, double p_dbar, double *cond_ms_cm)
{
    if (!isfinite(sp))
        return HC_ERR_NOT_FINITE;
    hc_status st = check_t_p(t90_c, p_dbar);
    if (st != HC_OK)
        return st;
    if (sp < 0.0)
        return HC_ERR_NEGATIVE;
    if (sp > HC_PSS78_SP_MAX)
        return HC_ERR_SALINITY_RANGE;

    double t = t68_from_t90(t90_c);
    double ft = ft68(t);
    double x;
    if (sp >= HC_PSS78_SP_MIN) {
        x = x_for_pss(sp, ft);
    } else if (sp == 0.0) {
        x = 0.0;
    } else {
        double ratio = hill_ratio(ft);
        x = x_for_pss(HC_PSS78_SP_MIN, ft) * sqrt(sp / HC_PSS78_SP_MIN);
        int done = 0;
        for (int i = 0; i < 40 && !done; i++) {
            double d;
            double f = ratio * hill_raw(x, ft, &d) - sp;
            double step = f / (ratio * d);
            x -= step;
            if (x < 0.0)
                x = 0.0;
            done = fabs(step) < 1e-15 * (1.0 + x);
        }
        if (!done)
            x = NAN;
    }
    if (!isfinite(x))
        return HC_ERR_NO_CONVERGENCE;

    /* R from Rt: R = Rt rt (1 + A / (B + D R)) is the quadratic
     * D R^2 + (B - Rt rt D) R - Rt rt (A + B) = 0 (UNESCO 44 Rp term). */
    double rtr = x * x * rt_poly(t);
    double a = p_dbar * (pss_e[0] + p_dbar * (pss_e[1] + p_dbar * pss_e[2]));
    double b = 1.0 + t * (pss_d[0] + t * pss_d[1]);
    double d = pss_d[2] + pss_d[3] * t;
    double lin = b - rtr * d;
    /* positive root, written without cancellation for small R */
    double r = 2.0 * rtr * (a + b) / (lin + sqrt(lin * lin + 4.0 * d * rtr * (a + b)));
    *cond_ms_cm = r * HC_PSS78_C35_MS_CM;
    return HC_OK;
}
