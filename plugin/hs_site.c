/* Names and look-ups of the site model; see hs_site.h. */
#include <string.h>

#include "hs_site.h"

const char *hs_role_name(hs_role role)
{
    static const char *const names[HS_ROLE_COUNT] = {
        "intake", "concentrator", "brine-store", "crystalliser", "bittern",
    };
    return (unsigned)role < HS_ROLE_COUNT ? names[role] : "?";
}

static const char *const quantity_names[HS_QUANTITY_COUNT] = {
    "conductivity", "temperature", "level-pressure", "level-distance",
    "density", "pressure-upper", "rain", "pump-run", "pump-manual",
    "air-temperature", "humidity", "wind-speed", "solar-radiation",
};

const char *hs_quantity_name(hs_quantity quantity)
{
    return (unsigned)quantity < HS_QUANTITY_COUNT ? quantity_names[quantity] : "?";
}

int hs_quantity_from_name(const char *name)
{
    for (int q = 0; q < HS_QUANTITY_COUNT; q++)
        if (strcmp(quantity_names[q], name) == 0)
            return q;
    return -1;
}

const char *hs_ion_name(hs_ion ion)
{
    static const char *const names[HS_ION_COUNT] = {
        "na", "k", "mg", "ca", "sr", "cl", "so4", "hco3", "co3", "br",
    };
    return (unsigned)ion < HS_ION_COUNT ? names[ion] : "?";
}

int hs_site_bus(const hs_site *site, const char *name)
{
    for (size_t i = 0; i < site->n_buses; i++)
        if (strcmp(site->buses[i].name, name) == 0)
            return (int)i;
    return -1;
}

int hs_site_pond(const hs_site *site, const char *name)
{
    for (size_t i = 0; i < site->n_ponds; i++)
        if (strcmp(site->ponds[i].name, name) == 0)
            return (int)i;
    return -1;
}

int hs_site_feed(const hs_site *site, const char *name)
{
    for (size_t i = 0; i < site->n_feeds; i++)
        if (strcmp(site->feeds[i].name, name) == 0)
            return (int)i;
    return -1;
}

const hs_signal *hs_site_signal(const hs_site *site, int pond_index, hs_quantity quantity)
{
    for (size_t i = 0; i < site->n_signals; i++)
        if (site->signals[i].pond_index == pond_index && site->signals[i].quantity == quantity)
            return &site->signals[i];
    return NULL;
}
