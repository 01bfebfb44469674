/* [web]: the operators' page and the /api/v1 JSON API served by the daemon
 * (plugin/hs_web.h). Off unless the section exists. plugin/hs_conf_web.c
 * reads it into site->web (NULL when absent). Nothing configured here can
 * reach a pump or a register: the page reads, acknowledges and shelves
 * alarms and records hydrometer readings only. */
#ifndef HS_CONF_WEB_H
#define HS_CONF_WEB_H

#include <stdbool.h>
#include <stdint.h>

#include "hs_site.h"

typedef enum { HS_WEB_SCALE_BAUME, HS_WEB_SCALE_SG } hs_web_scale;

typedef struct hs_web_conf {
    int line;
    char listen[96];             /* ADDRESS:PORT as written; [v6]:PORT for IPv6 */
    char address[64];            /* the address part, without brackets */
    unsigned port;
    bool loopback;               /* address is 127.0.0.0/8 or ::1 */
    char users_file[HS_PATH_MAX];/* `halostage user` writes it; "" = no logins */
    char tls_cert[HS_PATH_MAX];  /* PEM; with tls_key the page is served over HTTPS */
    char tls_key[HS_PATH_MAX];
    bool public_view;            /* read-only views without a login */
    int scale;                   /* hs_web_scale: how densities are shown first */
    int64_t session_ms;          /* a login lasts this long without use */
    unsigned max_clients;        /* connections at once */
} hs_web_conf;

/* Splits "ADDRESS:PORT" / "[V6]:PORT". 0, or -1 with a reason in msg. */
int hs_web_listen_parse(const char *text, char *address, size_t address_len, unsigned *port,
                        bool *loopback, char *msg, size_t msg_len);

#endif
