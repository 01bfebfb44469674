/* Network addresses for servers we run: "ADDRESS:PORT" listen specs
 * ("0.0.0.0:1502", "127.0.0.1:1502", "[::1]:1502", "[::]:1502") and client
 * allow-lists ("127.0.0.1, 10.20.0.0/16, fd00::/8"). Numeric addresses only:
 * a name would make a server's exposure depend on DNS.
 *
 * Error convention: 0 on success, -1 with a one-line reason in err. */
#ifndef HP_NETACL_H
#define HP_NETACL_H

#include <stddef.h>
#include <stdint.h>
#include <sys/socket.h>

#define HP_ACL_MAX 32

typedef struct {
    int family;               /* AF_INET or AF_INET6 */
    uint8_t addr[16];         /* network order; 4 bytes used for AF_INET */
    unsigned prefix;          /* bits that must match */
} hp_acl_entry;

typedef struct {
    hp_acl_entry entry[HP_ACL_MAX];
    unsigned n;               /* 0: everyone is allowed */
} hp_acl;

int hp_listen_parse(const char *text, struct sockaddr_storage *out, socklen_t *len, char *err,
                    size_t errlen);
int hp_acl_parse(const char *text, hp_acl *acl, char *err, size_t errlen);
/* 1 when the peer may connect (an empty list allows everyone). An IPv4
 * peer on an IPv6 socket (::ffff:a.b.c.d) is matched as IPv4. */
int hp_acl_allows(const hp_acl *acl, const struct sockaddr *peer);

#endif
