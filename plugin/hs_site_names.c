/* Hints for a name that is not in the site file (see hs_site.h): the nearest
 * known name when one is close enough to be a slip, otherwise the list of
 * the known ones, so that every "no such pond" message says what exists. */
#include <stdio.h>
#include <string.h>

#include "hs_site.h"
#include "hs_suggest.h"

typedef const char *(*name_at)(const hs_site *site, size_t i);

static const char *pond_at(const hs_site *s, size_t i) { return s->ponds[i].name; }
static const char *bus_at(const hs_site *s, size_t i) { return s->buses[i].name; }
static const char *feed_at(const hs_site *s, size_t i) { return s->feeds[i].name; }
static const char *signal_at(const hs_site *s, size_t i) { return s->signals[i].name; }

static const char *hint(const hs_site *site, size_t n, name_at at, const char *what,
                        const char *name, char *buf, size_t len)
{
    if (len == 0)
        return buf;
    buf[0] = '\0';
    hs_suggest sg;
    hs_suggest_init(&sg, name);
    for (size_t i = 0; i < n; i++)
        hs_suggest_offer(&sg, at(site, i));
    if (sg.best != NULL)
        return hs_suggest_text(&sg, buf, len);
    if (n == 0) {
        snprintf(buf, len, " (the file has no %s)", what);
        return buf;
    }
    size_t used = (size_t)snprintf(buf, len, " (%s: ", what);
    for (size_t i = 0; i < n && used + 8 < len; i++) {
        const char *nm = at(site, i);
        if (used + strlen(nm) + 8 >= len) {
            used += (size_t)snprintf(buf + used, len - used, "%s...", i ? ", " : "");
            break;
        }
        used += (size_t)snprintf(buf + used, len - used, "%s%s", i ? ", " : "", nm);
    }
    if (used + 2 <= len)
        snprintf(buf + used, len - used, ")");
    return buf;
}

const char *hs_site_pond_hint(const hs_site *site, const char *name, char *buf, size_t len)
{
    return hint(site, site->n_ponds, pond_at, "ponds", name, buf, len);
}

const char *hs_site_bus_hint(const hs_site *site, const char *name, char *buf, size_t len)
{
    return hint(site, site->n_buses, bus_at, "buses", name, buf, len);
}

const char *hs_site_feed_hint(const hs_site *site, const char *name, char *buf, size_t len)
{
    return hint(site, site->n_feeds, feed_at, "feeds", name, buf, len);
}

const char *hs_site_signal_hint(const hs_site *site, const char *name, char *buf, size_t len)
{
    return hint(site, site->n_signals, signal_at, "signals", name, buf, len);
}
