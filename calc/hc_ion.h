/* Dissolved ions of the brine model (Na-K-Mg-Ca-Cl-SO4-HCO3-CO3-H2O, the
 * Harvie, Moller & Weare 1984 system). Molality arrays throughout calc/ are
 * indexed by hc_ion, in mol per kg of water. */
#ifndef HC_ION_H
#define HC_ION_H

typedef enum {
    HC_ION_NA,   /* Na+    */
    HC_ION_K,    /* K+     */
    HC_ION_MG,   /* Mg2+   */
    HC_ION_CA,   /* Ca2+   */
    HC_ION_CL,   /* Cl-    */
    HC_ION_SO4,  /* SO4 2- */
    HC_ION_HCO3, /* HCO3-  */
    HC_ION_CO3,  /* CO3 2- */
    HC_ION_COUNT
} hc_ion;

#define HC_CATION_FIRST HC_ION_NA
#define HC_CATION_END   HC_ION_CL  /* cations are [NA, CL) */
#define HC_ANION_FIRST  HC_ION_CL
#define HC_ANION_END    HC_ION_COUNT

/* Molar mass of water [kg/mol] (IUPAC 2013 atomic weights). */
#define HC_WATER_KG_PER_MOL 0.01801528

/* Signed charge number z_i [1]; 0 for an invalid ion. */
int hc_ion_charge(hc_ion ion);
/* Molar mass [g/mol] (IUPAC 2013 standard atomic weights); NaN if invalid. */
double hc_ion_molar_mass(hc_ion ion);
/* Short name as a chemist writes it in a key: "Na", "SO4", ...; NULL if invalid. */
const char *hc_ion_name(hc_ion ion);
/* Inverse of hc_ion_name (case-sensitive); -1 when unknown. */
int hc_ion_from_name(const char *name);

/* Ionic strength I = 1/2 sum m_i z_i^2 [mol/kg] of a molality array [mol/kg]. */
double hc_ionic_strength(const double molality[HC_ION_COUNT]);
/* Charge balance sum m_i z_i [eq/kg]; zero for an electroneutral brine. */
double hc_charge_balance(const double molality[HC_ION_COUNT]);
/* Dissolved solute mass per kg of water [g/kg water]. */
double hc_solute_g_per_kg_water(const double molality[HC_ION_COUNT]);

#endif
