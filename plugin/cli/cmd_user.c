/* halostage user --config FILE add NAME --role viewer|operator
 * halostage user --config FILE remove NAME
 * halostage user --config FILE list [--json]
 * Edits the page's logins in [web] users_file. The password comes from
 * stdin (one line; asked twice without echo on a terminal) and is stored
 * only as a salted yescrypt hash. The running daemon reads the file again
 * on reload (SIGHUP). Exit 0 done, 1 file failure, 2 usage, 78 bad config. */
#include <errno.h>
#include <getopt.h>
#include <jansson.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <termios.h>
#include <unistd.h>

#include "cli_number.h"
#include "commands.h"
#include "store_opts.h"
#include "hs_conf_web.h"
#include "hs_config.h"
#include "hs_web_users.h"

#define PASSWORD_MAX 1024

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage user --config FILE add NAME --role viewer|operator\n"
            "       halostage user --config FILE remove NAME\n"
            "       halostage user --config FILE list [--json]\n"
            "  Logins of the operators' page ([web] users_file). add reads the password\n"
            "  from stdin (at least 8 characters) and stores a salted hash only; adding an\n"
            "  existing name replaces its role and password. Viewers look; operators also\n"
            "  acknowledge and shelve alarms and record hydrometer readings. Reload the\n"
            "  daemon (SIGHUP) to apply.\n");
}

/* One line from stdin into buf; on a terminal without echo. 0 / -1. */
static int read_line(const char *prompt, char *buf, size_t len)
{
    int tty = isatty(STDIN_FILENO);
    struct termios old, quiet;
    if (tty) {
        fprintf(stderr, "%s", prompt);
        if (tcgetattr(STDIN_FILENO, &old) == 0) {
            quiet = old;
            quiet.c_lflag &= ~(tcflag_t)ECHO;
            tcsetattr(STDIN_FILENO, TCSAFLUSH, &quiet);
        } else {
            tty = 0;
        }
    }
    char *got = fgets(buf, (int)len, stdin);
    if (tty) {
        tcsetattr(STDIN_FILENO, TCSAFLUSH, &old);
        fprintf(stderr, "\n");
    }
    if (got == NULL)
        return -1;
    if (strchr(buf, '\n') == NULL && !feof(stdin))
        return -1;
    buf[strcspn(buf, "\r\n")] = '\0';
    return 0;
}

static int add(const char *file, hs_users *users, const char *name, const char *role_text)
{
    int role = role_text ? hs_user_role_from_name(role_text) : -1;
    if (role < 0) {
        fprintf(stderr, "halostage user: add needs --role viewer or --role operator\n");
        return 2;
    }
    char pw[PASSWORD_MAX + 2], again[PASSWORD_MAX + 2], msg[300];
    if (read_line("password: ", pw, sizeof pw) != 0) {
        fprintf(stderr, "halostage user: no password on stdin (one line, at most %d bytes)\n",
                PASSWORD_MAX);
        return 2;
    }
    if (isatty(STDIN_FILENO) &&
        (read_line("again: ", again, sizeof again) != 0 || strcmp(pw, again) != 0)) {
        fprintf(stderr, "halostage user: the passwords differ\n");
        return 2;
    }
    int rc = hs_users_set(users, name, (hs_user_role)role, pw, msg, sizeof msg);
    memset(pw, 0, sizeof pw);
    memset(again, 0, sizeof again);
    if (rc != 0) {
        fprintf(stderr, "halostage user: %s\n", msg);
        return 2;
    }
    if (hs_users_save(file, users, msg, sizeof msg) != 0) {
        fprintf(stderr, "halostage user: %s\n", msg);
        return 1;
    }
    printf("user %s (%s) saved in %s\n", name, role_text, file);
    return 0;
}

int hs_cmd_user(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},
        {"role", required_argument, NULL, 'r'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *role = NULL;
    int json = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, "c:r:jh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'r': role = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("user", argv, argc); return 2;
        }
    }
    const char *verb = optind < argc ? argv[optind] : NULL;
    const char *name = optind + 1 < argc ? argv[optind + 1] : NULL;
    int want_name = verb && (strcmp(verb, "add") == 0 || strcmp(verb, "remove") == 0);
    if (config == NULL || verb == NULL ||
        (!want_name && strcmp(verb, "list") != 0) || (want_name && name == NULL) ||
        optind + (want_name ? 2 : 1) != argc || (role && strcmp(verb, "add") != 0) ||
        (json && strcmp(verb, "list") != 0)) {
        fprintf(stderr, "halostage user: need --config FILE and one of: add NAME --role "
                        "viewer|operator, remove NAME, list (see --help)\n");
        return 2;
    }
    hs_site site;
    if (hs_cli_load_site(config, &site) != 0)
        return HS_EXIT_CONFIG;
    int rc = 2;
    char msg[600];
    hs_users users = {0};
    if (site.web == NULL || !site.web->users_file[0]) {
        fprintf(stderr, "halostage user: %s has no [web] users_file; add one to give the page "
                        "logins\n", config);
        rc = HS_EXIT_CONFIG;
        goto done;
    }
    const char *file = site.web->users_file;
    if (hs_users_load(file, strcmp(verb, "add") == 0 || strcmp(verb, "list") == 0, &users, msg,
                      sizeof msg) != 0) {
        fprintf(stderr, "halostage user: %s\n", msg);
        rc = 1;
        goto done;
    }
    if (strcmp(verb, "add") == 0) {
        rc = add(file, &users, name, role);
    } else if (strcmp(verb, "remove") == 0) {
        if (hs_users_remove(&users, name, msg, sizeof msg) != 0) {
            fprintf(stderr, "halostage user: %s in %s\n", msg, file);
            rc = 1;
        } else if (hs_users_save(file, &users, msg, sizeof msg) != 0) {
            fprintf(stderr, "halostage user: %s\n", msg);
            rc = 1;
        } else {
            printf("user %s removed from %s\n", name, file);
            rc = 0;
        }
    } else if (json) {
        json_t *arr = json_array();
        for (size_t i = 0; i < users.n; i++)
            json_array_append_new(arr, json_pack("{s:s, s:s}", "user", users.users[i].name,
                                                 "role",
                                                 hs_user_role_name(users.users[i].role)));
        char *text = json_dumps(arr, JSON_COMPACT);
        json_decref(arr);
        printf("%s\n", text ? text : "[]");
        free(text);
        rc = 0;
    } else {
        if (users.n == 0)
            printf("no users in %s\n", file);
        for (size_t i = 0; i < users.n; i++)
            printf("%-32s %s\n", users.users[i].name, hs_user_role_name(users.users[i].role));
        rc = 0;
    }
done:
    hs_users_free(&users);
    hs_site_free(&site);
    return rc;
}
