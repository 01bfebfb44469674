/* The configuration reader: a valid file loads with the values it states,
 * and each class of mistake is reported as FILE:LINE: with the right line.
 * No science here, so no source to cite. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "conf_file.h"
#include "hs_config.h"

/* cmocka 1.1.5 has no floating-point assertion. */
#define assert_double_equal(a, b, tol) assert_true(fabs((double)(a) - (double)(b)) <= (tol))

static conf_dir cd;

/* Lines 1..22; tests append to it or replace parts. */
#define BASE \
    "[site]\n"                          /* 1 */ \
    "name = test-works\n"               /* 2 */ \
    "latitude = 10\n"                   /* 3 */ \
    "\n"                                /* 4 */ \
    "[bus plc]\n"                       /* 5 */ \
    "type = tcp\n"                      /* 6 */ \
    "host = 127.0.0.1\n"                /* 7 */ \
    "port = 1502\n"                     /* 8 */ \
    "unit_ids = 1,3-4\n"                /* 9 */ \
    "\n"                                /* 10 */ \
    "[pond a]\n"                        /* 11 */ \
    "role = concentrator\n"             /* 12 */ \
    "area = 2 ha\n"                     /* 13 */ \
    "next = b\n"                        /* 14 */ \
    "[pond b]\n"                        /* 15 */ \
    "role = crystalliser\n"             /* 16 */ \
    "area = 5000 m2\n"                  /* 17 */ \
    "[signal a.temperature]\n"          /* 18 */ \
    "bus = plc\n"                       /* 19 */ \
    "address = 10\n"                    /* 20 */ \
    "type = int16\n"                    /* 21 */ \
    "unit = C\n"                        /* 22 */

static void expect_error(const char *text, int line, const char *what)
{
    conf_expect_error(&cd, text, line, what);
}

static int make_dir(void **state)
{
    (void)state;
    if (conf_dir_make(&cd, "cfg") != 0)
        return -1;
    return 0;
}

static int remove_dir(void **state)
{
    (void)state;
    return conf_dir_remove(&cd, "levels.csv", (const char *)NULL);
}

static void valid_file_loads(void **state)
{
    (void)state;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "valid_max = 60\nsentinels = -32768, 32767\npoll_interval = 2.5s\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_string_equal(site.site.name, "test-works");
    assert_double_equal(site.site.baume_modulus, 145.0, 0.0);       /* default */
    assert_double_equal(site.site.reference_temperature_c, 20.0, 0.0);
    assert_int_equal(site.n_buses, 1);
    assert_int_equal(site.buses[0].n_unit_ids, 3);
    assert_int_equal(site.buses[0].unit_ids[2], 4);
    assert_int_equal(site.buses[0].conf.response_timeout_ms, 500);
    assert_int_equal(site.n_ponds, 2);
    assert_double_equal(site.ponds[0].floor_area_m2, 20000.0, 1e-9);
    assert_int_equal(site.ponds[0].next_index, 1);
    assert_int_equal(site.ponds[1].next_index, -1);
    assert_int_equal(site.n_signals, 1);
    const hs_signal *g = &site.signals[0];
    assert_int_equal(g->pond_index, 0);
    assert_int_equal(g->bus_index, 0);
    assert_int_equal(g->point.unit_id, 1);              /* the bus's first */
    assert_int_equal(g->point.address, 10);
    assert_int_equal(g->point.type, HP_INT16);
    assert_int_equal(g->point.n_sentinels, 2);
    assert_double_equal(g->point.sentinels[0], -32768.0, 0.0);
    assert_int_equal(g->point.interval_ms, 2500);
    /* no valid_min: the built-in plausible limit of a temperature (-10 degC,
     * common practice, hs_plausible.h); valid_max 60 is narrower than 70 */
    assert_double_equal(g->point.valid_min, -10.0, 0.0);
    assert_double_equal(g->point.valid_max, 60.0, 0.0);
    char want[200];
    snprintf(want, sizeof want, "%s/halostage.db", cd.dir);
    assert_string_equal(site.site.database, want);  /* relative to the file */
    hs_site_free(&site);
}

/* BASE's [site] (lines 1-3) with extra keys after it (line 4 on); the rest of
 * BASE follows, shifted by the number of extra lines. */
#define SITE_THEN(extra) "[site]\nname = test-works\nlatitude = 10\n" extra \
    "[bus plc]\ntype = tcp\nhost = 127.0.0.1\nport = 1502\nunit_ids = 1\n" \
    "[pond a]\nrole = concentrator\narea = 2 ha\n"

