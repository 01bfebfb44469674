/* Carbonate speciation at fixed pCO2 (see hc_carbonate.h for the model). */
#include <math.h>
#include <string.h>

#include "hc_carbonate.h"

#define LN10 2.302585092994046
#define MAX_PASSES 40       /* activity-coefficient passes */
#define PASS_TOL 1e-13      /* on ln gamma and ln a_w between passes */

/* Plummer & Busenberg (1982, GCA 46, 1011) Table 5 form:
 * log10 K = a + b T + c/T + d log10 T + e/T^2, T in K [from memory]. */
static double pb82(const double k[5], double tk)
{
    return k[0] + k[1] * tk + k[2] / tk + k[3] * log10(tk) + k[4] / (tk * tk);
}
static const double pb82_kh[5] = {108.3865, 0.01985076, -6919.53, -40.45154, 669365.0};
static const double pb82_k1[5] = {-356.3094, -0.06091964, 21834.37, 126.8339, -1684915.0};
static const double pb82_k2[5] = {-107.8871, -0.03252849, 5151.79, 38.92561, -563713.9};

/* HMW84 lambda(CO2, ion) [kg/mol], cations Na K Mg Ca, anions Cl SO4
 * (HMW84 Table 2 as transcribed in the pytzer library); HCO3/CO3 have none. */
static const double lambda_co2[HC_ION_COUNT] = {
    [HC_ION_NA] = 0.1, [HC_ION_K] = 0.051, [HC_ION_MG] = 0.183, [HC_ION_CA] = 0.183,
    [HC_ION_CL] = -0.005, [HC_ION_SO4] = 0.097,
};

/* Returns HC_OK, HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE or HC_ERR_ARGUMENT. */
hc_status hc_carbonate_params_at(double t_c, double log_p_co2, hc_carbonate_params *out)
{
    if (!isfinite(t_c) || !isfinite(log_p_co2))
        return HC_ERR_NOT_FINITE;
    if (t_c < -5.0 || t_c > 80.0)
        return HC_ERR_TEMPERATURE_RANGE;
    if (log_p_co2 < -8.0 || log_p_co2 > 0.0)
        return HC_ERR_ARGUMENT;
    double tk = t_c + 273.15, t0 = 298.15;
    /* 25 degC values (header), shifted by the PB82 change from 25 degC. */
    double log_kh = -1.468 + pb82(pb82_kh, tk) - pb82(pb82_kh, t0);
    double log_k1 = -6.352 + pb82(pb82_k1, tk) - pb82(pb82_k1, t0);
    double log_k2 = -10.329 + pb82(pb82_k2, tk) - pb82(pb82_k2, t0);
    memset(out, 0, sizeof *out);
    out->log_p_co2 = log_p_co2;
    out->ln_kh_pco2 = (log_kh + log_p_co2) * LN10;
    out->ln_k1 = log_k1 * LN10;
    out->ln_k2 = log_k2 * LN10;
    out->ln_k_caco3 = 3.151 * LN10;
    out->ln_k_mgco3 = 2.928 * LN10;
    return HC_OK;
}

/* Carbonate alkalinity as a function of s = sqrt(m CO3):
 * f(s) = ch s + 2 s^2 + 2 Ca kc s^2/(1 + kc s^2) + 2 Mg km s^2/(1 + km s^2) - A,
 * increasing in s, f(0) = -A. Safeguarded Newton in [0, hi]. */
