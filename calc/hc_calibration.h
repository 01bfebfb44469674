/* A site's conductivity calibration: fitted from operators' readings of
 * (conductivity, temperature, hydrometer specific gravity at the hydrometer's
 * reference temperature). Conductivities are first referred to 25 degC with
 * the linear 2 %/K compensation (hc_cond_compensate); the fit is then the
 * isotonic (pool-adjacent-violators) regression of SG on conductivity,
 * interpolated linearly between the pooled knots, so it never decreases.
 * Outside the readings' span the end segments extend linearly and the result
 * carries HC_WARN_CALIBRATION_EXTRAPOLATED.
 * Error convention: hc_status (HC_OK = 0). Pure; fixed size, no allocation. */
#ifndef HC_CALIBRATION_H
#define HC_CALIBRATION_H

#include <stddef.h>

#include "hc_status.h"

#define HC_CALIBRATION_MAX 64

typedef struct {
    double cond_ms_cm; /* as read [mS/cm] */
    double temp_c;     /* brine temperature at the reading [degC] */
    double sg;         /* hydrometer specific gravity at t_ref/t_ref [1] */
} hc_calibration_point;

typedef struct {
    size_t knots;                       /* pooled knots, >= 2 */
    double cond25[HC_CALIBRATION_MAX];  /* conductivity at 25 degC [mS/cm], increasing */
    double sg[HC_CALIBRATION_MAX];      /* fitted SG, non-decreasing */
    double t_ref_c;                     /* the hydrometer's reference temperature [degC] */
    double rms_residual;                /* of the readings about the fit [SG units] */
} hc_calibration;

/* Fits n readings (2..HC_CALIBRATION_MAX). HC_ERR_NOT_FINITE,
 * HC_ERR_NEGATIVE, HC_ERR_ARGUMENT (too few readings, SG outside 0.9..1.6,
 * or fewer than two distinct conductivities after pooling), else HC_OK. */
hc_status hc_calibration_fit(const hc_calibration_point *points, size_t n, double t_ref_c,
                             hc_calibration *out);

/* SG at the calibration's t_ref for a reading. *warnings gets
 * HC_WARN_CALIBRATION_EXTRAPOLATED outside the span (may be NULL).
 * HC_ERR_NOT_FINITE, HC_ERR_NEGATIVE, HC_ERR_TEMPERATURE_RANGE, else HC_OK. */
hc_status hc_calibration_sg(const hc_calibration *cal, double cond_ms_cm, double t_c, double *sg,
                            unsigned *warnings);

#endif
