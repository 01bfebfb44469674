#include <stddef.h>

#include "commands.h"

/* Keep in the order `halostage help` should list them. */
const struct hs_command hs_commands[] = {
    {"calc", hs_cmd_calc, "brine state of one sample from conductivity or density"},
    {"status", hs_cmd_status, "every pond, alarm and transfer advice now (from the history)"},
    {NULL, NULL, NULL},
};
