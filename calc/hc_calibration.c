#include <math.h>
#include <string.h>

#include "hc_brine_cond.h"
#include "hc_calibration.h"
#include "hc_state.h"

/* Returns HC_OK or an error listed in the header. */
hc_status hc_calibration_fit(const hc_calibration_point *points, size_t n, double t_ref_c,
                             hc_calibration *out)
{
    if (n < 2 || n > HC_CALIBRATION_MAX)
        return HC_ERR_ARGUMENT;
    if (!isfinite(t_ref_c))
        return HC_ERR_NOT_FINITE;
    double x[HC_CALIBRATION_MAX], y[HC_CALIBRATION_MAX];
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(points[i].sg))
            return HC_ERR_NOT_FINITE;
        if (points[i].sg < 0.9 || points[i].sg > 1.6)
            return HC_ERR_ARGUMENT;
        hc_status st = hc_cond_compensate(points[i].cond_ms_cm, points[i].temp_c, 25.0, &x[i]);
        if (st != HC_OK)
            return st;
        y[i] = points[i].sg;
    }
    /* Insertion sort by conductivity (n <= 64). */
    for (size_t i = 1; i < n; i++)
        for (size_t j = i; j > 0 && x[j - 1] > x[j]; j--) {
            double t = x[j]; x[j] = x[j - 1]; x[j - 1] = t;
            t = y[j]; y[j] = y[j - 1]; y[j - 1] = t;
        }
    /* Pool adjacent violators: blocks with mean x, mean y and weight. */
    double bx[HC_CALIBRATION_MAX], by[HC_CALIBRATION_MAX], bw[HC_CALIBRATION_MAX];
    size_t nb = 0;
    for (size_t i = 0; i < n; i++) {
        bx[nb] = x[i]; by[nb] = y[i]; bw[nb] = 1.0; nb++;
        while (nb > 1 && (by[nb - 2] > by[nb - 1] || bx[nb - 2] >= bx[nb - 1])) {
            double w = bw[nb - 2] + bw[nb - 1];
            bx[nb - 2] = (bx[nb - 2] * bw[nb - 2] + bx[nb - 1] * bw[nb - 1]) / w;
            by[nb - 2] = (by[nb - 2] * bw[nb - 2] + by[nb - 1] * bw[nb - 1]) / w;
            bw[nb - 2] = w;
            nb--;
        }
    }
    if (nb < 2)
        return HC_ERR_ARGUMENT;
    memset(out, 0, sizeof *out);
    out->knots = nb;
    memcpy(out->cond25, bx, nb * sizeof bx[0]);
    memcpy(out->sg, by, nb * sizeof by[0]);
    out->t_ref_c = t_ref_c;
    double ss = 0.0;
    for (size_t i = 0; i < n; i++) {
        double fit;
        hc_calibration_sg(out, x[i], 25.0, &fit, NULL);
        ss += (fit - y[i]) * (fit - y[i]);
    }
    out->rms_residual = sqrt(ss / (double)n);
    return HC_OK;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_calibration_sg(const hc_calibration *cal, double cond_ms_cm, double t_c, double *sg,
                            unsigned *warnings)
{
    double k25;
    hc_status st = hc_cond_compensate(cond_ms_cm, t_c, 25.0, &k25);
    if (st != HC_OK)
        return st;
    size_t n = cal->knots, i = 1;
    while (i < n - 1 && k25 > cal->cond25[i])
        i++;
    double f = (k25 - cal->cond25[i - 1]) / (cal->cond25[i] - cal->cond25[i - 1]);
    *sg = cal->sg[i - 1] + f * (cal->sg[i] - cal->sg[i - 1]);
    if (warnings != NULL && (k25 < cal->cond25[0] || k25 > cal->cond25[n - 1]))
        *warnings |= HC_WARN_CALIBRATION_EXTRAPOLATED;
    return HC_OK;
}