static double solve_s(double ch, double ca, double kc, double mg, double km, double alk)
{
    double lo = 0.0, hi = (-ch + sqrt(ch * ch + 8.0 * alk)) / 4.0;
    double s = hi;
    for (int it = 0; it < 200; it++) {
        double x = s * s, dc = 1.0 + kc * x, dm = 1.0 + km * x;
        double f = ch * s + 2.0 * x + 2.0 * ca * kc * x / dc + 2.0 * mg * km * x / dm - alk;
        double df = ch + 4.0 * s + 4.0 * ca * kc * s / (dc * dc) + 4.0 * mg * km * s / (dm * dm);
        if (f > 0.0)
            hi = s;
        else
            lo = s;
        double next = s - f / df;
        if (!(next > lo && next < hi))
            next = 0.5 * (lo + hi);
        if (fabs(next - s) <= 1e-16 * s || hi - lo <= 1e-16 * hi)
            return next;
        s = next;
    }
    return s;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_carbonate_speciate(const hc_pitzer_params *p, const hc_carbonate_params *c,
                                const double total[HC_ION_COUNT], double free_m[HC_ION_COUNT],
                                hc_pitzer_result *r, hc_carbonate_result *cr)
{
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (!isfinite(total[i]))
            return HC_ERR_NOT_FINITE;
        if (total[i] < 0.0)
            return HC_ERR_NEGATIVE;
    }
    double alk = total[HC_ION_HCO3] + 2.0 * total[HC_ION_CO3];
    double ca_t = total[HC_ION_CA], mg_t = total[HC_ION_MG];
    memcpy(free_m, total, sizeof(double) * HC_ION_COUNT);
    hc_carbonate_result res = {.ph = NAN, .alkalinity = alk};
    if (!(alk > 0.0)) {
        hc_status st = hc_pitzer_eval(p, free_m, r);
        if (cr != NULL)
            *cr = res;
        return st;
    }
    /* First pass: everything as bicarbonate. */
    free_m[HC_ION_HCO3] = alk;
    free_m[HC_ION_CO3] = 0.0;
    hc_status st = hc_pitzer_eval(p, free_m, r);
    if (st != HC_OK)
        return st;
    double prev[4] = {NAN, NAN, NAN, NAN};
    for (int pass = 1; pass <= MAX_PASSES; pass++) {
        double lg_hco3 = r->ln_gamma[HC_ION_HCO3], lg_co3 = r->ln_gamma[HC_ION_CO3];
        double ln_aw = log(r->water_activity);
        /* ln a(H+)^2 = ln K1 K2 a(CO2) a_w - ln a(CO3); m(HCO3) = ch sqrt(m CO3). */
        double ln_k1co2 = c->ln_k1 + c->ln_kh_pco2 + ln_aw;
        double ch = exp(0.5 * (ln_k1co2 + lg_co3 - c->ln_k2) - lg_hco3);
        double kc = exp(c->ln_k_caco3 + r->ln_gamma[HC_ION_CA] + lg_co3);
        double km = exp(c->ln_k_mgco3 + r->ln_gamma[HC_ION_MG] + lg_co3);
        double s = solve_s(ch, ca_t, kc, mg_t, km, alk);
        double x = s * s;
        res.caco3_pair = ca_t * kc * x / (1.0 + kc * x);
        res.mgco3_pair = mg_t * km * x / (1.0 + km * x);
        free_m[HC_ION_CO3] = x;
        free_m[HC_ION_HCO3] = ch * s;
        free_m[HC_ION_CA] = ca_t - res.caco3_pair;
        free_m[HC_ION_MG] = mg_t - res.mgco3_pair;
        double ln_ah = 0.5 * (ln_k1co2 + c->ln_k2 - log(x) - lg_co3);
        res.ph = -ln_ah / LN10;
        res.iterations = pass;
        st = hc_pitzer_eval(p, free_m, r);
        if (st != HC_OK)
            return st;
        double now[4] = {r->ln_gamma[HC_ION_HCO3], r->ln_gamma[HC_ION_CO3],
                         r->ln_gamma[HC_ION_CA] + r->ln_gamma[HC_ION_MG],
                         log(r->water_activity)};
        double change = 0.0;
        for (int k = 0; k < 4; k++)
            change = fmax(change, fabs(now[k] - prev[k]));
        memcpy(prev, now, sizeof prev);
        if (change < PASS_TOL && pass > 1)
            break;
        if (pass == MAX_PASSES)
            return HC_ERR_NO_CONVERGENCE;
    }
    /* CO2(aq): ln gamma = 2 sum lambda_i m_i (HMW84, neutral species). */
    double lg_co2 = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        lg_co2 += 2.0 * lambda_co2[i] * free_m[i];
    res.co2 = exp(c->ln_kh_pco2 - lg_co2);
    res.dic = res.co2 + free_m[HC_ION_HCO3] + free_m[HC_ION_CO3] + res.caco3_pair +
              res.mgco3_pair;
    if (cr != NULL)
        *cr = res;
    return HC_OK;
}
