#include <math.h>
#include <stddef.h>

#include "hc_brine_cond.h"

/* NaCl(aq) at 20 degC: mass % -> mS/cm (CRC Handbook, "Electrical
 * conductivity of aqueous solutions") [S]; (0, 0) added. */
static const double nacl_w[] = {0.0, 0.5, 1.0, 2.0, 5.0, 10.0, 15.0, 20.0, 25.0};
static const double nacl_k[] = {0.0, 8.2, 16.0, 30.2, 70.1, 126.0, 171.0, 204.0, 222.0};
#define NACL_N (sizeof nacl_w / sizeof nacl_w[0])

/* Linear interpolation in the NaCl table; beyond 25 % the last segment's
 * slope continues (brine at halite saturation is about 26 %). */
static double nacl_cond20(double w_percent)
{
    size_t i = 1;
    while (i < NACL_N - 1 && w_percent > nacl_w[i])
        i++;
    double f = (w_percent - nacl_w[i - 1]) / (nacl_w[i] - nacl_w[i - 1]);
    return nacl_k[i - 1] + f * (nacl_k[i] - nacl_k[i - 1]);
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_brine_conductivity(double w_g_kg, double t_c, double *cond_ms_cm)
{
    if (!isfinite(w_g_kg) || !isfinite(t_c))
        return HC_ERR_NOT_FINITE;
    if (w_g_kg < 0.0)
        return HC_ERR_NEGATIVE;
    if (w_g_kg > 400.0)
        return HC_ERR_SALINITY_RANGE;
    if (t_c < -5.0 || t_c > 60.0)
        return HC_ERR_TEMPERATURE_RANGE;
    /* s = C(42,20,0) / kappa_NaCl,20(w42), see the header. */
    const double w42_percent = 42.0 * 35.16504 / 35.0 / 10.0;
    double s = 56.3278 / nacl_cond20(w42_percent);
    *cond_ms_cm = s * nacl_cond20(w_g_kg / 10.0) * (1.0 + HC_COND_ALPHA_PER_K * (t_c - 20.0));
    return HC_OK;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_cond_compensate(double cond_ms_cm, double t_c, double t_ref_c, double *cond_ref)
{
    if (!isfinite(cond_ms_cm) || !isfinite(t_c) || !isfinite(t_ref_c))
        return HC_ERR_NOT_FINITE;
    if (cond_ms_cm < 0.0)
        return HC_ERR_NEGATIVE;
    double f = 1.0 + HC_COND_ALPHA_PER_K * (t_c - t_ref_c);
    if (t_c < -5.0 || t_c > 60.0 || !(f > 0.0))
        return HC_ERR_TEMPERATURE_RANGE;
    *cond_ref = cond_ms_cm / f;
    return HC_OK;
}
