/* Reference-composition seawater and the seawater-range brine state. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "calc_assert.h"
#include "hc_baume.h"
#include "hc_eos80.h"
#include "hc_pss78.h"
#include "hc_seawater.h"

static void reference_composition_at_35(void **unused)
{
    (void)unused;
    /* Millero et al. (2008) Deep-Sea Res. I 55, 50, table 4, converted to
     * mol per kg of water at S_P = 35 (Millero et al. 2008 composition [C], 4 figures). */
    static const struct { hc_sw_ion ion; double m, tol; } cv[] = {
        {HC_SW_NA, 0.4861, 5e-5}, {HC_SW_K, 0.01058, 5e-6}, {HC_SW_MG, 0.05474, 5e-6},
        {HC_SW_CA, 0.01066, 5e-6}, {HC_SW_SO4, 0.02926, 5e-6}, {HC_SW_CL, 0.5658, 5e-5},
    };
    hc_sw_composition c;
    assert_int_equal(hc_seawater_composition(35.0, 0, &c), HC_OK);
    for (size_t i = 0; i < sizeof cv / sizeof cv[0]; i++)
        assert_near(c.molality[cv[i].ion], cv[i].m, cv[i].tol);
    /* S_R = 35.16504 g/kg at S_P = 35 (Millero et al. 2008, eq. 7) */
    assert_near(c.salinity_g_kg, 35.16504, 1e-12);
    assert_near(c.cl_adjustment_mol_kg, 0.0, 0.0);
    /* The ten ions carry all but 0.029 g/kg of S_R; the rest is B(OH)4-,
     * F-, OH-, B(OH)3 and CO2 (Millero et al. 2008, table 4). */
    double water = 1.0 - c.salinity_g_kg / 1000.0, grams = 0.0;
    for (int i = 0; i < HC_SW_ION_COUNT; i++)
        grams += c.molality[i] * hc_sw_ion_molar_mass((hc_sw_ion)i) * water;
    assert_near(grams, 35.16504 - 0.0292, 0.0005);
}

static void composition_scales_with_salinity(void **unused)
{
    (void)unused;
    /* Reference composition: fixed ratios to chlorinity (Millero et al.
     * 2008), so mass per kg of seawater scales with S_R. */
    hc_sw_composition a, b;
    assert_int_equal(hc_seawater_composition(35.0, 0, &a), HC_OK);
    assert_int_equal(hc_seawater_composition(17.5, 0, &b), HC_OK);
    double wa = 1.0 - a.salinity_g_kg / 1000.0, wb = 1.0 - b.salinity_g_kg / 1000.0;
    for (int i = 0; i < HC_SW_ION_COUNT; i++)
        assert_near(b.molality[i] * wb, 0.5 * a.molality[i] * wa, 1e-15);
    hc_sw_composition z;
    assert_int_equal(hc_seawater_composition(0.0, HC_SW_LUMP, &z), HC_OK);
    for (int i = 0; i < HC_SW_ION_COUNT; i++)
        assert_near(z.molality[i], 0.0, 0.0);
}

