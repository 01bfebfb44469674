/* halostage backup --config FILE --to COPY [--force]
 * A consistent copy of the site's history while the daemon keeps writing it
 * (SQLite online backup, see hs_store_backup), checked, then the steps to
 * restore it. Exit 0 done, 1 the copy failed (nothing left at COPY), 2 usage,
 * 78 bad config. */
#include <getopt.h>
#include <stdio.h>
#include <string.h>

#include "cli_number.h"
#include "commands.h"
#include "store_opts.h"
#include "hs_config.h"
#include "hs_store.h"

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage backup --config FILE --to COPY [--force]\n"
            "  Copies the site's history database to COPY while the daemon runs: one\n"
            "  consistent snapshot with every row committed before the copy began, checked\n"
            "  with SQLite's integrity_check. --force replaces an existing COPY.\n");
}

static double mib(int64_t bytes) { return (double)bytes / (1024.0 * 1024.0); }

int hs_cmd_backup(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'}, {"to", required_argument, NULL, 't'},
        {"force", no_argument, NULL, 'f'},        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *to = NULL;
    int force = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, "c:t:fh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 't': to = optarg; break;
        case 'f': force = 1; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("backup", argv, argc); return 2;
        }
    }
    if (optind < argc) {
        fprintf(stderr, "halostage backup: unexpected '%s'\n", argv[optind]);
        return 2;
    }
    if (config == NULL || to == NULL) {
        fprintf(stderr, "halostage backup: needs --config FILE (the site file naming the "
                        "database) and --to COPY\n");
        return 2;
    }
    hs_site site;
    if (hs_cli_load_site(config, &site) != 0)
        return HS_EXIT_CONFIG;
    hs_store_options opt;
    hs_store_options_default(&opt);
    hs_backup_report rep;
    char err[700];
    int rc = hs_store_backup(site.site.database, to, force, opt.busy_timeout_ms, &rep, err,
                             sizeof err);
    if (rc != 0) {
        fprintf(stderr, "halostage backup: %s\n", err);
        hs_site_free(&site);
        return 1;
    }
    printf("backup: %s written from %s\n", to, site.site.database);
    printf("  schema %d, %.1f MiB; %lld pond states, %lld samples, %lld alarm journal rows; "
           "integrity ok\n", rep.schema_version, mib(rep.bytes), (long long)rep.pond_states,
           (long long)rep.samples, (long long)rep.journal_rows);
    printf("to restore it:\n"
           "  1. stop the daemon (systemctl stop halostaged)\n"
           "  2. cp %s %s   and remove %s-wal and %s-shm if they exist\n"
           "  3. give the file to the service user (chown halostage: %s; chmod 0640)\n"
           "  4. start the daemon; it migrates an older schema itself\n",
           to, site.site.database, site.site.database, site.site.database, site.site.database);
    hs_site_free(&site);
    return 0;
}
