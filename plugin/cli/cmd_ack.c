/* halostage ack --config FILE (--event ID | --pond P [--rule R])
 *              [--shelve DURATION | --unshelve] [--operator NAME] [--note TEXT]
 *              [--wait DURATION]
 * Acknowledges (or shelves / unshelves) an alarm at the gateway. The
 * command is queued in the store; the running daemon applies it exactly as
 * an MQTT command (same checks, same journal) and writes its reply, which
 * this command waits for. Exit 0 applied (or nothing to do), 1 refused,
 * 75 still pending when the wait ran out (the daemon is not running?). */
#include <getopt.h>
#include <pwd.h>
#include <jansson.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "cli_number.h"
#include "commands.h"
#include "hs_conf_transfer.h"
#include "store_opts.h"

#define EXIT_PENDING 75 /* sysexits.h EX_TEMPFAIL */

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage ack --config FILE (--event ID | --pond POND [--rule RULE])\n"
            "                     [--shelve DURATION | --unshelve] [--operator NAME]\n"
            "                     [--note TEXT] [--wait DURATION]\n"
            "  Without --shelve/--unshelve it acknowledges. --operator defaults to $USER.\n"
            "  --pond may name an actuated transfer for its own alarms; acknowledging its\n"
            "  feedback-lockout alarm resets the lockout.\n"
            "  Waits up to --wait (default 10s) for the daemon's answer.\n");
}

/* $USER, else the login name of this process's user: the journal must say
 * who acted, and a service shell or cron has no $USER. */
static const char *operator_name(void)
{
    const char *u = getenv("USER");
    if (u != NULL && u[0] != '\0')
        return u;
    struct passwd *pw = getpwuid(getuid());
    return pw != NULL && pw->pw_name[0] != '\0' ? pw->pw_name : NULL;
}

