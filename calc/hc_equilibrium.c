#include <math.h>
#include <string.h>

#include "hc_equilibrium.h"

#define MAXA HC_MINERAL_COUNT
#define SI_TOL 1e-10       /* convergence on every |SI| (log10 units) */
#define SUPERSAT_TOL 1e-7  /* a mineral absent with SI above this joins */
#define MAX_NEWTON 60
#define MAX_OUTER 80

struct problem {
    const hc_pitzer_params *pitzer;
    const hc_mineral_set *set;
    const double *base_mol;
    double base_water;
    int list[MAXA]; /* minerals present */
    int count;
    int carbonate;  /* speciate at the set's pCO2 (alkalinity in the CO3 slot) */
};

/* Dissolved amounts and water for amounts n[] of the present minerals.
 * Returns 0 when every amount and the water stay positive. */
static int composition(const struct problem *p, const double n[], double mol[HC_ION_COUNT],
                       double *water)
{
    double w = p->base_water;
    for (int i = 0; i < HC_ION_COUNT; i++)
        mol[i] = p->base_mol[i];
    for (int k = 0; k < p->count; k++) {
        hc_mineral m = (hc_mineral)p->list[k];
        for (int i = 0; i < HC_ION_COUNT; i++)
            mol[i] -= hc_mineral_ion_coeff(m, (hc_ion)i) * n[k];
        w -= HC_WATER_KG_PER_MOL * hc_mineral_water(m) * n[k];
    }
    *water = w;
    if (!(w > 0.0))
        return -1;
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (mol[i] < 0.0 && p->base_mol[i] >= 0.0) {
            if (mol[i] < -1e-300)
                return -1;
            mol[i] = 0.0;
        }
    return 0;
}

/* Residuals SI of the present minerals; optionally the full state. */
static hc_status residuals(const struct problem *p, const double n[], double f[],
                           hc_equilibrium *state)
{
    double mol[HC_ION_COUNT], water, total[HC_ION_COUNT], m[HC_ION_COUNT];
    if (composition(p, n, mol, &water) != 0)
        return HC_ERR_DOMAIN;
    for (int i = 0; i < HC_ION_COUNT; i++)
        total[i] = mol[i] / water;
    hc_pitzer_result r;
    hc_carbonate_result cr = {.ph = NAN};
    hc_status st;
    if (p->carbonate) {
        st = hc_carbonate_speciate(p->pitzer, &p->set->carbonate, total, m, &r, &cr);
    } else {
        memcpy(m, total, sizeof m);
        st = hc_pitzer_eval(p->pitzer, m, &r);
    }
    if (st != HC_OK)
        return st;
    for (int k = 0; k < p->count; k++) {
        hc_mineral mn = (hc_mineral)p->list[k];
        f[k] = hc_mineral_log_iap(mn, m, &r) - p->set->log_k[mn];
        if (!isfinite(f[k]))
            return HC_ERR_DOMAIN;
    }
    if (state != NULL) {
        memcpy(state->molality, m, sizeof m);
        memcpy(state->total, total, sizeof total);
        state->carbonate = cr;
        state->water_kg = water;
        state->pitzer = r;
        hc_saturation_indices(p->set, m, &r, state->saturation_index);
    }
    return HC_OK;
}

static double norm2(const double f[], int count)
{
    double s = 0.0;
    for (int k = 0; k < count; k++)
        s += f[k] * f[k];
    return s;
}

/* Solves a x = b by Gaussian elimination with partial pivoting (a is
 * overwritten). Returns -1 when a is singular to working precision. */
