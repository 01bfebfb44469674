/* halostaged: the standalone host of the halostage plugin. Thin on purpose:
 * option parsing here, the service loop in hs_host_service.c, and the job
 * itself in the plugin. */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_commission.h"
#include "hs_host.h"

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostaged --config FILE [--plugin PATH] [--log-level LEVEL]\n"
            "                  [--emit-stdout] [--run-for SECONDS]\n"
            "       halostaged --config FILE --check\n"
            "       halostaged --config FILE --once [--json]\n"
            "  --config FILE     the site configuration (INI)\n"
            "  --check           validate the configuration and exit (0, or 78 with\n"
            "                    FILE:LINE: reasons on stderr)\n"
            "  --once            read every signal once, show values, qualities and\n"
            "                    pond states, and exit (commissioning)\n"
            "  --json            with --once: one JSON line per pond\n"
            "  --plugin PATH     the plugin to host (default: halostage.so next to\n"
            "                    this program, else ../lib/halostage/)\n"
            "  --log-level L     error|warning|notice|info|debug (default info)\n"
            "  --emit-stdout     print every value the plugin emits, one per line\n"
            "  --run-for S       stop by itself after S seconds (demos, tests)\n"
            "  --version         print the version and exit\n"
            "Signals: TERM/INT stop cleanly, HUP reloads the configuration.\n");
}

static int parse_seconds(const char *text, unsigned *out)
{
    char *end;
    errno = 0;
    unsigned long v = strtoul(text, &end, 10);
    if (errno != 0 || end == text || *end != '\0' || v == 0 || v > 31536000ul)
        return -1;
    *out = (unsigned)v;
    return 0;
}

int main(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"config", required_argument, NULL, 'c'},
        {"plugin", required_argument, NULL, 'p'},
        {"log-level", required_argument, NULL, 'l'},
        {"emit-stdout", no_argument, NULL, 'e'},
        {"run-for", required_argument, NULL, 'r'},
        {"check", no_argument, NULL, 'k'},
        {"once", no_argument, NULL, 'o'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {"version", no_argument, NULL, 'V'},
        {NULL, 0, NULL, 0},
    };
    struct hs_host_options options = {0};
    int level = HSP_LOG_INFO;
    int check = 0, once = 0, json = 0;
    hs_host_log_init("halostaged", level);
    int opt;
    while ((opt = getopt_long(argc, argv, "c:p:l:er:h", longopts, NULL)) != -1) {
        switch (opt) {
        case 'c': options.config_path = optarg; break;
        case 'p': options.plugin_path = optarg; break;
        case 'e': options.emit_stdout = 1; break;
        case 'V': printf("halostaged %s\n", HS_VERSION); return 0;
        case 'l':
            level = hs_host_log_level_from_name(optarg);
            if (level < 0) {
                fprintf(stderr, "halostaged: --log-level: unknown level '%s'\n", optarg);
                return 2;
            }
            hs_host_log_set_level(level);
            break;
        case 'r':
            if (parse_seconds(optarg, &options.max_runtime_s) != 0) {
                fprintf(stderr, "halostaged: --run-for: '%s' is not a whole number of seconds "
                        "(1 to 31536000)\n", optarg);
                return 2;
            }
            break;
        case 'k': check = 1; break;
        case 'o': once = 1; break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: usage(stderr); return 2;
        }
    }
    if (optind != argc || options.config_path == NULL) {
        usage(stderr);
        return 2;
    }
    if (check)
        return hs_check_run(options.config_path);
    if (json && !once) {
        fprintf(stderr, "halostaged: --json goes with --once\n");
        return 2;
    }
    if (once)
        return hs_once_run(options.config_path, json != 0);
    return hs_host_service_run(&options);
}
