/* The page's logins (see hs_web_users.h). Hashes come from libcrypt's
 * crypt_gensalt_rn("$y$") (yescrypt, salted, the system's default cost) and
 * crypt_rn. */
#include <crypt.h>
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hs_web_users.h"

#define LINE_MAX_LEN 512

const char *hs_user_role_name(hs_user_role role)
{
    return role == HS_USER_OPERATOR ? "operator" : "viewer";
}

int hs_user_role_from_name(const char *name)
{
    if (strcmp(name, "viewer") == 0)
        return HS_USER_VIEWER;
    if (strcmp(name, "operator") == 0)
        return HS_USER_OPERATOR;
    return -1;
}

int hs_user_name_ok(const char *name)
{
    size_t n = strlen(name);
    if (n == 0 || n >= HS_USER_NAME_MAX)
        return 0;
    for (const char *p = name; *p; p++)
        if (!((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z') || (*p >= '0' && *p <= '9') ||
              *p == '.' || *p == '_' || *p == '-'))
            return 0;
    return 1;
}

void hs_users_free(hs_users *users)
{
    free(users->users);
    users->users = NULL;
    users->n = 0;
}

static int append(hs_users *users, const hs_user *u)
{
    hs_user *grown = realloc(users->users, (users->n + 1) * sizeof *grown);
    if (grown == NULL)
        return -1;
    users->users = grown;
    users->users[users->n++] = *u;
    return 0;
}

int hs_users_load(const char *path, int missing_ok, hs_users *out, char *msg, size_t len)
{
    out->users = NULL;
    out->n = 0;
    FILE *f = fopen(path, "r");
    if (f == NULL) {
        if (errno == ENOENT && missing_ok)
            return 0;
        snprintf(msg, len, "%s: %s", path, strerror(errno));
        return -1;
    }
    char line[LINE_MAX_LEN];
    int lineno = 0;
    while (fgets(line, sizeof line, f) != NULL) {
        lineno++;
        if (strchr(line, '\n') == NULL && !feof(f)) {
            snprintf(msg, len, "%s:%d: line too long", path, lineno);
            goto fail;
        }
        line[strcspn(line, "\r\n")] = '\0';
        if (line[0] == '#' || line[strspn(line, " \t")] == '\0')
            continue;
        char name[64], role[16], hash[HS_USER_HASH_MAX + 1], extra[2];
        int got = sscanf(line, "%63s %15s %160s %1s", name, role, hash, extra);
        int r = got >= 2 ? hs_user_role_from_name(role) : -1;
        if (got != 3 || !hs_user_name_ok(name) || r < 0 || strlen(hash) >= HS_USER_HASH_MAX ||
            hash[0] != '$') {
            snprintf(msg, len, "%s:%d: expected NAME viewer|operator HASH", path, lineno);
            goto fail;
        }
        for (size_t i = 0; i < out->n; i++)
            if (strcmp(out->users[i].name, name) == 0) {
                snprintf(msg, len, "%s:%d: user %s appears twice", path, lineno, name);
                goto fail;
            }
        hs_user u = {.role = (hs_user_role)r};
        snprintf(u.name, sizeof u.name, "%.32s", name);
        snprintf(u.hash, sizeof u.hash, "%.159s", hash);
        if (append(out, &u) != 0) {
            snprintf(msg, len, "%s: out of memory", path);
            goto fail;
        }
    }
    fclose(f);
    return 0;
fail:
    fclose(f);
    hs_users_free(out);
    return -1;
}

int hs_users_save(const char *path, const hs_users *users, char *msg, size_t len)
{
    char tmp[4096];
    if ((size_t)snprintf(tmp, sizeof tmp, "%s.new", path) >= sizeof tmp) {
        snprintf(msg, len, "%s: path too long", path);
        return -1;
    }
    int fd = open(tmp, O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0640);
    /* keep the file readable by the daemon's group: the old file's owner,
     * group and mode, or for a new file the folder's group (root edits it,
     * the halostage user reads it); failures here leave root's defaults */
    struct stat sb;
    if (fd >= 0 && stat(path, &sb) == 0) {
        if (fchown(fd, sb.st_uid, sb.st_gid) != 0 || fchmod(fd, sb.st_mode & 0640) != 0)
            errno = 0;
    } else if (fd >= 0) {
        char dir[4096];
        snprintf(dir, sizeof dir, "%s", path);
        char *slash = strrchr(dir, '/');
        if (slash != NULL)
            *slash = '\0';
        if (stat(slash != NULL ? (dir[0] ? dir : "/") : ".", &sb) == 0 &&
            fchown(fd, (uid_t)-1, sb.st_gid) != 0)
            errno = 0;
    }
    FILE *f = fd >= 0 ? fdopen(fd, "w") : NULL;
    if (f == NULL) {
        snprintf(msg, len, "%s: %s", tmp, strerror(errno));
        if (fd >= 0)
            close(fd);
        return -1;
    }
    fprintf(f, "# halostage page logins: NAME ROLE HASH (edit with `halostage user`)\n");
    for (size_t i = 0; i < users->n; i++)
        fprintf(f, "%s %s %s\n", users->users[i].name, hs_user_role_name(users->users[i].role),
                users->users[i].hash);
    int bad = fflush(f) != 0 || fsync(fileno(f)) != 0;
    if (fclose(f) != 0 || bad || rename(tmp, path) != 0) {
        snprintf(msg, len, "%s: %s", path, strerror(errno));
        unlink(tmp);
        return -1;
    }
    return 0;
}

int hs_users_set(hs_users *users, const char *name, hs_user_role role, const char *password,
                 char *msg, size_t len)
{
    if (!hs_user_name_ok(name)) {
        snprintf(msg, len, "user name '%s': use 1 to 32 of letters, digits, '.', '_', '-'", name);
        return -1;
    }
    if (strlen(password) < 8) {
        snprintf(msg, len, "password: at least 8 characters");
        return -1;
    }
    char salt[CRYPT_GENSALT_OUTPUT_SIZE];
    struct crypt_data data;
    memset(&data, 0, sizeof data);
    if (crypt_gensalt_rn("$y$", 0, NULL, 0, salt, sizeof salt) == NULL) {
        snprintf(msg, len, "cannot make a salt: %s", strerror(errno));
        return -1;
    }
    const char *hash = crypt_rn(password, salt, &data, sizeof data);
    if (hash == NULL || hash[0] != '$' || strlen(hash) >= HS_USER_HASH_MAX) {
        snprintf(msg, len, "cannot hash the password: %s", strerror(errno));
        return -1;
    }
    hs_user u = {.role = role};
    snprintf(u.name, sizeof u.name, "%s", name);
    snprintf(u.hash, sizeof u.hash, "%s", hash);
    for (size_t i = 0; i < users->n; i++)
        if (strcmp(users->users[i].name, name) == 0) {
            users->users[i] = u;
            return 0;
        }
    if (append(users, &u) != 0) {
        snprintf(msg, len, "out of memory");
        return -1;
    }
    return 0;
}

int hs_users_remove(hs_users *users, const char *name, char *msg, size_t len)
{
    for (size_t i = 0; i < users->n; i++)
        if (strcmp(users->users[i].name, name) == 0) {
            memmove(&users->users[i], &users->users[i + 1],
                    (users->n - i - 1) * sizeof users->users[0]);
            users->n--;
            return 0;
        }
    snprintf(msg, len, "no user '%s'", name);
    return -1;
}

/* A fixed hash to spend the same work on for an unknown name. */
#define DECOY_HASH "$y$j9T$S1e9.EFz.SQatWOQAqtLO0$OWonzWwJTvojYdd5E6g7Ow2DBqqTUieUn2v330OTmQ1"

static int same(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    unsigned char diff = la != lb;
    for (size_t i = 0; i < la && i < lb; i++)
        diff |= (unsigned char)(a[i] ^ b[i]);
    return diff == 0;
}

const hs_user *hs_users_check(const hs_users *users, const char *name, const char *password)
{
    const hs_user *found = NULL;
    for (size_t i = 0; i < users->n; i++)
        if (strcmp(users->users[i].name, name) == 0)
            found = &users->users[i];
    struct crypt_data *data = calloc(1, sizeof *data); /* 32 KB: not on the stack */
    if (data == NULL)
        return NULL;
    const char *setting = found ? found->hash : DECOY_HASH;
    const char *hash = crypt_rn(password, setting, data, sizeof *data);
    int ok = hash != NULL && hash[0] == '$' && same(hash, setting);
    free(data);
    return found != NULL && ok ? found : NULL;
}
