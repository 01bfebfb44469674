/* halostaged: the standalone host. This file only parses options and calls
 * into plugin/; the work lives there (hs_site_load, hs_once_run, ...).
 *   halostaged --config FILE --check         validate, exit 0 or 78
 *   halostaged --config FILE --once [--json] one poll cycle, then exit */
#include <getopt.h>
#include <stdio.h>
#include <string.h>

#include "hs_config.h"

static void usage(FILE *to)
{
    fprintf(to, "usage: halostaged --config FILE --check\n"
                "       halostaged --config FILE --once [--json]\n");
}

static int check_config(const char *path)
{
    hs_site site;
    hs_diag diag;
    if (hs_site_load(path, &site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            fprintf(stderr, "%s\n", diag.msg[i]);
        if (diag.dropped)
            fprintf(stderr, "%s: %u more errors not shown\n", path, diag.dropped);
        return HS_EXIT_CONFIG;
    }
    printf("%s: ok: site %s, %zu buses, %zu ponds, %zu signals, %zu feeds\n", path,
           site.site.name, site.n_buses, site.n_ponds, site.n_signals, site.n_feeds);
    hs_site_free(&site);
    return 0;
}

int main(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},
        {"check", no_argument, NULL, 'k'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL;
    int check = 0, c;
    while ((c = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'k': check = 1; break;
        case 'h': usage(stdout); return 0;
        default: usage(stderr); return 2;
        }
    }
    if (optind < argc || !config || !check) {
        usage(stderr);
        return 2;
    }
    return check_config(config);
}
