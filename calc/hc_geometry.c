/* Pond geometry: stage-storage tables and simple prismatic ponds. */
#include "hc_geometry.h"

#include <math.h>

/* Error convention: hc_status (see hc_geometry.h). */
hc_status hc_stage_table_check(const hc_stage_table *t, size_t *bad_row)
{
    size_t dummy;
    if (bad_row == NULL)
        bad_row = &dummy;
    *bad_row = 0;
    if (t == NULL || t->level_m == NULL || t->volume_m3 == NULL || t->n < 2)
        return HC_ERR_ARGUMENT;
    for (size_t i = 0; i < t->n; i++) {
        *bad_row = i;
        if (!isfinite(t->level_m[i]) || !isfinite(t->volume_m3[i]))
            return HC_ERR_NOT_FINITE;
        if (t->volume_m3[i] < 0)
            return HC_ERR_NEGATIVE;
        if (t->area_m2 != NULL) {
            if (!isfinite(t->area_m2[i]))
                return HC_ERR_NOT_FINITE;
            if (t->area_m2[i] < 0)
                return HC_ERR_NEGATIVE;
        }
        if (i == 0)
            continue;
        if (!(t->level_m[i] > t->level_m[i - 1]))
            return HC_ERR_ARGUMENT;
        if (!(t->volume_m3[i] > t->volume_m3[i - 1]))
            return HC_ERR_ARGUMENT;
    }
    *bad_row = 0;
    return HC_OK;
}

/* Index k of the interval [h_k, h_k+1] holding h (binary search). */
static size_t table_interval(const hc_stage_table *t, double h)
{
    size_t lo = 0, hi = t->n - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (t->level_m[mid] <= h)
            lo = mid;
        else
            hi = mid;
    }
    return lo;
}

static double secant(const hc_stage_table *t, size_t k)
{
    return (t->volume_m3[k + 1] - t->volume_m3[k]) / (t->level_m[k + 1] - t->level_m[k]);
}

/* One-sided slope at an end node from the two nearest secants d0 (at the
 * end) and d1, widths w0 and w1: the three-point formula, clipped to
 * [0, 3 d0] so the end interval stays monotone (Fritsch & Carlson 1980;
 * the end rule PCHIP uses). */
static double end_slope(double w0, double w1, double d0, double d1)
{
    double m = ((2 * w0 + w1) * d0 - w0 * d1) / (w0 + w1);
    if (m * d0 <= 0)
        return 0;
    if (d0 * d1 <= 0 && fabs(m) > 3 * fabs(d0))
        return 3 * d0;
    return m;
}

/* Slope dV/dh at node k: the weighted harmonic mean of the neighbouring
 * secants (Fritsch & Butland 1984, SIAM J. Sci. Stat. Comput. 5, 300, the
 * rule PCHIP uses); it never exceeds 3 times the smaller secant, which keeps
 * every interval inside Fritsch & Carlson's (1980) monotone region.
 * Computed per call: no storage. */
static double node_slope(const hc_stage_table *t, size_t k)
{
    size_t n = t->n;
    if (n == 2)
        return secant(t, 0);
    if (k == 0)
        return end_slope(t->level_m[1] - t->level_m[0], t->level_m[2] - t->level_m[1],
                         secant(t, 0), secant(t, 1));
    if (k == n - 1)
        return end_slope(t->level_m[n - 1] - t->level_m[n - 2],
                         t->level_m[n - 2] - t->level_m[n - 3], secant(t, n - 2),
                         secant(t, n - 3));
    double d0 = secant(t, k - 1), d1 = secant(t, k);
    if (d0 <= 0 || d1 <= 0)
        return 0;
    double w0 = t->level_m[k] - t->level_m[k - 1];
    double w1 = t->level_m[k + 1] - t->level_m[k];
    double a = 2 * w1 + w0, b = w1 + 2 * w0;
    return (a + b) / (a / d0 + b / d1);
}

/* Cubic Hermite on interval k at h: volume and its slope. */
static void hermite(const hc_stage_table *t, size_t k, double h, double *v, double *dv)
{
    double h0 = t->level_m[k], w = t->level_m[k + 1] - h0;
    double s = (h - h0) / w;
    double v0 = t->volume_m3[k], v1 = t->volume_m3[k + 1];
    double m0 = node_slope(t, k), m1 = node_slope(t, k + 1);
    double s2 = s * s, s3 = s2 * s;
    double h00 = 2 * s3 - 3 * s2 + 1, h10 = s3 - 2 * s2 + s;
    double h01 = -2 * s3 + 3 * s2, h11 = s3 - s2;
    *v = h00 * v0 + h10 * w * m0 + h01 * v1 + h11 * w * m1;
    double d00 = 6 * s2 - 6 * s, d10 = 3 * s2 - 4 * s + 1;
    double d01 = -6 * s2 + 6 * s, d11 = 3 * s2 - 2 * s;
    *dv = (d00 * v0 + d01 * v1) / w + d10 * m0 + d11 * m1;
}

hc_status hc_stage_table_at_level(const hc_stage_table *t, double h_m, double *volume_m3,
                                  double *area_m2)
{
    if (t == NULL || t->n < 2)
        return HC_ERR_ARGUMENT;
    if (!isfinite(h_m))
        return HC_ERR_NOT_FINITE;
    if (h_m < t->level_m[0] || h_m > t->level_m[t->n - 1])
        return HC_ERR_DOMAIN;
    size_t k = table_interval(t, h_m);
    if (k >= t->n - 1)
        k = t->n - 2;
    double v, dv;
    hermite(t, k, h_m, &v, &dv);
    if (volume_m3 != NULL)
        *volume_m3 = v;
    if (area_m2 != NULL) {
        if (t->area_m2 != NULL) {
            double s = (h_m - t->level_m[k]) / (t->level_m[k + 1] - t->level_m[k]);
            *area_m2 = t->area_m2[k] + s * (t->area_m2[k + 1] - t->area_m2[k]);
        } else {
            *area_m2 = dv > 0 ? dv : 0;
        }
    }
    return HC_OK;
}