static void lumping_rule(void **unused)
{
    (void)unused;
    hc_sw_composition full, lump, dry;
    assert_int_equal(hc_seawater_composition(35.0, 0, &full), HC_OK);
    assert_int_equal(hc_seawater_composition(35.0, HC_SW_LUMP, &lump), HC_OK);
    assert_int_equal(hc_seawater_composition(35.0, HC_SW_LUMP | HC_SW_DROP_CARBONATE, &dry),
                     HC_OK);
    /* Sr into Ca, Br into Cl (the usual lumping rule for this model) */
    assert_near(lump.molality[HC_SW_SR], 0.0, 0.0);
    assert_near(lump.molality[HC_SW_BR], 0.0, 0.0);
    assert_near(lump.molality[HC_SW_CA], full.molality[HC_SW_CA] + full.molality[HC_SW_SR],
                1e-15);
    assert_near(lump.molality[HC_SW_CL],
                full.molality[HC_SW_CL] + full.molality[HC_SW_BR] + lump.cl_adjustment_mol_kg,
                1e-15);
    assert_near(lump.molality[HC_SW_HCO3], full.molality[HC_SW_HCO3], 0.0);
    assert_near(dry.molality[HC_SW_HCO3], 0.0, 0.0);
    assert_near(dry.molality[HC_SW_CO3], 0.0, 0.0);
    /* Electroneutral after the Cl adjustment; the adjustment replaces the
     * dropped minor anions (about 0.0002 mol/kg) or, with carbonate dropped,
     * also the alkalinity (about 0.0023 eq/kg; Millero et al. 2008). */
    const hc_sw_composition *both[] = {&lump, &dry};
    for (int k = 0; k < 2; k++) {
        double charge = 0.0;
        for (int i = 0; i < HC_SW_ION_COUNT; i++)
            charge += hc_sw_ion_charge((hc_sw_ion)i) * both[k]->molality[i];
        assert_near(charge, 0.0, 1e-15);
    }
    assert_near(lump.cl_adjustment_mol_kg, 0.00018, 0.00005);
    assert_near(dry.cl_adjustment_mol_kg, 0.00246, 0.0001);
}

static void ion_table(void **unused)
{
    (void)unused;
    assert_string_equal(hc_sw_ion_name(HC_SW_SO4), "SO4");
    assert_null(hc_sw_ion_name(HC_SW_ION_COUNT));
    assert_int_equal(hc_sw_ion_charge(HC_SW_MG), 2);
    assert_int_equal(hc_sw_ion_charge(HC_SW_CO3), -2);
    assert_int_equal(hc_sw_ion_charge(HC_SW_ION_COUNT), 0);
    /* IUPAC 2005: Na 22.98976928 g/mol */
    assert_near(hc_sw_ion_molar_mass(HC_SW_NA), 22.98976928, 0.0);
    assert_true(isnan(hc_sw_ion_molar_mass(HC_SW_ION_COUNT)));
}

static void concentration_factor(void **unused)
{
    (void)unused;
    double cf;
    assert_int_equal(hc_seawater_cf(35.0, 35.0, &cf), HC_OK);
    assert_near(cf, 1.0, 1e-15);
    assert_int_equal(hc_seawater_cf(0.0, 35.0, &cf), HC_OK);
    assert_near(cf, 0.0, 0.0);
    /* CF is the ratio of water masses (definition): 1 kg of S_P 35
     * seawater holds 964.835 g water; at S_P 40 the same salt (35.16504 g)
     * sits in 35.16504 (1000 - S_R40) / S_R40 g water. */
    assert_int_equal(hc_seawater_cf(40.0, 35.0, &cf), HC_OK);
    double sr40 = 35.16504 / 35.0 * 40.0;
    assert_near(cf, 964.83496 / (35.16504 * (1000.0 - sr40) / sr40), 1e-12);
    assert_int_equal(hc_seawater_cf(NAN, 35, &cf), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_seawater_cf(35, NAN, &cf), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_seawater_cf(-1, 35, &cf), HC_ERR_NEGATIVE);
    assert_int_equal(hc_seawater_cf(43, 35, &cf), HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_seawater_cf(35, 0, &cf), HC_ERR_ARGUMENT);
    assert_int_equal(hc_seawater_cf(35, 43, &cf), HC_ERR_SALINITY_RANGE);
}

