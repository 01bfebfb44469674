#include <math.h>
#include <stddef.h>
#include <string.h>

#include "hc_ion.h"

static const int charges[HC_ION_COUNT] = {1, 1, 2, 2, -1, -2, -1, -2};

/* g/mol from IUPAC 2013 standard atomic weights (Na 22.98977, K 39.0983,
 * Mg 24.305, Ca 40.078, Cl 35.453, S 32.06, O 15.999, C 12.011, H 1.008). */
static const double molar_masses[HC_ION_COUNT] = {
    22.98977, 39.0983, 24.305, 40.078, 35.453, 96.056, 61.016, 60.008,
};

static const char *const names[HC_ION_COUNT] = {
    "Na", "K", "Mg", "Ca", "Cl", "SO4", "HCO3", "CO3",
};

/* Returns z_i, or 0 for an out-of-range ion. */
int hc_ion_charge(hc_ion ion)
{
    if ((int)ion < 0 || ion >= HC_ION_COUNT)
        return 0;
    return charges[ion];
}

/* Returns g/mol, or NaN for an out-of-range ion. */
double hc_ion_molar_mass(hc_ion ion)
{
    if ((int)ion < 0 || ion >= HC_ION_COUNT)
        return NAN;
    return molar_masses[ion];
}

/* Returns the name, or NULL for an out-of-range ion. */
const char *hc_ion_name(hc_ion ion)
{
    if ((int)ion < 0 || ion >= HC_ION_COUNT)
        return NULL;
    return names[ion];
}

/* Returns the ion, or -1 when the name is unknown. */
int hc_ion_from_name(const char *name)
{
    if (name == NULL)
        return -1;
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (strcmp(name, names[i]) == 0)
            return i;
    return -1;
}

/* I = 1/2 sum m_i z_i^2 (Pitzer 1991, ch. 3) [mol/kg]. */
double hc_ionic_strength(const double molality[HC_ION_COUNT])
{
    double s = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        s += molality[i] * charges[i] * charges[i];
    return 0.5 * s;
}

/* sum m_i z_i [eq/kg]. */
double hc_charge_balance(const double molality[HC_ION_COUNT])
{
    double s = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        s += molality[i] * charges[i];
    return s;
}

/* sum m_i M_i [g per kg water]. */
double hc_solute_g_per_kg_water(const double molality[HC_ION_COUNT])
{
    double s = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        s += molality[i] * molar_masses[i];
    return s;
}
