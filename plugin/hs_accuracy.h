/* The accuracy of each signal: what a reading may be off by, as the
 * instrument's stated +-limit (a half-width, turned into a standard
 * uncertainty by hc_unc_from_accuracy). `[signal] accuracy = N` (in the
 * signal's unit) or `accuracy = N%` (of the reading) sets it; without the
 * key a default of the quantity's usual instrument class applies:
 *   conductivity    0.5 % of reading (industrial inductive or 4-electrode
 *                   cells; common practice, no source)
 *   temperature     0.15 degC + 0.002 |t| (Pt100 class A, IEC 60751)
 *   pressure        100 Pa (0.1 % of a 0..100 kPa transmitter; common
 *                   practice, no source)
 *   level distance  3 mm (radar or ultrasonic; common practice, no source)
 *   density         0.5 kg/m3 (inline vibrating-tube densitometer; common
 *                   practice, no source)
 * Two more terms belong to a pond, not a signal:
 *   the hydrostatic pair's spacing, 2 mm (a surveyed mount; common
 *   practice, no source), and a hydrometer's resolution, 0.001 SG (the
 *   usual division of a brine hydrometer; common practice, no source).
 * Error convention: hs_accuracy_parse returns 0, -1 when the text is not
 * an accuracy, -2 when the number is out of range (negative, 100 % or more),
 * each with a reason in why. */
#ifndef HS_ACCURACY_H
#define HS_ACCURACY_H

#include <stddef.h>

#include "hs_site.h"

#define HS_SPACING_ACCURACY_M 0.002
#define HS_HYDROMETER_RESOLUTION_SG 0.001

/* Parses "N" or "N%" (N >= 0, finite). *abs gets N times si_factor (an
 * accuracy is a difference: no offset), *rel the fraction. */
int hs_accuracy_parse(const char *text, double si_factor, double *abs_si, double *rel,
                      char *why, size_t why_len);

/* The usual class's +-limit for a reading of quantity q [SI unit] (the
 * defaults above; 0 for quantities without one). */
double hs_accuracy_default(hs_quantity q, double value_si);

/* The +-limit of one reading of `value_si` on signal s [SI unit]. */
double hs_signal_accuracy(const hs_signal *s, double value_si);

#endif
