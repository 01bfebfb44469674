/* The carbonate system of a brine open to a fixed CO2 partial pressure
 * (a pond in contact with the air).
 *
 * Species: CO2(aq), HCO3-, CO3 2-, H+, and the ion pairs CaCO3(aq) and
 * MgCO3(aq) that Harvie, Moller & Weare (1984, GCA 48, 723) "HMW84" carry
 * in place of Ca-CO3 and Mg-CO3 interaction parameters. Activity
 * coefficients of the ions come from the Pitzer model (hc_pitzer.h, with
 * the HMW84 carbonate pairs, theta and psi); the neutral pairs have
 * gamma = 1 (HMW84 gives them no interaction terms) and CO2(aq) uses the
 * HMW84 lambda values.
 *
 * Mass balance: carbonate alkalinity is conserved,
 *   A = m(HCO3) + 2 m(CO3) + 2 m(CaCO3) + 2 m(MgCO3)   [eq/kg],
 * while total carbon follows the gas (CO2 enters or leaves the pond).
 * H+ and OH- are left out of A: between pH 6.5 and 9.5 both are below
 * 1e-5 mol/kg, under 0.5 % of seawater's alkalinity; pH is reported.
 *
 * Equilibria (log10 K at 25 degC; Plummer & Busenberg 1982, GCA 46, 1011,
 * the values HMW84 adopted, from memory):
 *   CO2(g) = CO2(aq)                    log KH = -1.468
 *   CO2(aq) + H2O = H+ + HCO3-          log K1 = -6.352
 *   HCO3- = H+ + CO3 2-                 log K2 = -10.329
 *   Ca2+ + CO3 2- = CaCO3(aq)           log K  = 3.151 (HMW84, from memory;
 *                                        Millero & Pierrot 1998 give 3.150)
 *   Mg2+ + CO3 2- = MgCO3(aq)           log K  = 2.928 (HMW84, from memory)
 * Away from 25 degC, KH, K1 and K2 change with the Plummer & Busenberg
 * (1982) analytic expressions (as increments from 25 degC); the ion-pair
 * constants keep their 25 degC values.
 *
 * Convention for "total" molality arrays (the equilibrium solver's and the
 * path's): Ca and Mg include their ion pairs, and the carbonate slots carry
 * only alkalinity, A = m[HCO3] + 2 m[CO3], however it is split.
 * Error convention: hc_status (HC_OK = 0). Pure, no allocation. */
#ifndef HC_CARBONATE_H
#define HC_CARBONATE_H

#include "hc_ion.h"
#include "hc_pitzer.h"
#include "hc_status.h"

/* log10 pCO2 [atm] of the open air used by default: 10^-3.4 atm, about
 * 400 uatm (the atmosphere of the 2010s; common practice, no source). */
#define HC_LOG_PCO2_AIR (-3.4)

typedef struct {
    double log_p_co2;     /* log10 pCO2 [atm] */
    double ln_kh_pco2;    /* ln a(CO2,aq) = ln KH + ln pCO2 */
    double ln_k1, ln_k2;  /* carbonic acid, natural logs */
    double ln_k_caco3;    /* ion-pair formation, natural logs */
    double ln_k_mgco3;
} hc_carbonate_params;

typedef struct {
    double ph;            /* -log10 a(H+) (HMW84 activity scale) [1] */
    double alkalinity;    /* carbonate alkalinity A [eq/kg water] */
    double dic;           /* dissolved inorganic carbon [mol/kg water] */
    double co2;           /* CO2(aq) [mol/kg water] */
    double caco3_pair;    /* CaCO3(aq) [mol/kg water] */
    double mgco3_pair;    /* MgCO3(aq) [mol/kg water] */
    int iterations;       /* activity-coefficient passes used */
} hc_carbonate_result;

/* Constants at t_c [degC] for log_p_co2 [log10 atm], -8..0.
 * HC_ERR_NOT_FINITE, HC_ERR_TEMPERATURE_RANGE (outside -5..80),
 * HC_ERR_ARGUMENT (pCO2 out of range), else HC_OK. */
hc_status hc_carbonate_params_at(double t_c, double log_p_co2, hc_carbonate_params *out);

/* Speciates total[] (the convention above) at the gas pressure of c:
 * free[] gets the free-ion molalities [mol/kg] (Na, K, Cl, SO4 as given;
 * Ca, Mg without their pairs; HCO3, CO3 split at the equilibrium pH), *r
 * the Pitzer result of free[], *cr the carbonate figures (may be NULL).
 * Zero alkalinity gives free = total, pH NaN. HC_ERR_NOT_FINITE,
 * HC_ERR_NEGATIVE, HC_ERR_SALINITY_RANGE, HC_ERR_NO_CONVERGENCE, else HC_OK. */
hc_status hc_carbonate_speciate(const hc_pitzer_params *p, const hc_carbonate_params *c,
                                const double total[HC_ION_COUNT], double free_m[HC_ION_COUNT],
                                hc_pitzer_result *r, hc_carbonate_result *cr);

#endif
