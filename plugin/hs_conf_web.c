/* [web]: the operators' page (see hs_conf_web.h). */
#include <arpa/inet.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_keys.h"
#include "hs_conf_web.h"

typedef hs_web_conf W;

static const char *const scale_names[] = {"baume", "sg", NULL};

static const hs_key web_keys[] = {
    KEY_STR("listen", W, listen, HS_NO_DEFAULT, HS_KEY_REQUIRED,
            "ADDRESS:PORT of the page (127.0.0.1:8480; [::1]:8480); a non-loopback address "
            "needs users_file"),
    KEY_PATH("users_file", W, users_file, HS_NO_DEFAULT, 0,
             "logins written by `halostage user` (salted yescrypt hashes); none = nobody logs in"),
    KEY_PATH("tls_cert", W, tls_cert, HS_NO_DEFAULT, 0, "PEM certificate: serve HTTPS"),
    KEY_PATH("tls_key", W, tls_key, HS_NO_DEFAULT, 0, "PEM key of tls_cert"),
    KEY_BOOL("public_view", W, public_view, "no", 0,
             "yes: the views (never the writes) without a login"),
    KEY_ENUM("density_scale", W, scale, scale_names, "baume", 0,
             "how the page shows densities first: baume (deg Be) or sg, both at the reference "
             "temperature"),
    KEY_DUR("session", W, session_ms, 60 * SEC_MS, 7 * 86400 * SEC_MS, "12h", 0,
            "a login ends after this long without a request"),
    KEY_UINT("max_clients", W, max_clients, 4, 1000, "64", 0, "connections at once"),
    {NULL},
};

const hs_section_type hs_section_web;

int hs_web_listen_parse(const char *text, char *address, size_t address_len, unsigned *port,
                        bool *loopback, char *msg, size_t msg_len)
{
    const char *colon;
    size_t alen;
    if (text[0] == '[') {
        const char *end = strchr(text, ']');
        if (end == NULL || end[1] != ':') {
            snprintf(msg, msg_len, "'%s' is not [IPV6]:PORT", text);
            return -1;
        }
        alen = (size_t)(end - text - 1);
        colon = end + 1;
        text++;
    } else {
        colon = strrchr(text, ':');
        if (colon == NULL) {
            snprintf(msg, msg_len, "'%s' is not ADDRESS:PORT", text);
            return -1;
        }
        alen = (size_t)(colon - text);
    }
    if (alen == 0 || alen >= address_len) {
        snprintf(msg, msg_len, "the address of '%s' is empty or too long", text);
        return -1;
    }
    memcpy(address, text, alen);
    address[alen] = '\0';
    char *end;
    unsigned long p = strtoul(colon + 1, &end, 10);
    if (colon[1] < '0' || colon[1] > '9' || *end != '\0' || p < 1 || p > 65535) {
        snprintf(msg, msg_len, "port '%s' is not a number from 1 to 65535", colon + 1);
        return -1;
    }
    *port = (unsigned)p;
    struct in_addr a4;
    struct in6_addr a6;
    if (inet_pton(AF_INET, address, &a4) == 1) {
        *loopback = (ntohl(a4.s_addr) >> 24) == 127;
    } else if (inet_pton(AF_INET6, address, &a6) == 1) {
        *loopback = IN6_IS_ADDR_LOOPBACK(&a6);
    } else {
        snprintf(msg, msg_len, "'%s' is not a numeric IPv4 or IPv6 address", address);
        return -1;
    }
    return 0;
}

static int web_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    (void)name;
    if (site->web == NULL) {
        site->web = calloc(1, sizeof *site->web);
        if (site->web == NULL) {
            hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
            return -1;
        }
    }
    site->web->line = hs_cfg_line(cfg);
    return 0;
}

static void *web_at(hs_site *site, size_t index)
{
    (void)index;
    return site->web;
}

static void web_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    W *w = site->web;
    char msg[200];
    if (w->listen[0] && hs_web_listen_parse(w->listen, w->address, sizeof w->address, &w->port,
                                            &w->loopback, msg, sizeof msg) != 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_web, index, "listen"), "listen: %s",
                     msg);
    else if (w->listen[0] && !w->loopback && !w->users_file[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_web, index, "listen"),
                     "listen: %s is reachable from other machines; that needs users_file "
                     "(logins), or listen on 127.0.0.1", w->listen);
    if (!w->tls_cert[0] != !w->tls_key[0])
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_web, index, "tls_cert"),
                     "tls_cert and tls_key go together");
}

static void web_release(hs_site *site)
{
    free(site->web);
    site->web = NULL;
}

const hs_section_type hs_section_web = {
    .kind = "web", .named = false, .required = false, .keys = web_keys,
    .add = web_add, .at = web_at, .finish = web_finish, .release = web_release,
};
