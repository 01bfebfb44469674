/* The page's own files (plugin/web/), compiled into the program by
 * mk/embed.sh: nothing is read from disk and nothing comes from elsewhere. */
#include <string.h>

#include "hs_web_assets.h"
#include "hs_web_private.h"

enum MHD_Result hs_web_static(struct hs_web_call *c)
{
    const char *path = strcmp(c->url, "/") == 0             ? "/index.html"
                       : strcmp(c->url, "/favicon.ico") == 0 ? "/icon.svg"
                                                              : c->url;
    for (size_t i = 0; i < hs_web_asset_count; i++) {
        const struct hs_web_asset *a = &hs_web_assets[i];
        if (strcmp(path + 1, a->name) == 0)
            return hs_web_send(c, 200, a->type, a->data, a->size, 0);
    }
    return hs_web_send(c, 404, "text/plain; charset=utf-8", "not found\n", 10, 0);
}
