/* "Did you mean": the distance (insert, delete, substitute, swap; case and
 * '-'/'_' folded) and the closeness threshold. No science, no source. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <string.h>
#include <cmocka.h>

#include "hs_suggest.h"

static void distances(void **unused)
{
    (void)unused;
    assert_int_equal(hs_suggest_distance("latitude", "latitude"), 0);
    assert_int_equal(hs_suggest_distance("lattitude", "latitude"), 1);  /* insertion */
    assert_int_equal(hs_suggest_distance("side-slope", "side_slope"), 0); /* folded */
    assert_int_equal(hs_suggest_distance("Pond", "pond"), 0);
    assert_int_equal(hs_suggest_distance("histroy", "history"), 1);      /* swap */
    assert_int_equal(hs_suggest_distance("c9", "c1"), 1);
    assert_int_equal(hs_suggest_distance("", "abc"), 3);
    assert_int_equal(hs_suggest_distance("kitten", "sitting"), 3);
    char longname[HS_SUGGEST_MAX + 2];
    memset(longname, 'a', sizeof longname - 1);
    longname[sizeof longname - 1] = '\0';
    assert_int_equal(hs_suggest_distance(longname, "a"), -1);
}

static void nearest_within_threshold(void **unused)
{
    (void)unused;
    const char *keys[] = {"name", "database", "latitude", "elevation", "feed"};
    hs_suggest s;
    char buf[96];
    hs_suggest_init(&s, "lattitude");
    for (size_t i = 0; i < 5; i++)
        hs_suggest_offer(&s, keys[i]);
    assert_string_equal(s.best, "latitude");
    assert_string_equal(hs_suggest_text(&s, buf, sizeof buf), " (did you mean 'latitude'?)");
    /* Short names allow one edit only: "fee" -> "feed", but "xyz" -> nothing. */
    hs_suggest_init(&s, "fee");
    for (size_t i = 0; i < 5; i++)
        hs_suggest_offer(&s, keys[i]);
    assert_string_equal(s.best, "feed");
    hs_suggest_init(&s, "colour");
    for (size_t i = 0; i < 5; i++)
        hs_suggest_offer(&s, keys[i]);
    assert_null(s.best);
    assert_string_equal(hs_suggest_text(&s, buf, sizeof buf), "");
    /* The exact name is never suggested to itself. */
    hs_suggest_init(&s, "name");
    hs_suggest_offer(&s, "name");
    assert_null(s.best);
    /* The nearest of two candidates wins. */
    hs_suggest_init(&s, "c11");
    hs_suggest_offer(&s, "c2");
    hs_suggest_offer(&s, "c1");
    assert_string_equal(s.best, "c1");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(distances),
        cmocka_unit_test(nearest_within_threshold),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
