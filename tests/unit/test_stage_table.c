/* Stage-storage CSV loader: good files load, and every defect names the
 * file and line. Real files in a mkdtemp folder. No science here. */
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

#include "hs_stage_table.h"

static char dir[64];

static int make_dir(void **unused)
{
    (void)unused;
    snprintf(dir, sizeof dir, "/tmp/hs_stage_XXXXXX");
    return mkdtemp(dir) != NULL ? 0 : -1;
}

static int remove_dir(void **unused)
{
    (void)unused;
    return rmdir(dir);
}

static void write_file(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    assert_non_null(f);
    fputs(text, f);
    fclose(f);
}

static void loads_good_file(void **unused)
{
    (void)unused;
    char path[128], err[256];
    snprintf(path, sizeof path, "%s/pond.csv", dir);
    write_file(path, "# invented survey\n"
                     "volume_m3, level_m ,area_m2\r\n"
                     "\n"
                     "0,0.0,1000\n"
                     "105,0.1,1100\n"
                     "# a comment between rows\n"
                     "220,0.2,1200\n");
    struct hs_stage_table t;
    assert_int_equal(hs_stage_table_load(path, &t, err, sizeof err), 0);
    assert_int_equal(t.view.n, 3);
    assert_near(t.view.level_m[2], 0.2, 0);
    assert_near(t.view.volume_m3[1], 105, 0);
    assert_non_null(t.view.area_m2);
    assert_int_equal(t.line_of_row[2], 7);
    double v;
    assert_int_equal(hc_stage_table_at_level(&t.view, 0.1, &v, NULL), HC_OK);
    assert_near(v, 105, 1e-9);
    hs_stage_table_free(&t);
    hs_stage_table_free(&t); /* safe twice */
    unlink(path);
}

struct bad_case {
    const char *text;
    const char *expect; /* substring of the message after "NAME:" */
};

static void defects_name_file_and_line(void **unused)
{
    (void)unused;
    static const struct bad_case cases[] = {
        {"level_m,volume_m3\n0,0\n0.2,10\n0.1,20\n", "t.csv:4: level_m must increase"},
        {"level_m,volume_m3\n0,0\n0.1,10\n0.2,5\n", "t.csv:4: level_m must increase and volume_m3"},
        {"level_m,volume_m3\n0,0\n0.1,ten\n", "t.csv:3: volume_m3 'ten' is not a number"},
        {"level_m,volume_m3\n0,0\n0.1,nan\n", "t.csv:3: volume_m3 'nan' is not a number"},
        {"level_m,volume_m3\n0,0\n0.1\n", "t.csv:3: 1 fields, the header has 2"},
        {"level_m,depth\n", "t.csv:1: unknown column 'depth'"},
        {"level_m,area_m2\n0,1\n", "t.csv:1: header needs level_m (or depth_m) and volume_m3"},
        {"level_m,level_m,volume_m3\n", "t.csv:1: column 'level_m' given twice"},
        {"level_m,depth_m,volume_m3\n", "t.csv:1: column 'depth_m' given twice"},
        {"depth_m,volume_m3\n0,0\n0.1,-1\n", "t.csv:3: volume_m3 must not be negative"},
        {"level_m,volume_m3,area_m2\n0,0,5\n0.1,1,-2\n", "t.csv:3: volume_m3 and area_m2 must not be negative"},
        {"level_m,volume_m3\n0,0\n", "t.csv: a stage-storage table needs at least 2 rows"},
        {"# nothing\n\n", "t.csv: empty table"},
        {"level_m,volume_m3\n0,0\n0.1,,\n", "t.csv:3: 3 fields"},
        {"level_m,volume_m3\n0,0\n0.1,1e999\n", "t.csv:3: volume_m3 '1e999' is not a number"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        struct hs_stage_table t;
        char err[256] = "";
        assert_int_equal(hs_stage_table_parse("t.csv", cases[i].text, &t, err, sizeof err), -1);
        if (strstr(err, cases[i].expect) == NULL) {
            print_error("case %zu: got '%s', expected '%s'\n", i, err, cases[i].expect);
            fail();
        }
        assert_null(t.level_m);
    }
}

static void missing_and_binary_files(void **unused)
{
    (void)unused;
    char path[128], err[256];
    struct hs_stage_table t;
    snprintf(path, sizeof path, "%s/absent.csv", dir);
    assert_int_equal(hs_stage_table_load(path, &t, err, sizeof err), -1);
    assert_non_null(strstr(err, "absent.csv: cannot open"));
    snprintf(path, sizeof path, "%s/bin.csv", dir);
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    fwrite("level_m\0volume", 1, 14, f);
    fclose(f);
    assert_int_equal(hs_stage_table_load(path, &t, err, sizeof err), -1);
    assert_non_null(strstr(err, "NUL byte"));
    unlink(path);
}

static void garbage_never_crashes(void **unused)
{
    (void)unused;
    /* Random bytes (fixed seed) through the parser: it must only ever
     * accept or refuse with a message. */
    srand(12345);
    char text[256];
    int accepted = 0;
    for (int round = 0; round < 2000; round++) {
        size_t n = (size_t)(rand() % 255);
        static const char alphabet[] = "level_m,volume_m3area\n0123456789.-e#, \t\r";
        for (size_t i = 0; i < n; i++)
            text[i] = alphabet[rand() % (int)(sizeof alphabet - 1)];
        text[n] = '\0';
        struct hs_stage_table t;
        char err[128] = "";
        if (hs_stage_table_parse("fuzz", text, &t, err, sizeof err) == 0) {
            accepted++;
            hs_stage_table_free(&t);
        } else {
            assert_true(strncmp(err, "fuzz", 4) == 0);
        }
    }
    (void)accepted;
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(loads_good_file),
        cmocka_unit_test(defects_name_file_and_line),
        cmocka_unit_test(missing_and_binary_files),
        cmocka_unit_test(garbage_never_crashes),
    };
    return cmocka_run_group_tests(tests, make_dir, remove_dir);
}
