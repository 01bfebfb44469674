#include <stddef.h>

#include "commands.h"

/* Keep in the order `halostage help` should list them. */
const struct hs_command hs_commands[] = {
    {NULL, NULL, NULL},
};