int hs_cmd_ack(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},   {"event", required_argument, NULL, 'e'},
        {"pond", required_argument, NULL, 'p'},     {"rule", required_argument, NULL, 'r'},
        {"shelve", required_argument, NULL, 's'},   {"unshelve", no_argument, NULL, 'U'},
        {"operator", required_argument, NULL, 'o'}, {"note", required_argument, NULL, 'n'},
        {"wait", required_argument, NULL, 'w'},     {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *pond = NULL, *rule = NULL, *shelve = NULL, *oper = NULL;
    const char *note = NULL, *wait_s = "10s";
    long event = 0;
    int unshelve = 0, c;
    char msg[256];
    optind = 1;
    opterr = 0; /* one line of our own instead of getopt's and the usage */
    while ((c = getopt_long(argc, argv, "c:e:p:r:s:Uo:n:w:h", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'e':
            if (hs_parse_long(optarg, &event, msg, sizeof msg) != 0 || event < 1) {
                fprintf(stderr, "halostage ack: --event %s: not a positive event id\n", optarg);
                return 2;
            }
            break;
        case 'p': pond = optarg; break;
        case 'r': rule = optarg; break;
        case 's': shelve = optarg; break;
        case 'U': unshelve = 1; break;
        case 'o': oper = optarg; break;
        case 'n': note = optarg; break;
        case 'w': wait_s = optarg; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("ack", argv, argc); return 2;
        }
    }
    if (oper == NULL)
        oper = operator_name();
    const char *verb = shelve ? "shelve" : unshelve ? "unshelve" : "ack";
    const char *why = NULL;
    if (optind < argc) {
        fprintf(stderr, "halostage ack: unexpected '%s'\n", argv[optind]);
        return 2;
    }
    if (config == NULL)
        why = "needs --config FILE (the site file whose daemon keeps the alarms)";
    else if (shelve && unshelve)
        why = "--shelve and --unshelve exclude each other: give one";
    else if ((shelve || unshelve) && event)
        why = "--shelve and --unshelve name the alarm by --pond and --rule, not by --event";
    else if ((shelve || unshelve) && (pond == NULL || rule == NULL))
        why = shelve ? "--shelve needs --pond POND and --rule RULE"
                     : "--unshelve needs --pond POND and --rule RULE";
    else if (event != 0 && pond != NULL)
        why = "give --event ID or --pond POND [--rule RULE], not both";
    else if (event == 0 && pond == NULL)
        why = "which alarm? give --event ID, or --pond POND [--rule RULE]";
    else if (oper == NULL)
        why = "who is acknowledging? give --operator NAME (neither $USER nor a login name is "
              "known)";
    if (why != NULL) {
        fprintf(stderr, "halostage ack: %s\n", why);
        return 2;
    }
    int64_t wait_ms = 0, shelve_ms = 0;
    if (hs_parse_duration_ms(wait_s, &wait_ms, msg, sizeof msg) != 0 ||
        (shelve && hs_parse_duration_ms(shelve, &shelve_ms, msg, sizeof msg) != 0)) {
        fprintf(stderr, "halostage ack: %s\n", msg);
        return 2;
    }
    if (shelve && (shelve_ms < 1000 || shelve_ms % 1000 != 0)) {
        fprintf(stderr, "halostage ack: --shelve takes whole seconds (30min, 8h)\n");
        return 2;
    }
    json_t *req = json_pack("{s:s, s:s}", "command", verb, "operator", oper);
    if (event)
        json_object_set_new(req, "event_id", json_integer(event));
    if (pond)
        json_object_set_new(req, "pond", json_string(pond));
    if (rule)
        json_object_set_new(req, "rule", json_string(rule));
    if (note)
        json_object_set_new(req, "note", json_string(note));
    if (shelve)
        json_object_set_new(req, "duration_s", json_integer(shelve_ms / 1000));
    char *text = json_dumps(req, JSON_COMPACT);
    json_decref(req);
    if (text == NULL) {
        fprintf(stderr, "halostage ack: the request is not valid text (UTF-8?)\n");
        return 2;
    }
    hs_site site;
    hs_store *st;
    int rc = hs_cli_open(config, &site, &st);
    if (rc != 0) {
        free(text);
        return rc;
    }
    /* an actuated transfer's alarms (output-unconfirmed, feedback-lockout,
     * manual-unknown) carry the transfer's name where a pond's would be */
    int transfer = 0;
    for (size_t i = 0; pond != NULL && i < site.n_transfers; i++)
        transfer |= site.transfers[i].actuate && strcmp(site.transfers[i].name, pond) == 0;
    rc = transfer ? 0 : hs_cli_known_pond("ack", "--pond", &site, pond);
    if (rc != 0) {
        free(text);
        hs_store_close(st);
        hs_site_free(&site);
        return rc;
    }
    int64_t id;
    if (hs_store_command_put(st, text, hs_cli_now_ms(), &id) != 0) {
        fprintf(stderr, "halostage ack: %s\n", hs_store_error(st));
        rc = 1;
        goto done;
    }
    char *reply = NULL;
    int got = 0;
    for (int64_t waited = 0; (got = hs_store_command_reply(st, id, &reply)) == 0 &&
                             waited < wait_ms; waited += 100) {
        struct timespec ts = {0, 100000000L};
        nanosleep(&ts, NULL);
    }
    if (got < 0) {
        fprintf(stderr, "halostage ack: %s\n", hs_store_error(st));
        rc = 1;
    } else if (got == 0) {
        fprintf(stderr, "halostage ack: queued as command %lld; no answer within %s (is the "
                        "daemon running?). It will be applied when the daemon reads it.\n",
                (long long)id, wait_s);
        rc = EXIT_PENDING;
    } else {
        json_t *r = json_loads(reply, 0, NULL);
        int ok = json_is_true(json_object_get(r, "ok"));
        const char *what = json_string_value(json_object_get(r, ok ? "result" : "error"));
        printf("%s: %s\n", ok ? verb : "refused", what ? what : reply);
        json_t *ids = json_object_get(r, "event_ids");
        size_t i;
        json_t *v;
        json_array_foreach(ids, i, v)
            printf("event %lld\n", (long long)json_integer_value(v));
        rc = ok ? 0 : 1;
        json_decref(r);
        free(reply);
    }
done:
    free(text);
    hs_store_close(st);
    hs_site_free(&site);
    return rc;
}
