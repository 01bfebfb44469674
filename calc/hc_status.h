/* Error convention of the calc layer: every fallible entry point returns an
 * hc_status, HC_OK (0) on success. Outputs are left unspecified on failure.
 * hc_status_text() gives a short English reason for operators' messages. */
#ifndef HC_STATUS_H
#define HC_STATUS_H

typedef enum {
    HC_OK = 0,
    HC_ERR_NOT_FINITE,        /* an input is NaN or infinite */
    HC_ERR_NEGATIVE,          /* a quantity that cannot be negative is */
    HC_ERR_TEMPERATURE_RANGE, /* temperature outside the method's range */
    HC_ERR_PRESSURE_RANGE,    /* pressure outside the method's range */
    HC_ERR_SALINITY_RANGE,    /* beyond the method's salinity range */
    HC_ERR_NO_CONVERGENCE,    /* an iteration did not converge */
    HC_ERR_ARGUMENT,          /* an argument is malformed or inconsistent */
    HC_ERR_DOMAIN,            /* no physical solution for these inputs */
    HC_STATUS_COUNT
} hc_status;

const char *hc_status_text(hc_status status);

#endif
