/* See hs_mqtt_secret.h. */
#include <stdio.h>
#include <string.h>
#include <strings.h>

#include "hs_mqtt_secret.h"
#include "hs_secret.h"

int hs_mqtt_password(const hs_mqtt_conf *m, const char *site_path, char *buf, size_t len,
                     char *err, size_t errlen)
{
    buf[0] = '\0';
    if (m == NULL || !m->password_file[0])
        return 0;
    char why[1024];
    if (hs_read_secret(m->password_file, buf, len, why, sizeof why) != 0) {
        snprintf(err, errlen, "%s:%d: [mqtt] password_file %s", site_path, m->line, why);
        return -1;
    }
    return 0;
}

/* The host part of "mqtt://HOST:PORT" (or "[v6]:PORT") into buf. */
static void uri_host(const char *uri, char *buf, size_t len)
{
    const char *h = strstr(uri, "://");
    h = h ? h + 3 : uri;
    size_t n;
    if (*h == '[') {
        h++;
        n = strcspn(h, "]");
    } else {
        n = strcspn(h, ":/");
    }
    snprintf(buf, len, "%.*s", (int)n, h);
}

int hs_mqtt_password_in_clear(const hs_mqtt_conf *m, const char *site_path, char *warning,
                              size_t len)
{
    if (m == NULL || !m->enabled || !m->password_file[0] || strncmp(m->uri, "mqtt://", 7) != 0)
        return 0;
    char host[256];
    uri_host(m->uri, host, sizeof host);
    if (strncmp(host, "127.", 4) == 0 || strcmp(host, "::1") == 0 ||
        strcasecmp(host, "localhost") == 0)
        return 0; /* never leaves this machine */
    snprintf(warning, len, "%s:%d: [mqtt] uri %s with password_file: the password crosses the "
             "network in clear; use mqtts:// with ca_file", site_path, m->line, m->uri);
    return 1;
}
