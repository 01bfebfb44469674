#include <string.h>

#include "hc_mineral.h"

static const char *const mineral_names[HC_MINERAL_COUNT] = {
    [HC_MIN_CALCITE] = "calcite",       [HC_MIN_ARAGONITE] = "aragonite",
    [HC_MIN_GYPSUM] = "gypsum",         [HC_MIN_ANHYDRITE] = "anhydrite",
    [HC_MIN_HALITE] = "halite",         [HC_MIN_GLAUBERITE] = "glauberite",
    [HC_MIN_POLYHALITE] = "polyhalite", [HC_MIN_MIRABILITE] = "mirabilite",
    [HC_MIN_THENARDITE] = "thenardite", [HC_MIN_EPSOMITE] = "epsomite",
    [HC_MIN_HEXAHYDRITE] = "hexahydrite", [HC_MIN_KIESERITE] = "kieserite",
    [HC_MIN_BLOEDITE] = "bloedite",     [HC_MIN_SYLVITE] = "sylvite",
    [HC_MIN_CARNALLITE] = "carnallite", [HC_MIN_KAINITE] = "kainite",
    [HC_MIN_LEONITE] = "leonite",       [HC_MIN_SCHOENITE] = "schoenite",
    [HC_MIN_SYNGENITE] = "syngenite",   [HC_MIN_ARCANITE] = "arcanite",
    [HC_MIN_GLASERITE] = "glaserite",   [HC_MIN_BISCHOFITE] = "bischofite",
};

const char *hc_mineral_name(hc_mineral mineral)
{
    if ((int)mineral < 0 || mineral >= HC_MINERAL_COUNT)
        return NULL;
    return mineral_names[mineral];
}

int hc_mineral_from_name(const char *name)
{
    if (name == NULL)
        return -1;
    for (int i = 0; i < HC_MINERAL_COUNT; i++)
        if (strcmp(name, mineral_names[i]) == 0)
            return i;
    return -1;
}
