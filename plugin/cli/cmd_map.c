/* `halostage map --config FILE [--csv]`: the read-only Modbus map of this
 * site, register by register (address, name, type, unit, scale), so that an
 * integrator copies it rather than types it. The layout rule is in
 * plugin/hs_scada_map.h and halostage.conf(5) [modbus_server]. */
#include <getopt.h>
#include <stdio.h>
#include <string.h>

#include "cli/commands.h"
#include "cli/store_opts.h"
#include "hs_conf_scada.h"
#include "hs_config.h"
#include "hs_scada_map.h"

static void usage(FILE *out)
{
    fprintf(out, "usage: halostage map --config FILE [--csv]\n"
                 "\n"
                 "The read-only Modbus TCP map of the site's [modbus_server]: every register\n"
                 "with its address (0-based, holding and input registers alike), name, type,\n"
                 "unit and the scale of its int16 copy (raw = value x scale).\n"
                 "\n"
                 "  --config FILE   site configuration\n"
                 "  --csv           address,name,type,unit,scale lines with a header\n");
}

int hs_cmd_map(int argc, char **argv)
{
    const char *config = NULL;
    int csv = 0;
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},
        {"csv", no_argument, NULL, 'v'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, "", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'v': csv = 1; break;
        case 'h': usage(stdout); return 0;
        default:
            fprintf(stderr, "halostage map: unknown option or missing value: %s\n",
                    argv[optind - 1]);
            usage(stderr);
            return 2;
        }
    }
    if (config == NULL || optind < argc) {
        fprintf(stderr, "halostage map: %s\n",
                config == NULL ? "--config FILE is required" : "unexpected argument");
        usage(stderr);
        return 2;
    }
    hs_site site;
    if (hs_cli_load_site(config, &site) != 0)
        return HS_EXIT_CONFIG;
    const char *order = "big";
    if (site.modbus_server == NULL)
        fprintf(stderr, "halostage map: note: %s has no [modbus_server] section; the map is "
                        "what it would serve (word order big)\n", config);
    else
        order = hs_word_order_names[site.modbus_server->word_order];
    char err[200];
    int rc = hs_scada_map_print(stdout, &site, order, csv, err, sizeof err);
    if (rc != 0)
        fprintf(stderr, "halostage map: %s: %s\n", config, err);
    hs_site_free(&site);
    return rc == 0 ? 0 : 1;
}
