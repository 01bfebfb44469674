#include <math.h>
#include <string.h>

#include "hc_state.h"

void hc_state_clear(hc_brine_state *state)
{
    state->practical_salinity = NAN;
    state->salinity_g_kg = NAN;
    state->density_kg_m3 = NAN;
    state->density_ref_kg_m3 = NAN;
    state->temperature_c = NAN;
    state->specific_gravity = NAN;
    state->reference_temperature_c = NAN;
    state->baume = NAN;
    state->baume_modulus = NAN;
    state->concentration_factor = NAN;
    state->stage = HC_STAGE_NONE;
    state->next_stage = HC_STAGE_NONE;
    state->next_stage_density_kg_m3 = NAN;
    state->next_stage_density_ref_kg_m3 = NAN;
    for (int i = 0; i < HC_MINERAL_COUNT; i++)
        state->saturation_index[i] = NAN;
    state->water_activity = NAN;
    state->method = HC_METHOD_NONE;
    state->warnings = 0;
    state->density_uncertainty_kg_m3 = NAN;
    state->sg_uncertainty = NAN;
    state->baume_uncertainty = NAN;
    state->cf_uncertainty = NAN;
}

static const char *const stage_names[HC_STAGE_COUNT] = {
    [HC_STAGE_SEAWATER] = "seawater",
    [HC_STAGE_CARBONATE] = "carbonate",
    [HC_STAGE_GYPSUM] = "gypsum",
    [HC_STAGE_HALITE] = "halite",
    [HC_STAGE_MAGNESIUM_SULFATE] = "magnesium-sulfate",
    [HC_STAGE_POTASH] = "potash",
    [HC_STAGE_BISCHOFITE] = "bischofite",
};

const char *hc_stage_name(hc_stage stage)
{
    if ((int)stage < 0 || stage >= HC_STAGE_COUNT)
        return "none";
    return stage_names[stage];
}

int hc_stage_from_name(const char *name)
{
    if (name == NULL)
        return -2;
    if (strcmp(name, "none") == 0)
        return HC_STAGE_NONE;
    for (int i = 0; i < HC_STAGE_COUNT; i++)
        if (strcmp(name, stage_names[i]) == 0)
            return i;
    return -2;
}

const char *hc_method_name(hc_method method)
{
    switch (method) {
    case HC_METHOD_NONE: return "none";
    case HC_METHOD_PSS78: return "pss78";
    case HC_METHOD_DENSITOMETER: return "densitometer";
    case HC_METHOD_HYDROSTATIC: return "hydrostatic";
    case HC_METHOD_SITE_CALIBRATION: return "site-calibration";
    case HC_METHOD_BRINE_CONDUCTIVITY: return "brine-conductivity-model";
    case HC_METHOD_MANUAL: return "manual";
    case HC_METHOD_DENSITY_INPUT: return "density";
    case HC_METHOD_COMPOSITION: return "composition";
    case HC_METHOD_COUNT: break;
    }
    return "none";
}

static const struct {
    unsigned bit;
    const char *name;
    const char *text;
} warnings[] = {
    {HC_WARN_CONDUCTIVITY_WEAK, "conductivity-weak",
     "near or past halite saturation conductivity says little about density"},
    {HC_WARN_BRINE_MODEL, "brine-conductivity-model",
     "density from the built-in brine conductivity model, not a site calibration"},
    {HC_WARN_TEMPERATURE_EXTRAPOLATED, "temperature-extrapolated",
     "temperature outside the model's range; values are extrapolated"},
    {HC_WARN_BEYOND_PATH, "beyond-path", "brine is past the end of the evaporation path"},
    {HC_WARN_BELOW_FEED, "below-feed", "brine is more dilute than the feed water"},
    {HC_WARN_HILL_EXTENSION, "hill-extension",
     "practical salinity below 2, Hill et al. (1986) extension used"},
    {HC_WARN_DENSITY_PREFERRED, "density-source-preferred",
     "a density signal or a hydrometer reading is preferred for this brine"},
    {HC_WARN_CALIBRATION_EXTRAPOLATED, "calibration-extrapolated",
     "outside the span of the site calibration"},
    {HC_WARN_CF_UNCERTAIN, "cf-uncertain",
     "past the halite onset density hardly changes with concentration factor; "
     "the concentration factor is uncertain and no decision uses it"},
    {HC_WARN_DENSITY_SIGNAL_BELOW_FEED, "density-signal-below-feed",
     "the density signal reads below the feed water's density (a dead or drifting "
     "sensor): not used, the state comes from the next source"},
    {HC_WARN_DENSITY_SIGNAL_BEYOND_PATH, "density-signal-beyond-path",
     "the density signal reads above the end of the evaporation path: not used, the "
     "state comes from the next source"},
    {HC_WARN_DENSITY_SIGNAL_BAD, "density-signal-bad",
     "the density signal is not good (outside its plausible range, failed, stale or "
     "stuck): not used, the state comes from the next source"},
};

const char *hc_warning_name(unsigned bit)
{
    for (size_t i = 0; i < sizeof warnings / sizeof warnings[0]; i++)
        if (warnings[i].bit == bit)
            return warnings[i].name;
    return NULL;
}

const char *hc_warning_text(unsigned bit)
{
    for (size_t i = 0; i < sizeof warnings / sizeof warnings[0]; i++)
        if (warnings[i].bit == bit)
            return warnings[i].text;
    return NULL;
}
