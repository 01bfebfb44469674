/* Propagation of uncertainty through a method (hc_uncertainty.h). */
#include <math.h>
#include <string.h>

#include "hc_uncertainty.h"

double hc_unc_from_accuracy(double half_width)
{
    return half_width / sqrt(3.0); /* GUM 4.3.7: rectangular, a/sqrt(3) */
}

double hc_unc_from_resolution(double resolution)
{
    return resolution / sqrt(12.0); /* GUM F.2.2.1: d/sqrt(12) */
}

double hc_unc_density_ref(const hc_brine_state *s)
{
    /* rho_ref = SG rho_w(t_ref), rho_w exact: u(rho_ref) = rho_w u(SG) [kg/m3] */
    return s->sg_uncertainty * s->density_ref_kg_m3 / s->specific_gravity;
}

void hc_unc_outputs(const hc_brine_state *s, double *y)
{
    y[HC_UNC_DENSITY] = s->density_kg_m3;
    y[HC_UNC_SG] = s->specific_gravity;
    y[HC_UNC_BAUME] = s->baume;
    y[HC_UNC_CF] = s->concentration_factor;
}

void hc_unc_store(const double *u_y, hc_brine_state *s)
{
    s->density_uncertainty_kg_m3 = u_y[HC_UNC_DENSITY];
    s->sg_uncertainty = u_y[HC_UNC_SG];
    s->baume_uncertainty = u_y[HC_UNC_BAUME];
    s->cf_uncertainty = u_y[HC_UNC_CF];
}

/* Returns HC_OK or an error listed in hc_uncertainty.h. */
hc_status hc_unc_propagate(hc_unc_method method, const void *ctx, const double *x,
                           const double *u_x, size_t n, double *u_y)
{
    if (n > HC_UNC_MAX_INPUTS)
        return HC_ERR_ARGUMENT;
    for (size_t i = 0; i < n; i++)
        if (!isfinite(u_x[i]) || u_x[i] < 0.0)
            return HC_ERR_ARGUMENT;
    double xs[HC_UNC_MAX_INPUTS] = {0}, y0[HC_UNC_OUTPUTS], yp[HC_UNC_OUTPUTS], ym[HC_UNC_OUTPUTS];
    double sum[HC_UNC_OUTPUTS] = {0};
    memcpy(xs, x, n * sizeof *x);
    hc_status st = method(xs, ctx, y0);
    if (st != HC_OK)
        return st;
    for (size_t i = 0; i < n; i++) {
        if (u_x[i] == 0.0)
            continue;
        xs[i] = x[i] + u_x[i];
        int up = method(xs, ctx, yp) == HC_OK;
        xs[i] = x[i] - u_x[i];
        int down = method(xs, ctx, ym) == HC_OK;
        xs[i] = x[i];
        for (int k = 0; k < HC_UNC_OUTPUTS; k++) {
            /* c_i u(x_i): central difference over +-u, else one-sided */
            double d;
            if (up && down && isfinite(yp[k]) && isfinite(ym[k]))
                d = 0.5 * (yp[k] - ym[k]);
            else if (up && isfinite(yp[k]))
                d = yp[k] - y0[k];
            else if (down && isfinite(ym[k]))
                d = y0[k] - ym[k];
            else
                d = NAN;
            sum[k] += d * d; /* GUM eq. 10, independent inputs */
        }
    }
    for (int k = 0; k < HC_UNC_OUTPUTS; k++)
        u_y[k] = isfinite(y0[k]) ? sqrt(sum[k]) : NAN;
    return HC_OK;
}
