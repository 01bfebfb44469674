/* Specific gravity and heavy-liquid degree Baume. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "calc_assert.h"
#include "hc_baume.h"
#include "hc_eos80.h"

static void definition(void **unused)
{
    (void)unused;
    /* deg Be = m (1 - 1/SG) (NBS Circular 59, 1916, heavy-liquid scale). */
    static const double moduli[] = {HC_BAUME_MODULUS_US, HC_BAUME_MODULUS_RATIONAL,
                                    HC_BAUME_MODULUS_GERLACH, HC_BAUME_MODULUS_DUTCH, 150.5};
    for (size_t i = 0; i < sizeof moduli / sizeof moduli[0]; i++) {
        double m = moduli[i], be;
        assert_int_equal(hc_baume_from_sg(1.0, m, &be), HC_OK);
        assert_near(be, 0.0, 1e-15);       /* water is 0 deg Be on every scale */
        assert_int_equal(hc_baume_from_sg(2.0, m, &be), HC_OK);
        assert_near(be, m / 2.0, 1e-12);   /* SG 2 is half the modulus */
    }
    assert_near(HC_BAUME_MODULUS_US, 145.0, 0.0);
    assert_near(HC_BAUME_MODULUS_RATIONAL, 144.3, 0.0);
    assert_near(HC_BAUME_MODULUS_GERLACH, 146.78, 0.0);
    assert_near(HC_BAUME_MODULUS_DUTCH, 144.0, 0.0);
}

static void domain_table_modulus_145(void **unused)
{
    (void)unused;
    /* The heavy-liquid conversion table with m = 145, computed from the
     * definition [C], given to 2 decimals; 1.2185 <-> 26.0 is also the
     * published halite point (Baseggio 1974, 4th Symp. on Salt) [S]. */
    static const struct { double sg, be; } cv[] = {
        {1.025, 3.54}, {1.214, 25.56}, {1.2185, 26.00}, {1.25, 29.00}, {1.30, 33.46},
    };
    for (size_t i = 0; i < sizeof cv / sizeof cv[0]; i++) {
        double be, sg;
        assert_int_equal(hc_baume_from_sg(cv[i].sg, 145.0, &be), HC_OK);
        assert_near(be, cv[i].be, 0.005);
        assert_int_equal(hc_sg_from_baume(cv[i].be, 145.0, &sg), HC_OK);
        assert_near(sg, cv[i].sg, 0.0001);
    }
}

static void round_trips(void **unused)
{
    (void)unused;
    static const double moduli[] = {144.0, 144.3, 145.0, 146.78};
    for (size_t i = 0; i < sizeof moduli / sizeof moduli[0]; i++)
        for (double sg = 1.0; sg <= 1.40; sg += 0.01) {
            double be, back;
            assert_int_equal(hc_baume_from_sg(sg, moduli[i], &be), HC_OK);
            assert_int_equal(hc_sg_from_baume(be, moduli[i], &back), HC_OK);
            assert_near(back, sg, 1e-13);
        }
}

static void scales_differ(void **unused)
{
    (void)unused;
    /* For the same SG a larger modulus reads more degrees (definition). */
    double be144, be145, be146;
    assert_int_equal(hc_baume_from_sg(1.2185, 144.3, &be144), HC_OK);
    assert_int_equal(hc_baume_from_sg(1.2185, 145.0, &be145), HC_OK);
    assert_int_equal(hc_baume_from_sg(1.2185, 146.78, &be146), HC_OK);
    assert_true(be144 < be145 && be145 < be146);
    assert_near(be146 - be145, 1.78 * (1.0 - 1.0 / 1.2185), 1e-12);
}

static void sg_at_reference_temperature(void **unused)
{
    (void)unused;
    /* SG(t/t) = rho(t) / rho_w(t); rho_w from SMOW (Bigg 1967). Pure water
     * is exactly 1 at every reference temperature. */
    static const double trefs[] = {HC_TREF_15C, HC_TREF_20C, HC_TREF_60F};
    for (size_t i = 0; i < sizeof trefs / sizeof trefs[0]; i++) {
        double sg;
        assert_int_equal(hc_baume_sg(hc_eos80_rho_water(trefs[i]), trefs[i], &sg), HC_OK);
        assert_near(sg, 1.0, 1e-15);
    }
    /* 60 degF is 15.5556 degC (definition of the Fahrenheit scale) */
    assert_near(HC_TREF_60F, 15.555555555556, 1e-9);
    /* 1225.0 kg/m3 at 20 degC over SMOW at 20 degC (998.2063 kg/m3, Bigg 1967) */
    double sg;
    assert_int_equal(hc_baume_sg(1225.0, 20.0, &sg), HC_OK);
    assert_near(sg, 1225.0 / 998.2063, 2e-6);
}

static void errors(void **unused)
{
    (void)unused;
    double v = 9.0;
    assert_int_equal(hc_baume_from_sg(NAN, 145, &v), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_baume_from_sg(1.1, NAN, &v), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_baume_from_sg(1.1, 0.0, &v), HC_ERR_ARGUMENT);
    assert_int_equal(hc_baume_from_sg(1.1, -145, &v), HC_ERR_ARGUMENT);
    assert_int_equal(hc_baume_from_sg(0.99, 145, &v), HC_ERR_DOMAIN);
    assert_int_equal(hc_sg_from_baume(INFINITY, 145, &v), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_sg_from_baume(10, 0, &v), HC_ERR_ARGUMENT);
    assert_int_equal(hc_sg_from_baume(-1, 145, &v), HC_ERR_NEGATIVE);
    assert_int_equal(hc_sg_from_baume(145, 145, &v), HC_ERR_DOMAIN);
    assert_int_equal(hc_sg_from_baume(200, 145, &v), HC_ERR_DOMAIN);
    assert_int_equal(hc_baume_sg(NAN, 15, &v), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_baume_sg(1000, NAN, &v), HC_ERR_NOT_FINITE);
    assert_int_equal(hc_baume_sg(0.0, 15, &v), HC_ERR_NEGATIVE);
    assert_int_equal(hc_baume_sg(1000, 60, &v), HC_ERR_TEMPERATURE_RANGE);
    assert_true(v == 9.0);
    assert_false(hc_baume_modulus_valid(0.0));
    assert_false(hc_baume_modulus_valid(NAN));
    assert_true(hc_baume_modulus_valid(145.0));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(definition),
        cmocka_unit_test(domain_table_modulus_145),
        cmocka_unit_test(round_trips),
        cmocka_unit_test(scales_differ),
        cmocka_unit_test(sg_at_reference_temperature),
        cmocka_unit_test(errors),
    };
    return cmocka_run_group_tests_name("baume", tests, NULL, NULL);
}
