/* Hydrology of configured ponds: a real configuration file and a real
 * stage-storage CSV in a mkdtemp folder; levels from pressure (with the
 * brine's density and local gravity), from a pressure pair and from a
 * distance sensor, against worked examples. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hydro_near.h"

#include "hc_level.h"
#include "hs_config.h"
#include "hs_hydro_site.h"

static char dir[64], ini[128], bad_ini[128], csv[128], bad_csv[128];

static void write_file(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    if (f == NULL)
        abort();
    fputs(text, f);
    fclose(f);
}

static int setup(void **unused)
{
    (void)unused;
    snprintf(dir, sizeof dir, "/tmp/hs_hsite_XXXXXX");
    if (mkdtemp(dir) == NULL)
        return -1;
    snprintf(ini, sizeof ini, "%s/site.ini", dir);
    snprintf(csv, sizeof csv, "%s/x1.csv", dir);
    snprintf(bad_csv, sizeof bad_csv, "%s/x2.csv", dir);
    write_file(csv, "level_m,volume_m3\n0,0\n0.5,20000\n1.0,41000\n");
    write_file(bad_csv, "level_m,volume_m3\n0,0\n0.5,20000\n0.4,41000\n");
    write_file(ini, "[site]\nname = t\ndatabase = t.db\nlatitude = 38.5\nelevation = 0 m\n"
                    "[bus plc]\ntype = tcp\nhost = 127.0.0.1\nport = 15020\nunit_ids = 1\n"
                    "[pond store]\nrole = brine-store\narea = 3 ha\nside_slope = 2\n"
                    "freeboard = 2.8 m\npressure_spacing = 0.50 m\npressure_height = 0.10 m\n"
                    "[pond x1]\nrole = crystalliser\nstage_storage = x1.csv\n"
                    "distance_height = 2.0 m\n");
    snprintf(bad_ini, sizeof bad_ini, "%s/bad.ini", dir);
    write_file(bad_ini, "[site]\nname = t\nlatitude = 38.5\n"
                        "[bus plc]\ntype = tcp\nhost = 127.0.0.1\nport = 15020\nunit_ids = 1\n"
                        "[pond x2]\nrole = crystalliser\nstage_storage = x2.csv\n");
    return 0;
}

static int teardown(void **unused)
{
    (void)unused;
    unlink(ini);
    unlink(bad_ini);
    unlink(csv);
    unlink(bad_csv);
    return rmdir(dir);
}

static void load(hs_site *site)
{
    static hs_diag diag;
    if (hs_site_load(ini, site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            print_error("%s\n", diag.msg[i]);
        fail();
    }
}

static void pressure_pair_and_level(void **unused)
{
    (void)unused;
    hs_site site;
    load(&site);
    struct hs_hydro_pond hp;
    char err[256];
    assert_int_equal(hs_hydro_pond_open(&site, (size_t)hs_site_pond(&site, "store"), NULL, &hp,
                                        err, sizeof err), 0);
    /* Local gravity at 38.5 N is TEOS-10 gsw.grav(38.5, 0) = 9.800369856. */
    assert_near(hp.g_m_s2, 9.800369856024, 1e-9);
    /* Worked by hand: brine of 1210 kg/m3, 1.20 m above the lower sensor
     * (0.10 m above the floor), upper sensor 0.50 m higher:
     * p_low = 1210 g 1.20, p_up = 1210 g 0.70; the pair gives 1210 back
     * and the depth is 1.20 + 0.10 = 1.30 m. */
    double g = hp.g_m_s2;
    struct hs_level_inputs in = {1210 * g * 1.20, 1210 * g * 0.70, NAN, NAN};
    struct hs_level_result r;
    hs_hydro_pond_level(&hp, &in, &r);
    assert_near(r.pair_density_kg_m3, 1210, 1e-9);
    assert_near(r.depth_m, 1.30, 1e-12);
    /* Upper sensor dry: no pair; with the state's density the depth is
     * still compensated; without any density there is no depth. */
    struct hs_level_inputs dry = {1210 * g * 0.40, 0, NAN, 1210};
    hs_hydro_pond_level(&hp, &dry, &r);
    assert_true(isnan(r.pair_density_kg_m3));
    assert_near(r.depth_m, 0.50, 1e-12);
    dry.density_kg_m3 = NAN;
    hs_hydro_pond_level(&hp, &dry, &r);
    assert_true(isnan(r.depth_m));
    assert_non_null(r.why);
    /* Prism from area and slope: 3 ha floor, crest at the freeboard. */
    assert_int_equal(hp.tracker.cfg.shape.is_table, 0);
    assert_near(hp.tracker.cfg.shape.prism.max_level_m, 2.8, 1e-12);
    assert_int_equal(hp.tracker.cfg.crystalliser, 0);
    hs_hydro_pond_close(&hp);
    hs_site_free(&site);
}

static void table_pond_and_distance(void **unused)
{
    (void)unused;
    hs_site site;
    load(&site);
    struct hs_hydro_pond hp;
    char err[256];
    assert_int_equal(hs_hydro_pond_open(&site, (size_t)hs_site_pond(&site, "x1"), NULL, &hp, err,
                                        sizeof err), 0);
    assert_int_equal(hp.tracker.cfg.shape.is_table, 1);
    assert_int_equal(hp.tracker.cfg.crystalliser, 1);
    /* Distance 1.70 m from 2.0 m above the floor: 0.30 m deep. */
    struct hs_level_inputs in = {NAN, NAN, 1.70, NAN};
    struct hs_level_result r;
    hs_hydro_pond_level(&hp, &in, &r);
    assert_near(r.depth_m, 0.30, 1e-12);
    struct hs_hydro_sample s = {0, r.depth_m, 1220, 300, 12, 0.74};
    assert_int_equal(hs_hydro_sample(&hp.tracker, &s, NULL), 0);
    hs_hydro_pond_close(&hp);
    hs_hydro_pond_close(&hp);
    hs_site_free(&site);
    /* A non-monotone table is refused when the configuration is read, with
     * the config's line and the table's own file and line. */
    static hs_diag diag;
    assert_int_equal(hs_site_load(bad_ini, &site, &diag), -1);
    int found = 0;
    for (unsigned i = 0; i < diag.n; i++)
        found |= strstr(diag.msg[i], "bad.ini:11: stage_storage: ") != NULL &&
                 strstr(diag.msg[i], "x2.csv:4: level_m must increase") != NULL;
    if (!found) {
        for (unsigned i = 0; i < diag.n; i++)
            print_error("%s\n", diag.msg[i]);
        fail();
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(pressure_pair_and_level),
        cmocka_unit_test(table_pond_and_distance),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
