/* The page's logins and its listen address: yescrypt hashes from libcrypt
 * that check the right password and refuse a wrong one, a users file that
 * round-trips and whose bad lines are refused with file:line, names and
 * roles validated; [web] listen split and classified loopback or not. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hs_conf_web.h"
#include "hs_web_users.h"

static void temp_path(char *buf, size_t len, const char *name)
{
    snprintf(buf, len, "%s/hs-web-users-%ld-%s", getenv("TMPDIR") ? getenv("TMPDIR") : "/tmp",
             (long)getpid(), name);
}

static void hash_checks_password(void **s)
{
    (void)s;
    hs_users u = {0};
    char msg[200];
    assert_int_equal(hs_users_set(&u, "mara", HS_USER_OPERATOR, "salt-and-brine", msg, sizeof msg), 0);
    assert_int_equal(hs_users_set(&u, "ben", HS_USER_VIEWER, "salt-and-brine", msg, sizeof msg), 0);
    /* yescrypt ($y$), salted: the same password hashes differently per user */
    assert_memory_equal(u.users[0].hash, "$y$", 3);
    assert_string_not_equal(u.users[0].hash, u.users[1].hash);
    assert_null(strstr(u.users[0].hash, "salt-and-brine"));
    const hs_user *who = hs_users_check(&u, "mara", "salt-and-brine");
    assert_non_null(who);
    assert_string_equal(who->name, "mara");
    assert_int_equal(who->role, HS_USER_OPERATOR);
    assert_null(hs_users_check(&u, "mara", "salt-and-brinE"));
    assert_null(hs_users_check(&u, "mara", ""));
    assert_null(hs_users_check(&u, "nobody", "salt-and-brine"));
    /* replacing a user changes role and password */
    assert_int_equal(hs_users_set(&u, "mara", HS_USER_VIEWER, "another-secret", msg, sizeof msg), 0);
    assert_int_equal(u.n, 2);
    assert_null(hs_users_check(&u, "mara", "salt-and-brine"));
    assert_int_equal(hs_users_check(&u, "mara", "another-secret")->role, HS_USER_VIEWER);
    hs_users_free(&u);
}

static void names_and_passwords_validated(void **s)
{
    (void)s;
    hs_users u = {0};
    char msg[200];
    assert_int_equal(hs_users_set(&u, "b n", HS_USER_VIEWER, "long-enough", msg, sizeof msg), -1);
    assert_non_null(strstr(msg, "user name"));
    assert_int_equal(hs_users_set(&u, "", HS_USER_VIEWER, "long-enough", msg, sizeof msg), -1);
    assert_int_equal(hs_users_set(&u, "abcdefghijklmnopqrstuvwxyz0123456", HS_USER_VIEWER,
                                  "long-enough", msg, sizeof msg), -1); /* 33 characters */
    assert_int_equal(hs_users_set(&u, "ok.name_1-x", HS_USER_VIEWER, "short", msg, sizeof msg), -1);
    assert_non_null(strstr(msg, "at least 8"));
    assert_int_equal(u.n, 0);
    assert_int_equal(hs_user_role_from_name("operator"), HS_USER_OPERATOR);
    assert_int_equal(hs_user_role_from_name("viewer"), HS_USER_VIEWER);
    assert_int_equal(hs_user_role_from_name("admin"), -1);
    assert_int_equal(hs_users_remove(&u, "ghost", msg, sizeof msg), -1);
}

