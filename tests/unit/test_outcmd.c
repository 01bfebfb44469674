/* Unit tests of the output-command slots of a bus (protocol/hp_outcmd.h):
 * one slot per output, a newer request replaces a waiting one, a full table
 * refuses with ENOBUFS, and nothing is reported before a result exists.
 * The Modbus side (hp_outcmd_run) is exercised over TCP by
 * tests/integration/test_actuation_matrix.sh. */
#include <errno.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include "hp_outcmd.h"

static void newer_replaces_waiting(void **u)
{
    (void)u;
    hp_outcmd *q = hp_outcmd_new();
    assert_non_null(q);
    assert_false(hp_outcmd_pending(q));
    uint32_t a = 0, b = 0, c = 0;
    assert_int_equal(hp_outcmd_post(q, 1, true, 5, HP_OUTCMD_WRITE_VERIFY, 1, &a), 0);
    assert_true(hp_outcmd_pending(q));
    assert_int_equal(hp_outcmd_post(q, 1, true, 5, HP_OUTCMD_WRITE_VERIFY, 0, &b), 0);
    assert_true(b > a); /* the later decision has the later number */
    assert_int_equal(hp_outcmd_post(q, 1, false, 30, HP_OUTCMD_WRITE, 7, &c), 0);
    assert_true(c > b);
    hp_outcmd_result r;
    errno = 0;
    assert_int_equal(hp_outcmd_result_get(q, 1, true, 5, &r), -1); /* nothing carried out yet */
    assert_int_equal(errno, ENOENT);
    assert_int_equal(hp_outcmd_result_get(q, 9, true, 5, &r), -1); /* unknown output */
    hp_outcmd_free(q);
}

static void table_full(void **u)
{
    (void)u;
    hp_outcmd *q = hp_outcmd_new();
    uint32_t seq;
    for (unsigned i = 0; i < HP_OUTCMD_SLOTS; i++)
        assert_int_equal(hp_outcmd_post(q, 1, false, (uint16_t)i, HP_OUTCMD_READ, 0, &seq), 0);
    errno = 0;
    assert_int_equal(hp_outcmd_post(q, 1, false, 999, HP_OUTCMD_READ, 0, &seq), -1);
    assert_int_equal(errno, ENOBUFS);
    /* an output that has a slot can always be asked again */
    assert_int_equal(hp_outcmd_post(q, 1, false, 3, HP_OUTCMD_WRITE, 1, &seq), 0);
    assert_int_equal(hp_outcmd_post(q, 1, false, 3, HP_OUTCMD_READ, 1, NULL), -1);
    hp_outcmd_free(q);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(newer_replaces_waiting),
        cmocka_unit_test(table_full),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
