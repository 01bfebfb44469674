#include "hc_status.h"

const char *hc_status_text(hc_status status)
{
    switch (status) {
    case HC_OK: return "ok";
    case HC_ERR_NOT_FINITE: return "an input is not a finite number";
    case HC_ERR_NEGATIVE: return "a quantity that cannot be negative is negative";
    case HC_ERR_TEMPERATURE_RANGE: return "temperature is outside the method's range";
    case HC_ERR_PRESSURE_RANGE: return "pressure is outside the method's range";
    case HC_ERR_SALINITY_RANGE: return "salinity is beyond the method's range";
    case HC_ERR_NO_CONVERGENCE: return "the iteration did not converge";
    case HC_ERR_ARGUMENT: return "an argument is malformed";
    case HC_ERR_DOMAIN: return "no physical solution for these inputs";
    case HC_STATUS_COUNT: break;
    }
    return "unknown error";
}
