/* The page's files, generated into build/gen/hs_web_assets.c from
 * plugin/web/ by mk/embed.sh at build time. Read-only data. */
#ifndef HS_WEB_ASSETS_H
#define HS_WEB_ASSETS_H

#include <stddef.h>

struct hs_web_asset {
    const char *name;          /* file name under plugin/web/, e.g. "app.js" */
    const char *type;          /* Content-Type */
    const unsigned char *data;
    size_t size;
};

extern const struct hs_web_asset hs_web_assets[];
extern const size_t hs_web_asset_count;

#endif
