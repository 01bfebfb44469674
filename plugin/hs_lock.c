/* The site lock; see hs_lock.h. */
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "hs_lock.h"

struct hs_lock {
    int fd;
};

int hs_lock_path(const char *database, char *buf, size_t len)
{
    return snprintf(buf, len, "%s.lock", database);
}

static long read_pid(int fd)
{
    char text[32] = "";
    ssize_t n = pread(fd, text, sizeof text - 1, 0);
    if (n <= 0)
        return 0;
    text[n] = '\0';
    char *end = NULL;
    errno = 0;
    long pid = strtol(text, &end, 10);
    return errno == 0 && end != text && pid > 0 ? pid : 0;
}

static struct flock whole_file(short type)
{
    struct flock fl;
    memset(&fl, 0, sizeof fl);
    fl.l_type = type;
    fl.l_whence = SEEK_SET; /* l_start = l_len = 0: the whole file */
    return fl;
}

int hs_lock_take(const char *database, hs_lock **out, char *err, size_t err_len)
{
    char path[4096];
    if (hs_lock_path(database, path, sizeof path) >= (int)sizeof path) {
        snprintf(err, err_len, "%s: path too long for its lock file", database);
        return -1;
    }
    int fd = open(path, O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0) {
        snprintf(err, err_len, "%s: cannot open the site lock: %s", path, strerror(errno));
        return -1;
    }
    struct flock fl = whole_file(F_WRLCK);
    if (fcntl(fd, F_OFD_SETLK, &fl) != 0) {
        int e = errno;
        if (e == EAGAIN || e == EACCES) {
            long pid = read_pid(fd);
            if (pid > 0)
                snprintf(err, err_len, "another halostaged (PID %ld) already runs this site "
                         "(lock %s held); refusing to start a second one", pid, path);
            else
                snprintf(err, err_len, "another process already runs this site (lock %s "
                         "held); refusing to start a second one", path);
        } else {
            snprintf(err, err_len, "%s: cannot take the site lock: %s", path, strerror(e));
        }
        close(fd);
        return -1;
    }
    char text[32];
    int n = snprintf(text, sizeof text, "%ld\n", (long)getpid());
    if (ftruncate(fd, 0) != 0 || pwrite(fd, text, (size_t)n, 0) != n) {
        snprintf(err, err_len, "%s: cannot write the PID into the site lock: %s", path,
                 strerror(errno));
        close(fd);
        return -1;
    }
    hs_lock *lock = malloc(sizeof *lock);
    if (lock == NULL) {
        snprintf(err, err_len, "out of memory");
        close(fd);
        return -1;
    }
    lock->fd = fd;
    *out = lock;
    return 0;
}

void hs_lock_release(hs_lock *lock)
{
    if (lock == NULL)
        return;
    /* The PID goes first, so a reader never names a process that let go. */
    if (ftruncate(lock->fd, 0) != 0) {
        /* nothing to do: closing releases the lock all the same */
    }
    close(lock->fd);
    free(lock);
}

int hs_lock_holder(const char *database, long *pid, char *err, size_t err_len)
{
    char path[4096];
    *pid = 0;
    if (hs_lock_path(database, path, sizeof path) >= (int)sizeof path) {
        snprintf(err, err_len, "%s: path too long for its lock file", database);
        return -1;
    }
    int fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0) {
        if (errno == ENOENT)
            return 0;
        snprintf(err, err_len, "%s: %s", path, strerror(errno));
        return -1;
    }
    struct flock fl = whole_file(F_WRLCK);
    int rc;
    if (fcntl(fd, F_OFD_GETLK, &fl) != 0) {
        snprintf(err, err_len, "%s: cannot ask who holds the site lock: %s", path,
                 strerror(errno));
        rc = -1;
    } else if (fl.l_type == F_UNLCK) {
        rc = 0;
    } else {
        *pid = read_pid(fd); /* an OFD lock reports l_pid -1: the file says who */
        rc = 1;
    }
    close(fd);
    return rc;
}
