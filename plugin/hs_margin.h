/* How far a decision keeps from the uncertainty of what it compares.
 * Every alarm and transfer that compares a density (or SG, degree Baume)
 * with a limit needs the difference to exceed HS_DECISION_K standard
 * uncertainties of the state (calc/hc_uncertainty.h): k = 2, about 95 %
 * for a normal distribution (GUM, JCGM 100:2008, 6.2 and 6.3). A decision
 * the uncertainty cannot support is not taken and says `uncertain-source`.
 * density-fall compares a filtered density with itself over time: there the
 * noise counts, not the bias, and its fall must exceed HS_FALL_NOISE_K
 * standard deviations of the filtered value (hs_alarm.h). */
#ifndef HS_MARGIN_H
#define HS_MARGIN_H

#define HS_DECISION_K 2.0
/* Ten: the fall compares the highest median of a window with the current
 * one, two extremes of a slowly varying noisy series; with seven a
 * crystalliser read with 0.5 % conductivity noise raised nine false
 * density-falls in 30 simulated days, with ten none, while a 10 kg/m3 rain
 * dilution still raises within 30 minutes (tests/unit/test_fall_sim.c;
 * found by that test, no source). With a 127-sample median a 10 kg/m3
 * dilution raises at a fall of about 7 to 8.5 kg/m3 both there and through
 * the simulator (tests/integration/test_noisy_crystalliser.sh). */
#define HS_FALL_NOISE_K 10.0
#define HS_FALL_FILTER_DEFAULT 127 /* samples in the density-fall median (odd) */

#endif
