/* See hs_accuracy.h. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_accuracy.h"

int hs_accuracy_parse(const char *text, double si_factor, double *abs_si, double *rel,
                      char *why, size_t why_len)
{
    char *end;
    errno = 0;
    double v = strtod(text, &end);
    if (end == text || errno != 0 || !isfinite(v)) {
        snprintf(why, why_len, "'%s' is not a number (N in the signal's unit, or N%% of the "
                 "reading)", text);
        return -1;
    }
    if (v < 0.0) {
        snprintf(why, why_len, "'%s': an accuracy cannot be negative", text);
        return -2;
    }
    while (*end == ' ')
        end++;
    if (*end == '%') {
        end++;
        while (*end == ' ')
            end++;
        if (*end != '\0') {
            snprintf(why, why_len, "'%s': nothing may follow the %%", text);
            return -1;
        }
        if (v >= 100.0) {
            snprintf(why, why_len, "'%s': a percentage of the reading below 100 %%", text);
            return -2;
        }
        *abs_si = 0.0;
        *rel = v / 100.0;
        return 0;
    }
    if (*end != '\0') {
        snprintf(why, why_len, "'%s': give N in the signal's unit or N%%, nothing after it",
                 text);
        return -1;
    }
    *abs_si = v * fabs(si_factor);
    *rel = 0.0;
    return 0;
}

double hs_signal_accuracy(const hs_signal *s, double value_si)
{
    if (s->accuracy_set)
        return s->accuracy_abs_si + s->accuracy_rel * fabs(value_si);
    return hs_accuracy_default(s->quantity, value_si);
}

double hs_accuracy_default(hs_quantity q, double value_si)
{
    switch (q) {
    case HS_Q_CONDUCTIVITY: return 0.005 * fabs(value_si);
    case HS_Q_TEMPERATURE: return 0.15 + 0.002 * fabs(value_si); /* IEC 60751 class A [degC] */
    case HS_Q_LEVEL_PRESSURE:
    case HS_Q_PRESSURE_UPPER: return 100.0;   /* [Pa] */
    case HS_Q_LEVEL_DISTANCE: return 0.003;   /* [m] */
    case HS_Q_DENSITY: return 0.5;            /* [kg/m3] */
    default: return 0.0;
    }
}
