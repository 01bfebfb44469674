/* The config reader against garbage: thousands of mutated copies of
 * config/demo.ini (byte flips, truncations, duplicated, deleted and swapped
 * lines, huge values, long lines, NUL bytes, invalid UTF-8), each either
 * loading or failing with every message in the form "FILE:LINE: text".
 * Run under ASan/UBSan by `make check`, so a read past a buffer or an
 * overflowing conversion fails here. The seed is fixed: a failure repeats.
 * No science here. */
#include <ctype.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "hs_config.h"

#define CASES 3000
#define MAX_TEXT (1u << 20)

static char dir[64];
static char path[128];
static char *base;      /* demo.ini as read */
static size_t base_len;
static char *work;      /* the mutated copy */
static size_t work_len;

/* xorshift64*: a fixed, platform-independent stream. */
static uint64_t rng_state;
static uint64_t rnd(void)
{
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return rng_state * 2685821657736338717ull;
}
static size_t pick(size_t n) { return n == 0 ? 0 : (size_t)(rnd() % n); }

static int setup(void **state)
{
    (void)state;
    FILE *f = fopen("config/demo.ini", "rb");
    if (f == NULL)
        return -1;
    base = malloc(MAX_TEXT);
    work = malloc(MAX_TEXT);
    if (base == NULL || work == NULL) {
        fclose(f);
        return -1;
    }
    base_len = fread(base, 1, MAX_TEXT / 4, f);
    fclose(f);
    snprintf(dir, sizeof dir, "/tmp/hs-cfgfuzz.XXXXXX");
    if (mkdtemp(dir) == NULL)
        return -1;
    snprintf(path, sizeof path, "%s/site.ini", dir);
    return base_len > 0 ? 0 : -1;
}

static int teardown(void **state)
{
    (void)state;
    unlink(path);
    rmdir(dir);
    free(base);
    free(work);
    return 0;
}

/* Inserts len bytes at pos (bounded by MAX_TEXT). */
static void insert_at(size_t pos, const char *bytes, size_t len)
{
    if (work_len + len > MAX_TEXT)
        return;
    memmove(work + pos + len, work + pos, work_len - pos);
    memcpy(work + pos, bytes, len);
    work_len += len;
}

static void remove_range(size_t pos, size_t len)
{
    memmove(work + pos, work + pos + len, work_len - pos - len);
    work_len -= len;
}

/* Start and length (with its newline) of a random line. */
static void random_line(size_t *start, size_t *len)
{
    size_t p = pick(work_len);
    while (p > 0 && work[p - 1] != '\n')
        p--;
    size_t e = p;
    while (e < work_len && work[e] != '\n')
        e++;
    if (e < work_len)
        e++;
    *start = p;
    *len = e - p;
}

static const char *const huge_values[] = {
    "1e308", "-1e308", "1e400", "nan", "inf", "-inf", "99999999999999999999999",
    "-9223372036854775809", "18446744073709551616", "4294967296", "65536", "256",
    "0x7fffffff", "1e-400", "9999999999999999999999d", "99999999999999h",
    "-1s", "1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19,20,21,22,23,24,25,26,27,28,29,30,31,32,33",
    "0-255", "1-99999", "", " ", "=", "[", "]", "\"", ";", "#",
};

static void mutate_once(void)
{
    size_t s, n;
    char buf[64];
    switch (pick(11)) {
    case 0: /* flip bytes */
        for (size_t k = 1 + pick(4); k > 0 && work_len > 0; k--)
            work[pick(work_len)] ^= (char)(1u << pick(8));
        break;
    case 1: /* truncate */
        work_len = pick(work_len + 1);
        break;
    case 2: /* duplicate a line */
        random_line(&s, &n);
        if (n < 4096) {
            char line[4096];
            memcpy(line, work + s, n);
            insert_at(s, line, n);
        }
        break;
    case 3: /* delete a line */
        random_line(&s, &n);
        remove_range(s, n);
        break;
    case 4: { /* a huge or odd value for a key */
        random_line(&s, &n);
        char *eq = memchr(work + s, '=', n);
        if (eq != NULL) {
            size_t v = (size_t)(eq - work) + 1;
            size_t end = s + n;
            if (end > s && work[end - 1] == '\n')
                end--;
            remove_range(v, end - v);
            const char *h = huge_values[pick(sizeof huge_values / sizeof *huge_values)];
            insert_at(v, h, strlen(h));
        }
        break;
    }
    case 5: { /* a long line: a key, a value or a section name */
        size_t len = 200 + pick(6000);
        char *line = malloc(len + 16);
        if (line == NULL)
            break;
        size_t i = 0;
        int shape = (int)pick(3);
        if (shape == 1)
            line[i++] = '[';
        for (; i < len; i++)
            line[i] = shape == 2 && i == len / 2 ? '=' : (char)('a' + pick(26));
        if (shape == 1)
            line[i++] = ']';
        line[i++] = '\n';
        random_line(&s, &n);
        insert_at(s, line, i);
        free(line);
        break;
    }
    case 6: /* NUL bytes */
        for (size_t k = 1 + pick(3); k > 0; k--)
            insert_at(pick(work_len + 1), "\0", 1);
        break;
    case 7: { /* invalid UTF-8 */
        static const char *const bad[] = {"\xff", "\xfe\xff", "\xc0\x80", "\x80",
                                          "\xed\xa0\x80", "\xf8\x88\x80\x80\x80", "\xc3"};
        const char *b = bad[pick(sizeof bad / sizeof *bad)];
        insert_at(pick(work_len + 1), b, strlen(b));
        break;
    }
    case 8: { /* swap two lines */
        size_t s2, n2;
        random_line(&s, &n);
        random_line(&s2, &n2);
        if (s == s2 || n > 4096)
            break;
        char line[4096];
        memcpy(line, work + s, n);
        remove_range(s, n);
        if (s2 > s)
            s2 -= n;
        insert_at(s2, line, n);
        break;
    }
    case 9: /* random bytes */
        for (size_t k = 1 + pick(32); k > 0; k--) {
            buf[0] = (char)pick(256);
            insert_at(pick(work_len + 1), buf, 1);
        }
        break;
    default: /* a stray line ending, CR, tab or lone bracket */
        buf[0] = "\r\n\t[]=;#\\"[pick(9)];
        insert_at(pick(work_len + 1), buf, 1);
        break;
    }
}

