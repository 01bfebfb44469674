/* Secrets from files (e.g. the MQTT password_file). A secret file must not
 * be readable or writable by others (mode bits o=---); the owner and group
 * may read it, so that a service group can be given access.
 * Error convention: 0 on success, -1 with "PATH: reason" in err. */
#ifndef HS_SECRET_H
#define HS_SECRET_H

#include <stddef.h>

/* Reads the first line of path (without its line end) into buf. */
int hs_read_secret(const char *path, char *buf, size_t len, char *err, size_t errlen);

#endif
