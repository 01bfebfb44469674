/* A plugin from the future: it speaks only ABI version 99. A host that
 * offers version 1 must refuse it with a clear message. With the
 * environment variable HS_TEST_PLUGIN_LIE set it claims version 99 anyway,
 * which a host must also refuse. */
#include <stdio.h>
#include <stdlib.h>

#include "halostage_plugin.h"

int halostage_plugin_version(size_t offered_count, const int *offered, char *why, size_t why_len)
{
    for (size_t i = 0; i < offered_count; i++)
        if (offered[i] == 99)
            return 99;
    if (getenv("HS_TEST_PLUGIN_LIE") != NULL)
        return 99;
    snprintf(why, why_len, "this plugin speaks ABI version 99 only");
    return HSP_REFUSED;
}

const struct hsp_plugin_v1 *halostage_plugin_v1(void)
{
    return NULL;
}