/* True when msg is "PATH:DIGITS: something". */
static int well_formed(const char *msg)
{
    size_t pl = strlen(path);
    if (strncmp(msg, path, pl) != 0 || msg[pl] != ':')
        return 0;
    const char *p = msg + pl + 1;
    if (!isdigit((unsigned char)*p))
        return 0;
    while (isdigit((unsigned char)*p))
        p++;
    return p[0] == ':' && p[1] == ' ' && p[2] != '\0';
}

static void write_work(void)
{
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    assert_int_equal(fwrite(work, 1, work_len, f), work_len);
    assert_int_equal(fclose(f), 0);
}

static void demo_loads_unmutated(void **state)
{
    (void)state;
    memcpy(work, base, base_len);
    work_len = base_len;
    write_work();
    hs_site site;
    hs_diag diag;
    memset(&diag, 0, sizeof diag);
    int rc = hs_site_load(path, &site, &diag);
    if (rc != 0)
        print_error("%s\n", diag.msg[0]);
    assert_int_equal(rc, 0);
    hs_site_free(&site);
}

static void mutated_demo_loads_or_says_where(void **state)
{
    (void)state;
    rng_state = 0x5a17b0a7c0ffee01ull;
    unsigned loaded = 0, refused = 0, messages = 0;
    for (unsigned c = 0; c < CASES; c++) {
        memcpy(work, base, base_len);
        work_len = base_len;
        for (size_t k = 1 + pick(c % 7 == 0 ? 8 : 2); k > 0; k--)
            mutate_once();
        write_work();
        hs_site site;
        hs_diag diag;
        memset(&diag, 0, sizeof diag);
        int rc = hs_site_load(path, &site, &diag);
        if (rc == 0) {
            loaded++;
            hs_site_free(&site);
            continue;
        }
        assert_int_equal(rc, -1);
        refused++;
        if (diag.n == 0)
            fail_msg("case %u: refused without a message", c);
        for (unsigned i = 0; i < diag.n; i++) {
            messages++;
            if (!well_formed(diag.msg[i]))
                fail_msg("case %u: message not FILE:LINE: text: '%s'", c, diag.msg[i]);
        }
    }
    print_message("config fuzz: %u cases, %u loaded, %u refused, %u messages\n", CASES,
                  loaded, refused, messages);
    /* The mutations must reach the checks: most are refused, some are harmless. */
    assert_true(refused > CASES / 4);
    assert_true(loaded > 0);
}

/* A file that is not there, a folder, and an empty file. */
static void unreadable_files(void **state)
{
    (void)state;
    hs_site site;
    hs_diag diag;
    memset(&diag, 0, sizeof diag);
    assert_int_equal(hs_site_load("/nonexistent/halostage/site.ini", &site, &diag), -1);
    assert_true(diag.n >= 1);
    assert_non_null(strstr(diag.msg[0], "/nonexistent/halostage/site.ini"));
    memset(&diag, 0, sizeof diag);
    assert_int_equal(hs_site_load(dir, &site, &diag), -1);
    assert_true(diag.n >= 1);
    assert_non_null(strstr(diag.msg[0], dir));
    work_len = 0;
    write_work();
    memset(&diag, 0, sizeof diag);
    assert_int_equal(hs_site_load(path, &site, &diag), -1);
    assert_true(diag.n >= 1 && well_formed(diag.msg[0]));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(demo_loads_unmutated),
        cmocka_unit_test(mutated_demo_loads_or_says_where),
        cmocka_unit_test(unreadable_files),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
