/* Water and salt balance of one pond over a window, and the evaporation a
 * brine should achieve.
 *
 * The balance is kept in masses, not volumes: evaporation removes water,
 * transfers move brine (water plus salt), rain adds fresh water. Net
 * evaporation is what leaves the pond's water unaccounted for by transfers
 * and rain; it therefore includes seepage (which is why it is "net").
 *
 * Units: volume [m3], density [kg/m3], salt mass fraction w [kg salt/kg
 * brine], masses [kg], area [m2], time [day], depths of water [mm].
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure. */
#ifndef HC_BALANCE_H
#define HC_BALANCE_H

#include "hc_status.h"

/* Nominal density of the water that rain and evaporation depths stand for
 * [kg/m3]: 1 mm of water on 1 m2 is 1 kg. The same constant converts both
 * ways, so it cancels in a closed balance (convention, no source needed). */
#define HC_WATER_DEPTH_DENSITY 1000.0

/* Water and salt carried by a parcel of brine. */
typedef struct {
    double water_kg;
    double salt_kg;
} hc_brine_mass;

/* Splits brine volume v of density rho and salt mass fraction w into water
 * and salt: m = rho v, salt = w m, water = (1 - w) m. */
hc_status hc_brine_mass_of(double v_m3, double rho_kg_m3, double w_kg_kg, hc_brine_mass *out);

/* Volume pumped: run time x rated flow [m3] (rated flow in m3/h). */
hc_status hc_pumped_volume(double run_time_s, double rated_flow_m3_h, double *v_m3);

typedef struct {
    double duration_days;      /* > 0 */
    double mean_area_m2;       /* wetted area over the window, > 0 */
    hc_brine_mass start;       /* brine in the pond at the start */
    hc_brine_mass end;         /* and at the end */
    hc_brine_mass received;    /* sum of all transfers in */
    hc_brine_mass sent;        /* sum of all transfers out */
    double rain_mm;            /* rain on the pond over the window, >= 0 */
    double deposited_salt_kg;  /* salt the path says crystallised meanwhile, >= 0 */
} hc_balance_input;

typedef struct {
    double evaporated_kg;          /* water lost to evaporation and seepage */
    double net_evaporation_mm_day; /* the same as a water depth per day */
    double salt_residual_kg;       /* start + in - out - deposited - end; 0 when closed */
    double salt_residual_fraction; /* residual / end inventory */
} hc_balance_result;

/* Closes the balance. Negative or non-finite inputs are errors (every
 * quantity here is a magnitude). */
hc_status hc_balance_close(const hc_balance_input *in, hc_balance_result *out);

/* Calibration drift: the salt the balance says should be in the pond,
 * spread over the measured end volume, gives a predicted salt
 * concentration c_pred; the density change that explains the gap is
 * (c_pred - c_meas) / (dc/drho), with dc/drho the secant c / (rho - rho_fw)
 * through fresh water (rho_fw = 998.2 kg/m3 at 20 degC, Bigg 1967). That
 * secant is within 7 % of the local slope for NaCl(aq) at 20 to 26 % (CRC
 * Handbook density table, worked by hand). *rho_predicted is the end density
 * the balance predicts; *drift is 1 when it differs from the measured one by
 * more than tolerance_kg_m3. */
hc_status hc_balance_density_check(const hc_balance_input *in, const hc_balance_result *res,
                                   double end_volume_m3, double end_density_kg_m3,
                                   double tolerance_kg_m3, double *rho_predicted, int *drift);

/* Evaporation from brine relative to fresh water under the same weather:
 * a Dalton-type law E ~ (a_w e_s - e_a) with the surface vapour pressure
 * lowered by the water activity (Salhotra, Adams & Harleman 1985, Water
 * Resour. Res. 21, 1336), at equal surface temperature:
 * f = (a_w - RH) / (1 - RH), RH the air's relative humidity in [0, 1).
 * f < 0 means the brine takes up water from the air; it is reported as it
 * is. RH = 0 gives f = a_w. */
hc_status hc_evaporation_activity_factor(double water_activity, double relative_humidity,
                                         double *factor);

/* Evaporation a brine should achieve [mm/day] from a reference (pan)
 * evaporation: E = E_pan k_pan f, with the pan coefficient k_pan (Class A
 * pan to lake about 0.7, Kohler, Nordenson & Fox 1955, from memory) and f
 * from hc_evaporation_activity_factor. */
hc_status hc_evaporation_expected(double pan_mm_day, double pan_coefficient,
                                  double water_activity, double relative_humidity,
                                  double *e_mm_day);

#endif
