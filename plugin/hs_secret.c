/* Secrets from files (see hs_secret.h). */
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hs_secret.h"

int hs_read_secret(const char *path, char *buf, size_t len, char *err, size_t errlen)
{
    int fd = open(path, O_RDONLY | O_CLOEXEC | O_NOFOLLOW);
    if (fd < 0) {
        snprintf(err, errlen, "%s: cannot open: %s", path, strerror(errno));
        return -1;
    }
    struct stat sb;
    if (fstat(fd, &sb) != 0 || !S_ISREG(sb.st_mode)) {
        snprintf(err, errlen, "%s: not a regular file", path);
        close(fd);
        return -1;
    }
    if (sb.st_mode & S_IRWXO) {
        snprintf(err, errlen, "%s: readable or writable by others (mode %03o); "
                              "chmod o= it first", path, (unsigned)(sb.st_mode & 0777));
        close(fd);
        return -1;
    }
    ssize_t n = read(fd, buf, len - 1);
    int saved = errno;
    close(fd);
    if (n < 0) {
        snprintf(err, errlen, "%s: cannot read: %s", path, strerror(saved));
        return -1;
    }
    buf[n] = '\0';
    size_t line = strcspn(buf, "\r\n");
    if (line == (size_t)n && (size_t)n == len - 1) {
        snprintf(err, errlen, "%s: the secret is longer than %zu bytes", path, len - 2);
        explicit_bzero(buf, len);
        return -1;
    }
    buf[line] = '\0';
    if (buf[0] == '\0') {
        snprintf(err, errlen, "%s: the first line is empty", path);
        return -1;
    }
    return 0;
}
