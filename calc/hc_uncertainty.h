/* Standard uncertainty of a brine state, propagated through the method that
 * computed it.
 *
 * GUM (JCGM 100:2008, "Evaluation of measurement data - Guide to the
 * expression of uncertainty in measurement"):
 *  - inputs are independent; the combined standard uncertainty of each
 *    output y is u_c(y) = sqrt(sum_i (c_i u(x_i))^2)   (eq. 10);
 *  - the sensitivity c_i = dy/dx_i is taken by finite differences through
 *    the same function that computed y (5.1.3, note 2): central, with the
 *    step equal to u(x_i) itself, so c_i u(x_i) = (y(x+u) - y(x-u)) / 2.
 *    A step as large as the uncertainty keeps the curvature a first-order
 *    derivative would miss (near halite a conductivity model's slope
 *    changes within one u). Where one side leaves the method's range the
 *    one-sided difference is used; where both do the output is unknown.
 *  - an instrument's stated accuracy +-a is taken as the half-width of a
 *    rectangular distribution, u = a / sqrt(3) (4.3.7); a reading's
 *    resolution d as u = d / sqrt(12) (F.2.2.1).
 * Uncertainties are standard (coverage factor k = 1); a decision that needs
 * about 95 % confidence multiplies them by 2 (GUM 6.2, 6.3).
 *
 * Error convention: hc_status (HC_OK = 0). Pure: no allocation (inputs
 * are copied into a fixed array of HC_UNC_MAX_INPUTS), no globals. */
#ifndef HC_UNCERTAINTY_H
#define HC_UNCERTAINTY_H

#include <stddef.h>

#include "hc_state.h"
#include "hc_status.h"

#define HC_UNC_MAX_INPUTS 8

/* The outputs whose uncertainty a state carries. */
typedef enum {
    HC_UNC_DENSITY,  /* [kg/m3] at the sample temperature */
    HC_UNC_SG,       /* [1] at t_ref/t_ref */
    HC_UNC_BAUME,    /* [deg Be] */
    HC_UNC_CF,       /* [1] */
    HC_UNC_OUTPUTS
} hc_unc_output;

/* A method as a function of its inputs x[0..n-1]: fills y[HC_UNC_OUTPUTS]
 * (NaN where the method gives no value). ctx is whatever the method needs
 * (path, calibration, options); it is only read. */
typedef hc_status (*hc_unc_method)(const double *x, const void *ctx, double *y);

/* Combined standard uncertainties u_y[HC_UNC_OUTPUTS] of the method's
 * outputs at x, for inputs of standard uncertainty u_x (n <= HC_UNC_MAX_INPUTS;
 * an input with u_x = 0 contributes nothing). An output that the method
 * leaves NaN at x is NaN; an input whose every step fails makes every
 * output it touches NaN (unknown, never zero).
 * HC_ERR_ARGUMENT (n too large, negative or non-finite u), or the method's
 * own error at x itself; else HC_OK. */
hc_status hc_unc_propagate(hc_unc_method method, const void *ctx, const double *x,
                           const double *u_x, size_t n, double *u_y);

/* u = a / sqrt(3): rectangular distribution of half-width a (GUM 4.3.7). */
double hc_unc_from_accuracy(double half_width);
/* u = d / sqrt(12): a reading's resolution d (GUM F.2.2.1). */
double hc_unc_from_resolution(double resolution);

/* Copies u_y into the state's uncertainty fields. */
void hc_unc_store(const double *u_y, hc_brine_state *state);
/* The state's outputs in hc_unc_output order (for methods built on states). */
void hc_unc_outputs(const hc_brine_state *state, double *y);

/* Standard uncertainty of the state's density at the reference temperature
 * [kg/m3]: u(SG) times the water density that SG is against
 * (rho_ref / SG); NaN when not known. */
double hc_unc_density_ref(const hc_brine_state *state);

/* Relative standard uncertainty of the built-in brine conductivity model
 * (hc_brine_cond.h) as a description of a real seawater brine: 3 % (no
 * source: the model is NaCl's conductivity scaled to PSS-78 at S_P 42; real
 * brines differ from it by a few percent as their Mg/Na ratio changes). */
#define HC_UNC_BRINE_MODEL_REL 0.03

#endif