static int solve_linear(double a[MAXA][MAXA], double b[MAXA], int count)
{
    for (int c = 0; c < count; c++) {
        int piv = c;
        for (int r = c + 1; r < count; r++)
            if (fabs(a[r][c]) > fabs(a[piv][c]))
                piv = r;
        if (fabs(a[piv][c]) < 1e-12)
            return -1;
        if (piv != c) {
            for (int k = 0; k < count; k++) {
                double t = a[c][k]; a[c][k] = a[piv][k]; a[piv][k] = t;
            }
            double t = b[c]; b[c] = b[piv]; b[piv] = t;
        }
        for (int r = c + 1; r < count; r++) {
            double fct = a[r][c] / a[c][c];
            for (int k = c; k < count; k++)
                a[r][k] -= fct * a[c][k];
            b[r] -= fct * b[c];
        }
    }
    for (int r = count - 1; r >= 0; r--) {
        double s = b[r];
        for (int k = r + 1; k < count; k++)
            s -= a[r][k] * b[k];
        b[r] = s / a[r][r];
    }
    return 0;
}

/* Largest fraction of the step dn that keeps every dissolved amount above a
 * tenth of its current value and the water above half of it. */
static double step_limit(const struct problem *p, const double n[], const double dn[])
{
    double mol[HC_ION_COUNT], water;
    composition(p, n, mol, &water);
    double lambda = 1.0;
    for (int i = 0; i < HC_ION_COUNT; i++) {
        double d = 0.0;
        for (int k = 0; k < p->count; k++)
            d += hc_mineral_ion_coeff((hc_mineral)p->list[k], (hc_ion)i) * dn[k];
        if (d > 0.0 && d > 0.9 * mol[i])
            lambda = fmin(lambda, 0.9 * mol[i] / d);
    }
    double dw = 0.0;
    for (int k = 0; k < p->count; k++)
        dw += HC_WATER_KG_PER_MOL * hc_mineral_water((hc_mineral)p->list[k]) * dn[k];
    if (dw > 0.5 * water)
        lambda = fmin(lambda, 0.5 * water / dw);
    return lambda;
}

/* Damped Newton for the present minerals. n[] may turn negative (the caller
 * then drops that mineral). Returns HC_OK, HC_ERR_NO_CONVERGENCE (including
 * a singular Jacobian) or an evaluation error. */
static hc_status newton(const struct problem *p, double n[], int *iterations)
{
    double f[MAXA];
    hc_status st = residuals(p, n, f, NULL);
    if (st != HC_OK)
        return st;
    for (int it = 0; it < MAX_NEWTON; it++) {
        double fn = norm2(f, p->count);
        double worst_f = 0.0;
        for (int k = 0; k < p->count; k++)
            worst_f = fmax(worst_f, fabs(f[k]));
        if (worst_f < SI_TOL)
            return HC_OK;
        (*iterations)++;
        /* Jacobian by forward differences, step scaled to the smallest
         * dissolved constituent of each mineral. */
        double jac[MAXA][MAXA], mol[HC_ION_COUNT], water;
        composition(p, n, mol, &water);
        for (int k = 0; k < p->count; k++) {
            hc_mineral mn = (hc_mineral)p->list[k];
            double h = HUGE_VAL;
            for (int i = 0; i < HC_ION_COUNT; i++) {
                int nu = hc_mineral_ion_coeff(mn, (hc_ion)i);
                if (nu > 0)
                    h = fmin(h, mol[i] / nu);
            }
            h *= 1e-7;
            double save = n[k], fp[MAXA];
            n[k] = save + h;
            st = residuals(p, n, fp, NULL);
            n[k] = save;
            if (st != HC_OK)
                return st;
            for (int r = 0; r < p->count; r++)
                jac[r][k] = (fp[r] - f[r]) / h;
        }
        double dn[MAXA];
        for (int k = 0; k < p->count; k++)
            dn[k] = -f[k];
        if (solve_linear(jac, dn, p->count) != 0)
            return HC_ERR_NO_CONVERGENCE;
        double lambda = step_limit(p, n, dn);
        double trial[MAXA], ft[MAXA];
        for (;;) {
            for (int k = 0; k < p->count; k++)
                trial[k] = n[k] + lambda * dn[k];
            st = residuals(p, trial, ft, NULL);
            if (st == HC_OK && norm2(ft, p->count) <= fn * (1.0 - 1e-4 * lambda))
                break;
            lambda *= 0.5;
            if (lambda < 1e-8)
                return HC_ERR_NO_CONVERGENCE;
        }
        memcpy(n, trial, sizeof(double) * (size_t)p->count);
        memcpy(f, ft, sizeof(double) * (size_t)p->count);
    }
    return HC_ERR_NO_CONVERGENCE;
}