static void file_round_trip(void **s)
{
    (void)s;
    char path[300], msg[600];
    temp_path(path, sizeof path, "rt");
    hs_users u = {0}, back = {0};
    assert_int_equal(hs_users_set(&u, "mara", HS_USER_OPERATOR, "salt-and-brine", msg, sizeof msg), 0);
    assert_int_equal(hs_users_set(&u, "ben", HS_USER_VIEWER, "dike-walker", msg, sizeof msg), 0);
    assert_int_equal(hs_users_save(path, &u, msg, sizeof msg), 0);
    struct stat sb;
    assert_int_equal(stat(path, &sb), 0);
    assert_int_equal(sb.st_mode & 0007, 0); /* never readable by others */
    assert_int_equal(hs_users_load(path, 0, &back, msg, sizeof msg), 0);
    assert_int_equal(back.n, 2);
    assert_non_null(hs_users_check(&back, "ben", "dike-walker"));
    assert_int_equal(hs_users_remove(&back, "mara", msg, sizeof msg), 0);
    assert_int_equal(back.n, 1);
    assert_string_equal(back.users[0].name, "ben");
    hs_users_free(&u);
    hs_users_free(&back);
    unlink(path);
    /* missing: an empty list only when allowed */
    assert_int_equal(hs_users_load(path, 1, &back, msg, sizeof msg), 0);
    assert_int_equal(back.n, 0);
    assert_int_equal(hs_users_load(path, 0, &back, msg, sizeof msg), -1);
    assert_non_null(strstr(msg, path));
}

static void bad_lines_refused(void **s)
{
    (void)s;
    static const char *const bad[] = {
        "mara operator\n",                       /* no hash */
        "mara boss $y$j9T$abc$def\n",            /* unknown role */
        "mara operator plaintext\n",             /* not a crypt hash */
        "ma ra operator $y$j9T$abc$def\n",       /* four fields */
        "mara operator $y$a$b\nmara viewer $y$c$d\n", /* twice */
    };
    char path[300], msg[600];
    temp_path(path, sizeof path, "bad");
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        FILE *f = fopen(path, "w");
        assert_non_null(f);
        fprintf(f, "# logins\n%s", bad[i]);
        fclose(f);
        hs_users u = {0};
        assert_int_equal(hs_users_load(path, 0, &u, msg, sizeof msg), -1);
        char where[320];
        snprintf(where, sizeof where, "%s:%d:", path, i == 4 ? 3 : 2);
        if (strstr(msg, where) == NULL)
            fail_msg("case %zu: '%s' does not name %s", i, msg, where);
        assert_int_equal(u.n, 0);
    }
    unlink(path);
}

static void listen_addresses(void **s)
{
    (void)s;
    char addr[64], msg[200];
    unsigned port = 0;
    bool lo = false;
    assert_int_equal(hs_web_listen_parse("127.0.0.1:8480", addr, sizeof addr, &port, &lo, msg, sizeof msg), 0);
    assert_string_equal(addr, "127.0.0.1");
    assert_int_equal(port, 8480);
    assert_true(lo);
    assert_int_equal(hs_web_listen_parse("127.9.8.7:1", addr, sizeof addr, &port, &lo, msg, sizeof msg), 0);
    assert_true(lo); /* all of 127.0.0.0/8 */
    assert_int_equal(hs_web_listen_parse("[::1]:65535", addr, sizeof addr, &port, &lo, msg, sizeof msg), 0);
    assert_string_equal(addr, "::1");
    assert_int_equal(port, 65535);
    assert_true(lo);
    assert_int_equal(hs_web_listen_parse("0.0.0.0:80", addr, sizeof addr, &port, &lo, msg, sizeof msg), 0);
    assert_false(lo);
    assert_int_equal(hs_web_listen_parse("[fd00::5]:8480", addr, sizeof addr, &port, &lo, msg, sizeof msg), 0);
    assert_false(lo);
    static const char *const bad[] = {"127.0.0.1", "127.0.0.1:0", "127.0.0.1:65536", "127.0.0.1:80x",
                                      "localhost:80", "[::1]8480", ":8480", "127.0.0.1:-5", "[::1:80"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
        if (hs_web_listen_parse(bad[i], addr, sizeof addr, &port, &lo, msg, sizeof msg) != -1)
            fail_msg("'%s' was taken", bad[i]);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(hash_checks_password),
        cmocka_unit_test(names_and_passwords_validated),
        cmocka_unit_test(file_round_trip),
        cmocka_unit_test(bad_lines_refused),
        cmocka_unit_test(listen_addresses),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
