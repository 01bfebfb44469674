/* halostage: the operator's command. Dispatches to one subcommand. */
#include <stdio.h>
#include <string.h>

#include "commands.h"
#include "hs_suggest.h"

static void usage(FILE *out)
{
    fprintf(out, "usage: halostage COMMAND [OPTIONS]\n\ncommands:\n");
    for (const struct hs_command *c = hs_commands; c->name != NULL; c++)
        fprintf(out, "  %-10s %s\n", c->name, c->summary);
    fprintf(out, "\n`halostage COMMAND --help` describes one command; "
                 "`halostage --version` prints the version.\n");
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        usage(stderr);
        return 2;
    }
    if (strcmp(argv[1], "--version") == 0) {
        printf("halostage %s\n", HS_VERSION);
        return 0;
    }
    if (strcmp(argv[1], "help") == 0 || strcmp(argv[1], "--help") == 0 ||
        strcmp(argv[1], "-h") == 0) {
        usage(stdout);
        return 0;
    }
    for (const struct hs_command *c = hs_commands; c->name != NULL; c++)
        if (strcmp(argv[1], c->name) == 0)
            return c->run(argc - 1, argv + 1);
    hs_suggest sg;
    char hint[96];
    hs_suggest_init(&sg, argv[1]);
    for (const struct hs_command *c = hs_commands; c->name != NULL; c++)
        hs_suggest_offer(&sg, c->name);
    fprintf(stderr, "halostage: unknown command '%s'%s\n", argv[1],
            hs_suggest_text(&sg, hint, sizeof hint));
    usage(stderr);
    return 2;
}