static void retention_keys(void **state)
{
    (void)state;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, SITE_THEN(""));
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_int_equal(site.site.raw_retention_ms, 30LL * 86400000);     /* defaults */
    assert_int_equal(site.site.minute_retention_ms, 35LL * 86400000);
    assert_int_equal(site.site.hour_retention_ms, 3650LL * 86400000);
    hs_site_free(&site);
    conf_write_file(cd.path, SITE_THEN("raw_retention = 7d\nminute_retention = 90d\n"
                                       "hour_retention = 20000d\n"));
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_int_equal(site.site.raw_retention_ms, 7LL * 86400000);
    assert_int_equal(site.site.minute_retention_ms, 90LL * 86400000);
    assert_int_equal(site.site.hour_retention_ms, 20000LL * 86400000);
    hs_site_free(&site);
}
static void retention_order(void **s)
{
    (void)s;
    expect_error(SITE_THEN("raw_retention = 60d\nminute_retention = 30d\n"), 5,
                 "minute_retention: shorter than raw_retention");
    expect_error(SITE_THEN("hour_retention = 20d\n"), 4,
                 "hour_retention: shorter than minute_retention");
    expect_error(SITE_THEN("raw_retention = 12h\n"), 4, "raw_retention");
}

static void unknown_section(void **s)  { (void)s; expect_error(BASE "[pump x]\n", 23, "unknown section [pump]"); }
static void unknown_key(void **s)      { (void)s; expect_error(BASE "colour = red\n", 23, "unknown key 'colour'"); }
static void duplicate_key(void **s)    { (void)s; expect_error(BASE "unit = mS/cm\n", 23, "duplicate key 'unit'"); }
static void duplicate_section(void **s){ (void)s; expect_error(BASE "[pond a]\nrole = bittern\n", 23, "duplicate section [pond a] (first on line 11)"); }
static void missing_required(void **s)
{
    (void)s;
    expect_error(BASE "[pond c]\narea = 1 ha\n", 23, "missing required key 'role'");
}
static void missing_site(void **s)
{
    (void)s;
    expect_error("[pond c]\nrole = bittern\narea = 1 ha\n[bus x]\ntype = tcp\nhost = h\n", 6,
                 "missing section [site]");
}
static void unknown_bus(void **s)
{
    (void)s;
    expect_error(BASE "[signal b.temperature]\naddress = 1\ntype = int16\nunit = C\nbus = plx\n",
                 27, "no [bus plx]");
}
static void unknown_pond(void **s)
{
    (void)s;
    expect_error(BASE "[signal q.temperature]\nbus = plc\naddress = 1\ntype = int16\nunit = C\n",
                 23, "no [pond q]");
}
static void unknown_next(void **s)
{
    (void)s;
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\nnext = zz\n", 26, "no [pond zz]");
}
static void overlapping_signals(void **s)
{
    (void)s;
    expect_error(BASE "[signal b.conductivity]\nbus = plc\ntype = float32\naddress = 9\n"
                 "unit = mS/cm\n", 26, "overlap registers 10-10 of [signal a.temperature]");
}
static void number_garbage(void **s)   { (void)s; expect_error(BASE "valid_max = 6o\n", 23, "unexpected 'o'"); }
static void out_of_bounds(void **s)
{
    (void)s;
    expect_error(BASE "[signal b.temperature]\nbus = plc\naddress = 70000\ntype = int16\n"
                 "unit = C\n", 25, "70000 is above the maximum 65535");
    expect_error(BASE "[signal b.temperature]\nbus = plc\naddress = 65535\ntype = int32\n"
                 "unit = C\n", 25, "runs past register 65535");
}
static void latitude_bounds(void **s)
{
    (void)s;
    expect_error("[site]\nname = x\nlatitude = 91\n", 3, "above the maximum 90");
}
static void unit_needed(void **s)
{
    (void)s;
    expect_error(BASE "[pond c]\nrole = bittern\narea = 3\n", 25, "needs a unit of area");
}
static void bad_unit(void **s)         { (void)s; expect_error(BASE "[pond c]\nrole = bittern\narea = 3 acres\n", 25, "unknown unit 'acres'"); }
static void bad_duration(void **s)     { (void)s; expect_error(BASE "poll_interval = 10\n", 23, "needs a unit (ms, s"); }
static void bad_enum_value(void **s)
{
    (void)s;
    expect_error(BASE "[signal b.temperature]\nbus = plc\naddress = 1\ntype = int24\nunit = C\n",
                 26, "'int24' is not one of: int16, uint16");
}
static void bad_baud(void **s)
{
    (void)s;
    expect_error(BASE "[bus line]\ntype = rtu\ndevice = /dev/ttyS9\nbaud = 9601\n", 26,
                 "9601 is not a supported baud rate");
}
static void tcp_key_on_rtu(void **s)
{
    (void)s;
    expect_error(BASE "[bus line]\ntype = rtu\ndevice = /dev/ttyS9\nport = 502\n", 26,
                 "port: applies only to tcp buses");
}
static void unit_id_not_on_bus(void **s)
{
    (void)s;
    expect_error(BASE "unit_id = 2\n", 23, "unit_id: 2 is not in unit_ids");
}
static void wrong_signal_unit(void **s)
{
    (void)s;
    expect_error(BASE "[signal b.conductivity]\nbus = plc\naddress = 1\ntype = int16\nunit = kPa\n",
                 27, "'kPa' is not a unit of conductivity");
}
static void bad_quantity(void **s)     { (void)s; expect_error(BASE "[signal a.salinity]\n", 23, "unknown quantity 'salinity'"); }
static void key_of_other_section(void **s)
{
    (void)s;
    expect_error(BASE "next = a\n", 23, "unknown key 'next' in [signal a.temperature]");
}
static void chain_cycle(void **s)
{
    (void)s;
    expect_error("[site]\nname = x\nlatitude = 1\n[bus p]\ntype = tcp\nhost = h\n"
                 "[pond a]\nrole = bittern\narea = 1 ha\nnext = b\n"
                 "[pond b]\nrole = bittern\narea = 1 ha\nnext = a\n", 10, "loops back");
}
static void band_order(void **s)
{
    (void)s;
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\ndensity_in = 1.2 g/cm3\n"
                 "density_out = 1150 kg/m3\n", 27, "must be above density_in (1200");
}
static void geometry_missing(void **s) { (void)s; expect_error(BASE "[pond c]\nrole = bittern\n", 23, "needs its geometry"); }
static void stage_storage_missing(void **s)
{
    (void)s;
    expect_error(BASE "[pond c]\nrole = bittern\nstage_storage = levels.csv\n", 25, "cannot open");
}
static void malformed_lines(void **s)
{
    (void)s;
    expect_error(BASE "just words\n", 23, "expected KEY = VALUE");
    expect_error(BASE "[pond c\n", 23, "malformed section header");
    expect_error("name = x\n[site]\n", 1, "outside any section");
}
static void indented_keys_are_keys(void **s)
{
    (void)s;
    /* inih would join an indented line onto the previous value; we do not. */
    expect_error(BASE "    valid_max = 5\n    valid_max = 6\n", 24, "duplicate key 'valid_max'");
}
static void feed_checks(void **s)
{
    (void)s;
    expect_error(BASE "[feed lagoon]\nunit = mg/L\nna = 12000\ncl = 21000\n", 24,
                 "needs the water's density");
    expect_error(BASE "[site]\n", 23, "duplicate section [site]");
    expect_error("[site]\nname = x\nlatitude = 1\nfeed = lagoon\n[bus p]\ntype = tcp\nhost = h\n"
                 "[pond a]\nrole = bittern\narea = 1 ha\n", 4, "no [feed lagoon]");
}
static void feed_converts(void **s)
{
    (void)s;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[feed lagoon]\nunit = mg/L\ndensity = 1025 kg/m3\nna = 10250\ncl = 20500\n"
               "[pond c]\nrole = intake\narea = 1 ha\nfeed = lagoon\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_int_equal(site.n_feeds, 1);
    /* 10250 mg/L in water of 1.025 kg/L is 10 g/kg (arithmetic). */
    assert_double_equal(site.feeds[0].g_kg[HS_ION_NA], 10.0, 1e-12);
    assert_int_equal(site.ponds[2].feed_index, 0);
    assert_int_equal(site.ponds[0].feed_index, -1);
    hs_site_free(&site);
}
/* Bands in the trade's units: degree Baume on the heavy-liquid scale with
 * the site's modulus, SG = m / (m - Be) (NBS Circular 59, 1916), and SG
 * t_ref/t_ref, both turned into kg/m3 at the reference temperature (20 degC
 * here) with pure water 998.207 kg/m3 at 20 degC (Kell 1975, J. Chem. Eng.
 * Data 20, 97). A bare number is refused as ambiguous, with its line. */
