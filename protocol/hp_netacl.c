/* Listen specs and client allow-lists (see hp_netacl.h). */
#include <arpa/inet.h>
#include <netinet/in.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hp_netacl.h"

static int fail(char *err, size_t len, const char *what, const char *text)
{
    if (err != NULL && len > 0)
        snprintf(err, len, "'%s': %s", text, what);
    return -1;
}

int hp_listen_parse(const char *text, struct sockaddr_storage *out, socklen_t *len, char *err,
                    size_t errlen)
{
    char host[64];
    const char *port_text;
    memset(out, 0, sizeof *out);
    if (text[0] == '[') {
        const char *close = strchr(text, ']');
        if (close == NULL || close[1] != ':' || (size_t)(close - text - 1) >= sizeof host)
            return fail(err, errlen, "expected [IPV6]:PORT", text);
        memcpy(host, text + 1, (size_t)(close - text - 1));
        host[close - text - 1] = '\0';
        port_text = close + 2;
    } else {
        const char *colon = strrchr(text, ':');
        if (colon == NULL || (size_t)(colon - text) >= sizeof host || strchr(text, ':') != colon)
            return fail(err, errlen, "expected ADDRESS:PORT (IPv6 as [ADDRESS]:PORT)", text);
        memcpy(host, text, (size_t)(colon - text));
        host[colon - text] = '\0';
        port_text = colon + 1;
    }
    char *end;
    long port = strtol(port_text, &end, 10);
    if (*port_text == '\0' || *end != '\0' || port < 1 || port > 65535)
        return fail(err, errlen, "port must be 1..65535", text);
    struct sockaddr_in *v4 = (struct sockaddr_in *)out;
    struct sockaddr_in6 *v6 = (struct sockaddr_in6 *)out;
    if (inet_pton(AF_INET, host, &v4->sin_addr) == 1) {
        v4->sin_family = AF_INET;
        v4->sin_port = htons((uint16_t)port);
        *len = sizeof *v4;
    } else if (inet_pton(AF_INET6, host, &v6->sin6_addr) == 1) {
        v6->sin6_family = AF_INET6;
        v6->sin6_port = htons((uint16_t)port);
        *len = sizeof *v6;
    } else {
        return fail(err, errlen, "the address must be numeric IPv4 or IPv6", text);
    }
    return 0;
}

static int parse_entry(const char *item, hp_acl_entry *e, char *err, size_t errlen)
{
    char host[64];
    const char *slash = strchr(item, '/');
    size_t hl = slash ? (size_t)(slash - item) : strlen(item);
    if (hl == 0 || hl >= sizeof host)
        return fail(err, errlen, "not an address or ADDRESS/PREFIX", item);
    memcpy(host, item, hl);
    host[hl] = '\0';
    memset(e, 0, sizeof *e);
    unsigned max;
    if (inet_pton(AF_INET, host, e->addr) == 1) {
        e->family = AF_INET;
        max = 32;
    } else if (inet_pton(AF_INET6, host, e->addr) == 1) {
        e->family = AF_INET6;
        max = 128;
    } else {
        return fail(err, errlen, "not a numeric IPv4 or IPv6 address", item);
    }
    e->prefix = max;
    if (slash) {
        char *end;
        long p = strtol(slash + 1, &end, 10);
        if (slash[1] == '\0' || *end != '\0' || p < 0 || p > (long)max)
            return fail(err, errlen, "prefix length out of range", item);
        e->prefix = (unsigned)p;
    }
    return 0;
}

int hp_acl_parse(const char *text, hp_acl *acl, char *err, size_t errlen)
{
    memset(acl, 0, sizeof *acl);
    const char *p = text;
    while (*p) {
        while (*p == ' ' || *p == ',' || *p == '\t')
            p++;
        if (*p == '\0')
            break;
        const char *start = p;
        while (*p && *p != ',' && *p != ' ' && *p != '\t')
            p++;
        char item[80];
        size_t n = (size_t)(p - start);
        if (n >= sizeof item)
            return fail(err, errlen, "entry too long", text);
        memcpy(item, start, n);
        item[n] = '\0';
        if (acl->n >= HP_ACL_MAX) {
            if (err != NULL && errlen > 0)
                snprintf(err, errlen, "more than %d entries", HP_ACL_MAX);
            return -1;
        }
        if (parse_entry(item, &acl->entry[acl->n], err, errlen) != 0)
            return -1;
        acl->n++;
    }
    return 0;
}

static int prefix_match(const uint8_t *a, const uint8_t *b, unsigned bits)
{
    unsigned bytes = bits / 8, rest = bits % 8;
    if (memcmp(a, b, bytes) != 0)
        return 0;
    if (rest == 0)
        return 1;
    uint8_t mask = (uint8_t)(0xFFu << (8 - rest));
    return (a[bytes] & mask) == (b[bytes] & mask);
}

int hp_acl_allows(const hp_acl *acl, const struct sockaddr *peer)
{
    if (acl->n == 0)
        return 1;
    int family = peer->sa_family;
    uint8_t addr[16];
    if (family == AF_INET) {
        memcpy(addr, &((const struct sockaddr_in *)(const void *)peer)->sin_addr, 4);
    } else if (family == AF_INET6) {
        const struct in6_addr *a6 = &((const struct sockaddr_in6 *)(const void *)peer)->sin6_addr;
        if (IN6_IS_ADDR_V4MAPPED(a6)) {
            family = AF_INET;
            memcpy(addr, a6->s6_addr + 12, 4);
        } else {
            memcpy(addr, a6->s6_addr, 16);
        }
    } else {
        return 0;
    }
    for (unsigned i = 0; i < acl->n; i++)
        if (acl->entry[i].family == family &&
            prefix_match(acl->entry[i].addr, addr, acl->entry[i].prefix))
            return 1;
    return 0;
}
