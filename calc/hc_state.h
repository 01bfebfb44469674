/* The brine state of one sample: the contract shared by the calculator CLI,
 * the daemon's pipeline, the store and the MQTT state message. Field names
 * follow the JSON names of hp_state_json.h. A value that is not known is NaN
 * (JSON null). Plain data: no pointers, so states copy by assignment. */
#ifndef HC_STATE_H
#define HC_STATE_H

#include "hc_mineral.h"

/* Precipitation stages in the order a pond chain passes through them. */
typedef enum {
    HC_STAGE_SEAWATER,
    HC_STAGE_CARBONATE,
    HC_STAGE_GYPSUM,
    HC_STAGE_HALITE,
    HC_STAGE_MAGNESIUM_SULFATE,
    HC_STAGE_POTASH,
    HC_STAGE_BISCHOFITE,
    HC_STAGE_COUNT,
    HC_STAGE_NONE = -1 /* no stage known (e.g. no next stage past bischofite) */
} hc_stage;

/* Where the state's density came from (`method`; the order of
 * preference is in plugin/README.md, "Where a pond's density comes from"). */
typedef enum {
    HC_METHOD_NONE,
    HC_METHOD_PSS78,             /* conductivity + temperature, PSS-78 + EOS-80 */
    HC_METHOD_DENSITOMETER,      /* inline density signal */
    HC_METHOD_HYDROSTATIC,       /* two pressure sensors, rho = dP / (g dh) */
    HC_METHOD_SITE_CALIBRATION,  /* conductivity through the site's hydrometer fit */
    HC_METHOD_BRINE_CONDUCTIVITY,/* conductivity through the built-in brine model */
    HC_METHOD_MANUAL,            /* an operator's recent hydrometer reading */
    HC_METHOD_DENSITY_INPUT,     /* density given directly (calculator) */
    HC_METHOD_COMPOSITION,       /* computed from a given composition */
    HC_METHOD_COUNT
} hc_method;

/* Warnings are bit flags so that a state carries them without allocation. */
enum {
    HC_WARN_CONDUCTIVITY_WEAK     = 1u << 0, /* near/past halite saturation, conductivity says little */
    HC_WARN_BRINE_MODEL           = 1u << 1, /* built-in brine conductivity model, not calibrated */
    HC_WARN_TEMPERATURE_EXTRAPOLATED = 1u << 2, /* outside the model's temperature range */
    HC_WARN_BEYOND_PATH           = 1u << 3, /* past the end of the evaporation path */
    HC_WARN_BELOW_FEED            = 1u << 4, /* more dilute than the feed water */
    HC_WARN_HILL_EXTENSION        = 1u << 5, /* PSS-78 below 2, Hill et al. (1986) extension */
    HC_WARN_DENSITY_PREFERRED     = 1u << 6, /* a density source is preferred for this brine */
    HC_WARN_CALIBRATION_EXTRAPOLATED = 1u << 7, /* outside the site calibration's span */
    HC_WARN_CF_UNCERTAIN          = 1u << 8, /* past halite onset: density barely moves CF */
    HC_WARN_DENSITY_SIGNAL_BELOW_FEED = 1u << 9, /* a density signal below the feed's: not used */
    HC_WARN_DENSITY_SIGNAL_BEYOND_PATH = 1u << 10, /* one past the path's end: not used */
    HC_WARN_DENSITY_SIGNAL_BAD    = 1u << 11, /* the pond's density signal is not good: not used */
    HC_WARN_COUNT_BITS            = 12
};

typedef struct {
    double practical_salinity;      /* PSS-78 [1]; NaN outside 2..42 (Hill: 0..2) */
    double salinity_g_kg;           /* dissolved salts per kg of brine [g/kg] */
    double density_kg_m3;           /* in situ, at temperature_c [kg/m3]; reported, never
                                       decided on */
    double density_ref_kg_m3;       /* the same brine at reference_temperature_c [kg/m3];
                                       what every decision compares */
    double temperature_c;           /* ITS-90 [degC] */
    double specific_gravity;        /* rho(t_ref) / rho_water(t_ref) [1] */
    double reference_temperature_c; /* t_ref [degC] */
    double baume;                   /* heavy-liquid scale [deg Be] */
    double baume_modulus;           /* m in deg Be = m (1 - 1/SG) */
    double concentration_factor;    /* initial / remaining water mass [1] */
    hc_stage stage;
    hc_stage next_stage;
    double next_stage_density_kg_m3; /* at temperature_c [kg/m3] */
    double next_stage_density_ref_kg_m3; /* the same at reference_temperature_c [kg/m3] */
    double saturation_index[HC_MINERAL_COUNT]; /* log10(IAP/K); NaN when unknown */
    double water_activity;          /* [1] */
    hc_method method;
    unsigned warnings;              /* HC_WARN_* bits */
    /* Standard uncertainties (k = 1) propagated through `method`
     * (hc_uncertainty.h); NaN when not known. */
    double density_uncertainty_kg_m3; /* of density_kg_m3 [kg/m3] */
    double sg_uncertainty;            /* of specific_gravity [1] */
    double baume_uncertainty;         /* of baume [deg Be] */
    double cf_uncertainty;            /* of concentration_factor [1] */
} hc_brine_state;

/* Sets every number to NaN, stages to HC_STAGE_NONE, method to none. */
void hc_state_clear(hc_brine_state *state);

/* "seawater", "halite", ... ("none" for HC_STAGE_NONE). */
const char *hc_stage_name(hc_stage stage);
int hc_stage_from_name(const char *name); /* -2 when unknown */
const char *hc_method_name(hc_method method);
/* Short text of one warning bit (e.g. "conductivity-weak"); NULL if unknown. */
const char *hc_warning_name(unsigned bit);
/* One operator-facing sentence for one warning bit; NULL if unknown. */
const char *hc_warning_text(unsigned bit);

#endif