static void reference_density_scales(void **s)
{
    (void)s;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "[pond c]\nrole = bittern\narea = 1 ha\n"
                    "density_in = 1.150 SG\ndensity_out = 25.5 Be\n"
                    "[pond d]\nrole = bittern\narea = 1 ha\ndensity_in = 1.2 g/cm3\n"
                    "density_out = 1230 kg/m3\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), 0);
    assert_double_equal(site.ponds[2].density_in_kg_m3, 1.150 * 998.207, 0.05);
    assert_double_equal(site.ponds[2].density_out_kg_m3, 145.0 / (145.0 - 25.5) * 998.207, 0.05);
    assert_double_equal(site.ponds[3].density_in_kg_m3, 1200.0, 1e-9);
    hs_site_free(&site);
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\ndensity_out = 1.25\n", 26,
                 "density_out: '1.25' is ambiguous");
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\ndensity_out = 80 Be\n", 26,
                 "density_out: SG 2.23");
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\ndensity_out = 150 Be\n", 26,
                 "not on the heavy-liquid scale of modulus 145");
    expect_error(BASE "[pond c]\nrole = bittern\narea = 1 ha\ndensity_out = 25 furlongs\n", 26,
                 "unknown unit 'furlongs'");
}
static void long_line(void **s)
{
    (void)s;
    char text[1200];
    snprintf(text, sizeof text, "%sunit = %0300d\n", BASE, 1);
    expect_error(text, 23, "line longer than");
}
static void missing_file(void **s)
{
    (void)s;
    hs_site site;
    hs_diag diag;
    assert_int_equal(hs_site_load("/nonexistent/x.ini", &site, &diag), -1);
    assert_non_null(strstr(diag.msg[0], "/nonexistent/x.ini: cannot open"));
}
static void all_errors_reported(void **s)
{
    (void)s;
    hs_site site;
    hs_diag diag;
    conf_write_file(cd.path, BASE "colour = red\nsize = 3\n[pump x]\nflow = 3\n");
    assert_int_equal(hs_site_load(cd.path, &site, &diag), -1);
    assert_int_equal(diag.n, 3); /* two keys and the section; not its keys */
}

