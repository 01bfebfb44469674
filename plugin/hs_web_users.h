/* The page's logins: a users file of lines "NAME ROLE HASH" (ROLE viewer or
 * operator; HASH a salted yescrypt hash from libcrypt, never the password).
 * `halostage user` edits it; the daemon reads it when the web server starts
 * and on reload. Lines starting with '#' are comments.
 *
 * Memory: an hs_users list owns its array; hs_users_free releases it.
 * Error convention: 0 on success, -1 with a one-line reason in msg. */
#ifndef HS_WEB_USERS_H
#define HS_WEB_USERS_H

#include <stddef.h>

#define HS_USER_NAME_MAX 33  /* 32 characters and the NUL */
#define HS_USER_HASH_MAX 160

typedef enum { HS_USER_VIEWER = 0, HS_USER_OPERATOR = 1 } hs_user_role;

typedef struct {
    char name[HS_USER_NAME_MAX];
    hs_user_role role;
    char hash[HS_USER_HASH_MAX];
} hs_user;

typedef struct {
    hs_user *users;
    size_t n;
} hs_users;

const char *hs_user_role_name(hs_user_role role); /* "viewer", "operator" */
int hs_user_role_from_name(const char *name);     /* -1 when unknown */
/* 1 when name is 1..32 of [A-Za-z0-9._-], else 0. */
int hs_user_name_ok(const char *name);

/* Reads path; a missing file is an empty list when missing_ok. */
int hs_users_load(const char *path, int missing_ok, hs_users *out, char *msg, size_t len);
/* Writes the list to path through a temporary file and rename (mode 0640). */
int hs_users_save(const char *path, const hs_users *users, char *msg, size_t len);
void hs_users_free(hs_users *users);

/* Adds or replaces name with a new salted hash of password. */
int hs_users_set(hs_users *users, const char *name, hs_user_role role, const char *password,
                 char *msg, size_t len);
/* Removes name; -1 when there is no such user. */
int hs_users_remove(hs_users *users, const char *name, char *msg, size_t len);

/* The user whose password matches, or NULL. Takes about as long for an
 * unknown name as for a wrong password. */
const hs_user *hs_users_check(const hs_users *users, const char *name, const char *password);

#endif