static void state_from_conductivity(void **unused)
{
    (void)unused;
    hc_brine_state st;
    assert_int_equal(hc_seawater_state_from_conductivity(42.914, 15.0, 0.0, NULL, &st), HC_OK);
    /* gsw 3.6 SP_from_C(42.914, 15, 0) = 34.99677011 [C] */
    assert_near(st.practical_salinity, 34.996770111355, 1e-9);
    assert_near(st.salinity_g_kg, 35.16504 / 35.0 * st.practical_salinity, 1e-12);
    double rho;
    assert_int_equal(hc_eos80_rho(st.practical_salinity, 15.0, 0.0, &rho), HC_OK);
    assert_near(st.density_kg_m3, rho, 0.0);
    /* SG 15/15 of standard seawater: 1025.97 / 999.10 (EOS-80 [C]); the
     * usual figure for seawater is 1.025 to 1.027 (common practice). */
    assert_near(st.specific_gravity, rho / hc_eos80_rho_water(15.0), 1e-14);
    double be;
    assert_int_equal(hc_baume_from_sg(st.specific_gravity, 145.0, &be), HC_OK);
    assert_near(st.baume, be, 0.0);
    assert_near(st.baume_modulus, 145.0, 0.0);
    assert_near(st.reference_temperature_c, 15.0, 0.0);
    assert_near(st.concentration_factor, 0.9999, 0.0001);
    assert_int_equal(st.stage, HC_STAGE_SEAWATER);
    assert_int_equal(st.next_stage, HC_STAGE_NONE);
    assert_int_equal(st.method, HC_METHOD_PSS78);
    assert_int_equal(st.warnings, 0); /* within 0.1 % of the feed */
    assert_true(isnan(st.water_activity));
    assert_true(isnan(st.saturation_index[HC_MIN_HALITE]));
}

static void sg_uses_reference_temperature(void **unused)
{
    (void)unused;
    /* Heavy-liquid SG: SG at t_ref needs the density at t_ref for the
     * same composition. The same water measured warm and cold has one SG. */
    hc_brine_state warm, cold;
    assert_int_equal(hc_seawater_state_from_sp(38.0, 35.0, 0.0, NULL, &warm), HC_OK);
    assert_int_equal(hc_seawater_state_from_sp(38.0, 5.0, 0.0, NULL, &cold), HC_OK);
    assert_true(cold.density_kg_m3 - warm.density_kg_m3 > 5.0);
    assert_near(warm.specific_gravity, cold.specific_gravity, 0.0);
    assert_near(warm.baume, cold.baume, 0.0);

    hc_seawater_options o;
    hc_seawater_options_default(&o);
    o.reference_temperature_c = HC_TREF_60F;
    o.baume_modulus = HC_BAUME_MODULUS_GERLACH;
    hc_brine_state f;
    assert_int_equal(hc_seawater_state_from_sp(38.0, 35.0, 0.0, &o, &f), HC_OK);
    double rho_ref;
    assert_int_equal(hc_eos80_rho(38.0, HC_TREF_60F, 0.0, &rho_ref), HC_OK);
    assert_near(f.specific_gravity, rho_ref / hc_eos80_rho_water(HC_TREF_60F), 1e-14);
    assert_near(f.baume, 146.78 * (1.0 - 1.0 / f.specific_gravity), 1e-12);
    assert_near(f.baume_modulus, 146.78, 0.0);
}

static void state_from_density_round_trip(void **unused)
{
    (void)unused;
    hc_brine_state a, b;
    assert_int_equal(hc_seawater_state_from_conductivity(55.0, 28.0, 0.0, NULL, &a), HC_OK);
    assert_int_equal(hc_seawater_state_from_density(a.density_kg_m3, 28.0, 0.0, NULL, &b), HC_OK);
    assert_near(b.practical_salinity, a.practical_salinity, 1e-8);
    assert_near(b.specific_gravity, a.specific_gravity, 1e-10);
    assert_int_equal(b.method, HC_METHOD_DENSITY_INPUT);
}