/* config/reference.ini shows every key of every section type (the tests run
 * from the repository's top folder). */
static void reference_shows_every_key(void **s)
{
    (void)s;
    FILE *f = fopen("config/reference.ini", "r");
    assert_non_null(f);
    static char text[1 << 16];
    size_t n = fread(text, 1, sizeof text - 1, f);
    fclose(f);
    text[n] = '\0';
    for (size_t t = 0; hs_section_types[t]; t++) {
        char header[64];
        snprintf(header, sizeof header, "\n[%s", hs_section_types[t]->kind);
        if (!strstr(text, header))
            fail_msg("reference.ini has no [%s] section", hs_section_types[t]->kind);
        for (const hs_key *k = hs_section_types[t]->keys; k->name; k++) {
            char a[64], b[64];
            snprintf(a, sizeof a, "\n%s = ", k->name);
            snprintf(b, sizeof b, "\n; %s = ", k->name);
            if (!strstr(text, a) && !strstr(text, b))
                fail_msg("reference.ini does not show [%s] %s", hs_section_types[t]->kind,
                         k->name);
        }
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(valid_file_loads), cmocka_unit_test(unknown_section),
        cmocka_unit_test(unknown_key), cmocka_unit_test(duplicate_key),
        cmocka_unit_test(duplicate_section), cmocka_unit_test(missing_required),
        cmocka_unit_test(missing_site), cmocka_unit_test(unknown_bus),
        cmocka_unit_test(unknown_pond), cmocka_unit_test(unknown_next),
        cmocka_unit_test(overlapping_signals), cmocka_unit_test(number_garbage),
        cmocka_unit_test(out_of_bounds), cmocka_unit_test(latitude_bounds),
        cmocka_unit_test(unit_needed), cmocka_unit_test(bad_unit),
        cmocka_unit_test(bad_duration), cmocka_unit_test(bad_enum_value), cmocka_unit_test(bad_baud),
        cmocka_unit_test(tcp_key_on_rtu), cmocka_unit_test(unit_id_not_on_bus),
        cmocka_unit_test(wrong_signal_unit), cmocka_unit_test(bad_quantity),
        cmocka_unit_test(key_of_other_section), cmocka_unit_test(chain_cycle),
        cmocka_unit_test(band_order), cmocka_unit_test(geometry_missing),
        cmocka_unit_test(stage_storage_missing), cmocka_unit_test(malformed_lines),
        cmocka_unit_test(indented_keys_are_keys), cmocka_unit_test(feed_checks),
        cmocka_unit_test(feed_converts), cmocka_unit_test(long_line),
        cmocka_unit_test(reference_density_scales),
        cmocka_unit_test(missing_file), cmocka_unit_test(all_errors_reported),
        cmocka_unit_test(reference_shows_every_key),
        cmocka_unit_test(retention_keys), cmocka_unit_test(retention_order),
    };
    return cmocka_run_group_tests(tests, make_dir, remove_dir);
}