/* Scales the amounts down, as little as needed, until every dissolved
 * amount and the water stay positive (the brine alone always qualifies).
 * Used after a mineral leaves the assemblage with a negative amount, whose
 * ions the others may have been borrowing. */
static void make_feasible(const struct problem *p, double amount[])
{
    double mol[HC_ION_COUNT], water, trial[MAXA];
    if (composition(p, amount, mol, &water) == 0) {
        int positive = 1;
        for (int i = 0; i < HC_ION_COUNT; i++)
            positive &= !(p->base_mol[i] > 0.0) || mol[i] > 0.0;
        if (positive)
            return;
    }
    double lo = 0.0, hi = 1.0;
    for (int it = 0; it < 50; it++) {
        double mid = 0.5 * (lo + hi);
        for (int k = 0; k < p->count; k++)
            trial[k] = amount[k] * mid;
        int ok = composition(p, trial, mol, &water) == 0;
        for (int i = 0; ok && i < HC_ION_COUNT; i++)
            ok = !(p->base_mol[i] > 0.0) || mol[i] > 0.0;
        if (ok)
            lo = mid;
        else
            hi = mid;
    }
    for (int k = 0; k < p->count; k++)
        amount[k] *= lo * (1.0 - 1e-6);
}

/* Minerals with the same ions (hydrates, polymorphs) coexist only where
 * the water activity is fixed by the pair. */
static int same_ions(hc_mineral a, hc_mineral b)
{
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (hc_mineral_ion_coeff(a, (hc_ion)i) != hc_mineral_ion_coeff(b, (hc_ion)i))
            return 0;
    return 1;
}