static void state_warnings(void **unused)
{
    (void)unused;
    hc_brine_state st;
    assert_int_equal(hc_seawater_state_from_conductivity(2.0, 20.0, 0.0, NULL, &st), HC_OK);
    assert_true(st.practical_salinity < 2.0);
    assert_int_equal(st.warnings, HC_WARN_HILL_EXTENSION | HC_WARN_BELOW_FEED);
    assert_int_equal(hc_seawater_state_from_sp(36.0, 42.0, 0.0, NULL, &st), HC_OK);
    assert_int_equal(st.warnings, HC_WARN_TEMPERATURE_EXTRAPOLATED);
    hc_seawater_options o;
    hc_seawater_options_default(&o);
    o.feed_sp = 36.0;
    assert_int_equal(hc_seawater_state_from_sp(35.0, 20.0, 0.0, &o, &st), HC_OK);
    assert_int_equal(st.warnings, HC_WARN_BELOW_FEED);
}

static void state_errors(void **unused)
{
    (void)unused;
    hc_brine_state st;
    hc_seawater_options o;
    hc_seawater_options_default(&o);
    o.baume_modulus = 0.0;
    assert_int_equal(hc_seawater_state_from_sp(35, 20, 0, &o, &st), HC_ERR_ARGUMENT);
    hc_seawater_options_default(&o);
    o.feed_sp = 0.0;
    assert_int_equal(hc_seawater_state_from_sp(35, 20, 0, &o, &st), HC_ERR_ARGUMENT);
    o.feed_sp = NAN;
    assert_int_equal(hc_seawater_state_from_sp(35, 20, 0, &o, &st), HC_ERR_ARGUMENT);
    hc_seawater_options_default(&o);
    o.reference_temperature_c = 50.0;
    assert_int_equal(hc_seawater_state_from_sp(35, 20, 0, &o, &st), HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_seawater_state_from_conductivity(NAN, 20, 0, NULL, &st),
                     HC_ERR_NOT_FINITE);
    assert_int_equal(hc_seawater_state_from_conductivity(-1, 20, 0, NULL, &st), HC_ERR_NEGATIVE);
    assert_int_equal(hc_seawater_state_from_conductivity(50, 46, 0, NULL, &st),
                     HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_seawater_state_from_conductivity(50, -3, 0, NULL, &st),
                     HC_ERR_TEMPERATURE_RANGE);
    assert_int_equal(hc_seawater_state_from_conductivity(50, 20, 10001, NULL, &st),
                     HC_ERR_PRESSURE_RANGE);
    assert_int_equal(hc_seawater_state_from_conductivity(50, 20, -5, NULL, &st),
                     HC_ERR_PRESSURE_RANGE);
    assert_int_equal(hc_seawater_state_from_conductivity(150, 25, 0, NULL, &st),
                     HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_seawater_state_from_density(1210, 25, 0, NULL, &st),
                     HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_seawater_state_from_density(900, 25, 0, NULL, &st), HC_ERR_DOMAIN);
    assert_int_equal(hc_seawater_composition(NAN, 0, &(hc_sw_composition){0}),
                     HC_ERR_NOT_FINITE);
    assert_int_equal(hc_seawater_composition(-2, 0, &(hc_sw_composition){0}), HC_ERR_NEGATIVE);
    assert_int_equal(hc_seawater_composition(50, 0, &(hc_sw_composition){0}),
                     HC_ERR_SALINITY_RANGE);
    assert_int_equal(hc_seawater_composition(35, HC_SW_DROP_CARBONATE, &(hc_sw_composition){0}),
                     HC_ERR_ARGUMENT);
    assert_int_equal(hc_seawater_composition(35, 1u << 7, &(hc_sw_composition){0}),
                     HC_ERR_ARGUMENT);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(reference_composition_at_35),
        cmocka_unit_test(composition_scales_with_salinity),
        cmocka_unit_test(lumping_rule),
        cmocka_unit_test(ion_table),
        cmocka_unit_test(concentration_factor),
        cmocka_unit_test(state_from_conductivity),
        cmocka_unit_test(sg_uses_reference_temperature),
        cmocka_unit_test(state_from_density_round_trip),
        cmocka_unit_test(state_warnings),
        cmocka_unit_test(state_errors),
    };
    return cmocka_run_group_tests_name("seawater", tests, NULL, NULL);
}