hc_status hc_stage_table_level_of_volume(const hc_stage_table *t, double v_m3, double *h_m)
{
    if (t == NULL || t->n < 2 || h_m == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3))
        return HC_ERR_NOT_FINITE;
    if (v_m3 < t->volume_m3[0] || v_m3 > t->volume_m3[t->n - 1])
        return HC_ERR_DOMAIN;
    /* The interval by volume, then bisection inside it: the interpolant is
     * monotone, so this converges; 64 halvings reach below 1e-9 m for any
     * interval under 1.8e10 m. */
    size_t lo = 0, hi = t->n - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (t->volume_m3[mid] <= v_m3)
            lo = mid;
        else
            hi = mid;
    }
    double a = t->level_m[lo], b = t->level_m[lo + 1];
    for (int i = 0; i < 64 && b - a > 1e-9; i++) {
        double m = 0.5 * (a + b), v, dv;
        hermite(t, lo, m, &v, &dv);
        if (v < v_m3)
            a = m;
        else
            b = m;
    }
    *h_m = 0.5 * (a + b);
    return HC_OK;
}

hc_status hc_prism_check(const hc_prism *p)
{
    if (p == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(p->floor_area_m2) || !isfinite(p->floor_perimeter_m) ||
        !isfinite(p->side_slope) || !isfinite(p->max_level_m))
        return HC_ERR_NOT_FINITE;
    if (p->floor_area_m2 < 0 || p->floor_perimeter_m < 0 || p->side_slope < 0 ||
        p->max_level_m < 0)
        return HC_ERR_NEGATIVE;
    if (p->floor_area_m2 == 0 || p->max_level_m == 0)
        return HC_ERR_ARGUMENT;
    /* A rectangle of area A has perimeter at least 4 sqrt(A) (the square). */
    if (p->floor_perimeter_m > 0 && p->floor_perimeter_m < 4 * sqrt(p->floor_area_m2) * (1 - 1e-9))
        return HC_ERR_DOMAIN;
    return HC_OK;
}

static double prism_perimeter(const hc_prism *p)
{
    return p->floor_perimeter_m > 0 ? p->floor_perimeter_m : 4 * sqrt(p->floor_area_m2);
}

hc_status hc_prism_at_level(const hc_prism *p, double h_m, double *volume_m3, double *area_m2)
{
    hc_status st = hc_prism_check(p);
    if (st != HC_OK)
        return st;
    if (!isfinite(h_m))
        return HC_ERR_NOT_FINITE;
    if (h_m < 0 || h_m > p->max_level_m)
        return HC_ERR_DOMAIN;
    double a0 = p->floor_area_m2, p0 = prism_perimeter(p), s = p->side_slope;
    /* Each side moves out by s h: A = (L + 2sh)(W + 2sh) = A0 + s P0 h + 4 s^2 h^2 [m2]. */
    if (area_m2 != NULL)
        *area_m2 = a0 + s * p0 * h_m + 4 * s * s * h_m * h_m;
    /* V = integral of A dh [m3]. */
    if (volume_m3 != NULL)
        *volume_m3 = a0 * h_m + 0.5 * s * p0 * h_m * h_m + (4.0 / 3.0) * s * s * h_m * h_m * h_m;
    return HC_OK;
}

hc_status hc_prism_level_of_volume(const hc_prism *p, double v_m3, double *h_m)
{
    hc_status st = hc_prism_check(p);
    if (st != HC_OK)
        return st;
    if (h_m == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(v_m3))
        return HC_ERR_NOT_FINITE;
    double vmax;
    hc_prism_at_level(p, p->max_level_m, &vmax, NULL);
    if (v_m3 < 0 || v_m3 > vmax)
        return HC_ERR_DOMAIN;
    double lo = 0, hi = p->max_level_m, h = v_m3 / p->floor_area_m2;
    if (h > hi)
        h = hi;
    for (int i = 0; i < 60; i++) {
        double v, a;
        hc_prism_at_level(p, h, &v, &a);
        double f = v - v_m3;
        if (f < 0)
            lo = h;
        else
            hi = h;
        if (fabs(f) <= 1e-12 * (vmax + 1) || hi - lo < 1e-9)
            break;
        double next = h - f / a;
        h = (next > lo && next < hi) ? next : 0.5 * (lo + hi);
    }
    *h_m = h;
    return HC_OK;
}

hc_status hc_shape_at_level(const hc_pond_shape *s, double h_m, double *volume_m3,
                            double *area_m2)
{
    if (s == NULL)
        return HC_ERR_ARGUMENT;
    return s->is_table ? hc_stage_table_at_level(&s->table, h_m, volume_m3, area_m2)
                       : hc_prism_at_level(&s->prism, h_m, volume_m3, area_m2);
}

hc_status hc_shape_level_of_volume(const hc_pond_shape *s, double v_m3, double *h_m)
{
    if (s == NULL)
        return HC_ERR_ARGUMENT;
    return s->is_table ? hc_stage_table_level_of_volume(&s->table, v_m3, h_m)
                       : hc_prism_level_of_volume(&s->prism, v_m3, h_m);
}

double hc_shape_max_level(const hc_pond_shape *s)
{
    if (s == NULL)
        return NAN;
    if (s->is_table)
        return s->table.n > 0 ? s->table.level_m[s->table.n - 1] : NAN;
    return s->prism.max_level_m;
}