/* Returns HC_OK or an error listed in the header. */
hc_status hc_equilibrate(const hc_pitzer_params *pitzer, const hc_mineral_set *set,
                         const double base_mol[HC_ION_COUNT], double base_water_kg,
                         unsigned char present[HC_MINERAL_COUNT], double n[HC_MINERAL_COUNT],
                         hc_equilibrium *out)
{
    if (!isfinite(base_water_kg))
        return HC_ERR_NOT_FINITE;
    if (!(base_water_kg > 0.0))
        return HC_ERR_DOMAIN;
    for (int i = 0; i < HC_ION_COUNT; i++) {
        if (!isfinite(base_mol[i]))
            return HC_ERR_NOT_FINITE;
        if (base_mol[i] < 0.0)
            return HC_ERR_NEGATIVE;
    }
    /* Open to CO2: alkalinity is what is conserved, held as CO3
     * equivalents so that CaCO3 can draw on all of it. */
    double base[HC_ION_COUNT];
    memcpy(base, base_mol, sizeof base);
    int carbonate = set->open_to_co2 && base[HC_ION_HCO3] + base[HC_ION_CO3] > 0.0;
    if (carbonate) {
        base[HC_ION_CO3] += 0.5 * base[HC_ION_HCO3];
        base[HC_ION_HCO3] = 0.0;
    }
    struct problem p = {pitzer, set, base, base_water_kg, {0}, 0, carbonate};
    double amount[MAXA];
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        if (present[m] && set->enabled[m]) {
            p.list[p.count] = m;
            amount[p.count++] = fmax(0.0, n[m]);
        }
    /* A guess that would use up an ion or the water is cut back. */
    make_feasible(&p, amount);
    out->iterations = 0;
    unsigned char blocked[HC_MINERAL_COUNT] = {0}, swapped[HC_MINERAL_COUNT] = {0};
    int restarted = 0, joined = -1;
    hc_status st = HC_OK;
    for (int outer = 0; outer < MAX_OUTER; outer++) {
        st = newton(&p, amount, &out->iterations);
        if (st != HC_OK && !restarted) {
            /* The guessed assemblage does not solve: start again from the
             * brine alone and let minerals join one at a time. */
            restarted = 1;
            p.count = 0;
            continue;
        }
        if (st != HC_OK) {
            if (p.count == 0)
                return st;
            for (int k = 0; k < p.count; k++)
                amount[k] = fmax(0.0, amount[k]);
            /* A newcomer that shares its ions with a mineral present (a
             * hydrate of it) may be unable to coexist with it here: try it
             * in that mineral's place once. Otherwise restart without it. */
            int last = p.list[p.count - 1], partner = -1;
            for (int k = 0; k < p.count - 1; k++)
                if (same_ions((hc_mineral)p.list[k], (hc_mineral)last))
                    partner = k;
            if (partner >= 0 && !swapped[last]) {
                swapped[last] = 1;
                for (int k = partner; k < p.count - 1; k++) {
                    p.list[k] = p.list[k + 1];
                    amount[k] = amount[k + 1];
                }
                p.count--;
                continue;
            }
            blocked[last] = 1;
            joined = -1;
            p.count--;
            continue;
        }
        /* A newcomer that solved changes the brine enough to give every
         * mineral left out a new chance. */
        if (joined >= 0) {
            memset(blocked, 0, sizeof blocked);
            joined = -1;
        }
        /* Drop the most negative amount, if any. */
        int worst = -1;
        for (int k = 0; k < p.count; k++)
            if (amount[k] < 0.0 && (worst < 0 || amount[k] < amount[worst]))
                worst = k;
        if (worst >= 0) {
            for (int k = worst; k < p.count - 1; k++) {
                p.list[k] = p.list[k + 1];
                amount[k] = amount[k + 1];
            }
            p.count--;
            make_feasible(&p, amount);
            continue;
        }
        /* Add the most supersaturated absent mineral, if any, ranked by SI
         * per ion in its formula so that a many-ion double salt does not
         * jump ahead of the simple salts far from equilibrium. */
        double f[MAXA];
        st = residuals(&p, amount, f, out);
        if (st != HC_OK)
            return st;
        int best = -1;
        double best_score = 0.0;
        for (int m = 0; m < HC_MINERAL_COUNT; m++) {
            if (!set->enabled[m] || blocked[m] || !(out->saturation_index[m] > SUPERSAT_TOL))
                continue;
            int in = 0, ions = 0;
            for (int k = 0; k < p.count; k++)
                in |= p.list[k] == m;
            for (int i = 0; i < HC_ION_COUNT; i++)
                ions += hc_mineral_ion_coeff((hc_mineral)m, (hc_ion)i);
            double score = out->saturation_index[m] / ions;
            if (!in && score > best_score) {
                best_score = score;
                best = m;
            }
        }
        if (best < 0) {
            /* A mineral left out because it would not balance, yet
             * supersaturated, means no equilibrium was found. */
            for (int m = 0; m < HC_MINERAL_COUNT; m++)
                if (set->enabled[m] && blocked[m] && out->saturation_index[m] > 1e-6) {
                    int in = 0;
                    for (int k = 0; k < p.count; k++)
                        in |= p.list[k] == m;
                    if (!in)
                        return HC_ERR_NO_CONVERGENCE;
                }
            memset(present, 0, HC_MINERAL_COUNT);
            for (int m = 0; m < HC_MINERAL_COUNT; m++)
                n[m] = 0.0;
            for (int k = 0; k < p.count; k++) {
                present[p.list[k]] = 1;
                n[p.list[k]] = amount[k];
            }
            return HC_OK;
        }
        p.list[p.count] = best;
        amount[p.count++] = 0.0;
        joined = best;
    }
    return HC_ERR_NO_CONVERGENCE;
}
