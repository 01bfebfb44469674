/* Mineral chemistry for the shared hc_mineral list: dissolution stoichiometry,
 * log10 K and saturation indices SI = log10(IAP / K).
 *
 * log K at 25 degC: Harvie, Moller & Weare (1984, GCA 48, 723), Table 3.
 * Temperature, as changes from HMW84's 25 degC values: halite follows the
 * van 't Hoff equation with a constant heat capacity of reaction, Delta_r H
 * and Delta_r Cp from the NBS tables (Wagman et al. 1982, J. Phys. Chem.
 * Ref. Data 11, suppl. 2) [values from memory, checked against measured
 * solubilities in the tests]; gypsum follows the analytic log K of the
 * PHREEQC database phreeqc.dat (Parkhurst & Appelo 2013).
 * Calcite and aragonite follow Plummer & Busenberg (1982, GCA 46, 1011).
 * Every other mineral keeps its 25 degC log K; its SI away from 25 degC is
 * approximate, which the evaporation path reports.
 * Error convention: hc_status (HC_OK = 0). Pure and re-entrant. */
#ifndef HC_MINERALS_H
#define HC_MINERALS_H

#include "hc_carbonate.h"
#include "hc_ion.h"
#include "hc_mineral.h"
#include "hc_pitzer.h"
#include "hc_state.h"
#include "hc_status.h"

/* Which minerals an equilibrium calculation may precipitate. */
enum {
    HC_MINERALS_DEFAULT = 0,
    HC_MINERALS_WITH_ANHYDRITE = 1u << 0, /* ponds make gypsum, not anhydrite (kinetics) */
    /* CaCO3 forms as aragonite by default: calcite is the stable polymorph,
     * but Mg2+ in seawater-derived brines (Mg/Ca about 5) inhibits its
     * growth, and pond and lagoon carbonates are aragonite (Berner 1975,
     * GCA 39, 489; from memory). This flag makes calcite the CaCO3 phase. */
    HC_MINERALS_CALCITE = 1u << 1,
    HC_MINERALS_NO_CARBONATE = 1u << 2, /* no CaCO3 phase and no CO2 exchange */
};

typedef struct {
    double t_c;                        /* [degC] */
    double log_k[HC_MINERAL_COUNT];    /* log10 K of dissolution at t_c */
    unsigned char enabled[HC_MINERAL_COUNT]; /* 1 when the mineral may form */
    unsigned warnings;                 /* HC_WARN_TEMPERATURE_EXTRAPOLATED outside 0..50 degC */
    /* The gas phase: a brine with carbonate alkalinity is speciated at this
     * CO2 pressure (hc_carbonate.h); 10^-3.4 atm unless set otherwise. */
    int open_to_co2;                   /* 0 with HC_MINERALS_NO_CARBONATE */
    hc_carbonate_params carbonate;
} hc_mineral_set;

/* Moles of `ion` released when one mole of the mineral dissolves. */
int hc_mineral_ion_coeff(hc_mineral mineral, hc_ion ion);
/* Moles of water of crystallisation per mole of mineral. */
int hc_mineral_water(hc_mineral mineral);
/* Formula mass [kg/mol], water of crystallisation included, from the ions'
 * molar masses (hc_ion_molar_mass) and water's; 0 if invalid. */
double hc_mineral_molar_mass(hc_mineral mineral);
/* Chemical formula, e.g. "CaSO4.2H2O"; NULL if invalid. */
const char *hc_mineral_formula(hc_mineral mineral);
/* Stage in which the mineral deposits in a pond chain (calcium sulfates,
 * polyhalite and syngenite count with gypsum: they form during halite). */
hc_stage hc_mineral_stage(hc_mineral mineral);
/* True when the mineral's log K has its own temperature function. */
int hc_mineral_has_temperature_function(hc_mineral mineral);

/* log10 K of dissolution at t_c [degC]. HC_ERR_NOT_FINITE,
 * HC_ERR_TEMPERATURE_RANGE (outside -5..80), HC_ERR_ARGUMENT, else HC_OK. */
hc_status hc_mineral_log_k(hc_mineral mineral, double t_c, double *log_k);

/* Fills *out for t_c [degC] and HC_MINERALS_* flags, open to air at
 * HC_LOG_PCO2_AIR. Errors as hc_mineral_log_k. */
hc_status hc_mineral_set_at(double t_c, unsigned flags, hc_mineral_set *out);
/* The same at another CO2 pressure, log_p_co2 [log10 atm] in -8..0
 * (HC_ERR_ARGUMENT outside). */
hc_status hc_mineral_set_at_pco2(double t_c, unsigned flags, double log_p_co2,
                                 hc_mineral_set *out);

/* log10 of the ion activity product of `mineral` for a brine with molality[]
 * [mol/kg] and its Pitzer result. -HUGE_VAL when a constituent ion is absent. */
double hc_mineral_log_iap(hc_mineral mineral, const double molality[HC_ION_COUNT],
                          const hc_pitzer_result *r);

/* SI = log10(IAP/K) of every mineral (disabled ones too: SI is a property of
 * the brine). An absent constituent gives -HUGE_VAL. Returns HC_OK. */
hc_status hc_saturation_indices(const hc_mineral_set *set, const double molality[HC_ION_COUNT],
                                const hc_pitzer_result *r, double si[HC_MINERAL_COUNT]);

#endif
