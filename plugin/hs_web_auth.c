/* Who is asking, and may they: session cookies (HttpOnly, SameSite=Strict),
 * a CSRF token per session that every write must echo in X-CSRF-Token, a
 * same-origin check on every POST and DELETE, JSON-only bodies (a form on
 * another site cannot send one without the browser asking us first), and
 * failed logins slowed per client and name (1 s, 2 s, 4 s ... 60 s). */
#include <arpa/inet.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/random.h>

#include "hs_log.h"
#include "hs_web_private.h"

#define COOKIE "hs_session"
#define THROTTLE_MAX_MS 60000

static int random_hex(char *out, size_t hex_len)
{
    unsigned char raw[HS_WEB_TOKEN_HEX / 2];
    size_t n = hex_len / 2;
    if (n > sizeof raw || getrandom(raw, n, 0) != (ssize_t)n)
        return -1;
    for (size_t i = 0; i < n; i++)
        sprintf(out + 2 * i, "%02x", raw[i]);
    out[2 * n] = '\0';
    return 0;
}

static int same(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    unsigned char diff = la != lb;
    for (size_t i = 0; i < la && i < lb; i++)
        diff |= (unsigned char)(a[i] ^ b[i]);
    return diff == 0;
}

void hs_web_auth_identify(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    c->session = NULL;
    c->access = w->conf.public_view ? HS_ACCESS_VIEWER : HS_ACCESS_NONE;
    const char *token = MHD_lookup_connection_value(c->conn, MHD_COOKIE_KIND, COOKIE);
    if (token == NULL || strlen(token) != HS_WEB_TOKEN_HEX)
        return;
    int64_t now = hs_web_mono_ms();
    for (size_t i = 0; i < HS_WEB_SESSIONS; i++) {
        struct hs_web_session *s = &w->sessions[i];
        if (!s->token[0] || !same(s->token, token))
            continue;
        if (now - s->last_ms > w->conf.session_ms) {
            memset(s, 0, sizeof *s); /* expired */
            return;
        }
        s->last_ms = now;
        c->session = s;
        c->access = s->role == HS_USER_OPERATOR ? HS_ACCESS_OPERATOR : HS_ACCESS_VIEWER;
        return;
    }
}

int hs_web_auth_read(struct hs_web_call *c, enum MHD_Result *result)
{
    if (c->access != HS_ACCESS_NONE)
        return 1;
    *result = hs_web_error(c, 401, NULL, "log in first (POST /api/v1/session)");
    return 0;
}

/* The request comes from a page of this gateway: Origin (or, without it,
 * Sec-Fetch-Site) names our own scheme and host. */
static int same_origin(struct hs_web_call *c)
{
    const char *origin = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "Origin");
    const char *host = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "Host");
    if (origin == NULL) {
        const char *site = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "Sec-Fetch-Site");
        return site == NULL || strcmp(site, "same-origin") == 0 || strcmp(site, "none") == 0;
    }
    if (host == NULL)
        return 0;
    char expect[300];
    snprintf(expect, sizeof expect, "%s://%s", c->web->tls_cert_pem ? "https" : "http", host);
    return strcmp(origin, expect) == 0;
}

static int json_body(struct hs_web_call *c)
{
    const char *type = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "Content-Type");
    return type != NULL && strncmp(type, "application/json", 16) == 0 &&
           (type[16] == '\0' || type[16] == ';');
}

int hs_web_auth_write(struct hs_web_call *c, enum MHD_Result *result)
{
    if (!same_origin(c)) {
        *result = hs_web_error(c, 403, NULL, "cross-site request refused (Origin is not this "
                                             "gateway)");
        return -1;
    }
    if (c->session == NULL) {
        *result = hs_web_error(c, 401, NULL, "log in first (POST /api/v1/session)");
        return -1;
    }
    const char *csrf = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "X-CSRF-Token");
    if (csrf == NULL || !same(csrf, c->session->csrf)) {
        *result = hs_web_error(c, 403, NULL, "missing or wrong X-CSRF-Token (from GET "
                                             "/api/v1/session)");
        return -1;
    }
    if (c->session->role != HS_USER_OPERATOR) {
        *result = hs_web_error(c, 403, NULL, "user %s is a viewer; acknowledging, shelving and "
                                             "readings need an operator", c->session->user);
        return -1;
    }
    return 0;
}

json_t *hs_web_body_json(struct hs_web_call *c, enum MHD_Result *result)
{
    if (!json_body(c)) {
        *result = hs_web_error(c, 415, NULL, "send the body as Content-Type: application/json");
        return NULL;
    }
    json_error_t err;
    json_t *o = c->req->body ? json_loadb(c->req->body, c->req->body_len, JSON_REJECT_DUPLICATES,
                                          &err)
                             : NULL;
    if (!json_is_object(o)) {
        json_decref(o);
        *result = hs_web_error(c, 400, "body", "the body must be one JSON object%s%s",
                               c->req->body ? ": " : "", c->req->body ? err.text : "");
        return NULL;
    }
    return o;
}

static json_t *who(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    const hs_site_conf *s = &w->site.site;
    json_t *o = json_pack("{s:s, s:b, s:s, s:f, s:f, s:b}", "site", s->name, "public_view",
                          w->conf.public_view, "density_scale",
                          w->conf.scale == HS_WEB_SCALE_SG ? "sg" : "baume",
                          "reference_temperature_c", s->reference_temperature_c,
                          "baume_modulus", s->baume_modulus, "logins", w->users.n > 0);
    if (c->session) {
        json_object_set_new(o, "user", json_string(c->session->user));
        json_object_set_new(o, "role", json_string(hs_user_role_name(c->session->role)));
        json_object_set_new(o, "csrf_token", json_string(c->session->csrf));
    } else {
        json_object_set_new(o, "user", json_null());
        json_object_set_new(o, "role", c->access == HS_ACCESS_VIEWER ? json_string("public")
                                                                     : json_null());
    }
    return o;
}

enum MHD_Result hs_web_session_get(struct hs_web_call *c)
{
    return hs_web_json(c, 200, who(c));
}

static void client_key(struct hs_web_call *c, const char *name, char *key, size_t len)
{
    const union MHD_ConnectionInfo *ci =
        MHD_get_connection_info(c->conn, MHD_CONNECTION_INFO_CLIENT_ADDRESS);
    char addr[64] = "?";
    if (ci != NULL && ci->client_addr != NULL) {
        const struct sockaddr *sa = ci->client_addr;
        if (sa->sa_family == AF_INET)
            inet_ntop(AF_INET, &((const struct sockaddr_in *)(const void *)sa)->sin_addr, addr,
                      sizeof addr);
        else if (sa->sa_family == AF_INET6)
            inet_ntop(AF_INET6, &((const struct sockaddr_in6 *)(const void *)sa)->sin6_addr,
                      addr, sizeof addr);
    }
    snprintf(key, len, "%.50s|%.40s", addr, name); /* INET6_ADDRSTRLEN is 46 */
}

static struct hs_web_throttle *throttle_find(struct hs_web *w, const char *key, int make)
{
    struct hs_web_throttle *oldest = &w->throttle[0];
    for (size_t i = 0; i < HS_WEB_THROTTLE; i++) {
        if (strcmp(w->throttle[i].key, key) == 0)
            return &w->throttle[i];
        if (w->throttle[i].until_ms < oldest->until_ms)
            oldest = &w->throttle[i];
    }
    if (!make)
        return NULL;
    memset(oldest, 0, sizeof *oldest);
    snprintf(oldest->key, sizeof oldest->key, "%s", key);
    return oldest;
}

static enum MHD_Result set_cookie_reply(struct hs_web_call *c, const char *token, int clear)
{
    char cookie[200];
    if (clear)
        snprintf(cookie, sizeof cookie, COOKIE "=; Path=/; HttpOnly; SameSite=Strict; Max-Age=0%s",
                 c->web->tls_cert_pem ? "; Secure" : "");
    else
        snprintf(cookie, sizeof cookie, COOKIE "=%s; Path=/; HttpOnly; SameSite=Strict%s", token,
                 c->web->tls_cert_pem ? "; Secure" : "");
    json_t *o = who(c);
    char *text = json_dumps(o, JSON_COMPACT);
    json_decref(o);
    if (text == NULL)
        return hs_web_error(c, 500, NULL, "out of memory");
    struct MHD_Response *r =
        MHD_create_response_from_buffer(strlen(text), text, MHD_RESPMEM_MUST_FREE);
    if (r == NULL) {
        free(text);
        return MHD_NO;
    }
    MHD_add_response_header(r, "Content-Type", "application/json");
    MHD_add_response_header(r, "Cache-Control", "no-store");
    MHD_add_response_header(r, "Set-Cookie", cookie);
    enum MHD_Result ret = MHD_queue_response(c->conn, 200, r);
    MHD_destroy_response(r);
    return ret;
}

enum MHD_Result hs_web_session_post(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    enum MHD_Result res;
    if (!same_origin(c))
        return hs_web_error(c, 403, NULL, "cross-site request refused (Origin is not this "
                                          "gateway)");
    json_t *body = hs_web_body_json(c, &res);
    if (body == NULL)
        return res;
    const char *name = json_string_value(json_object_get(body, "user"));
    const char *pass = json_string_value(json_object_get(body, "password"));
    if (name == NULL || !hs_user_name_ok(name)) {
        json_decref(body);
        return hs_web_error(c, 400, "user", "user: a name of 1 to 32 letters, digits, . _ -");
    }
    if (pass == NULL || strlen(pass) > 1024) {
        json_decref(body);
        return hs_web_error(c, 400, "password", "password: a string of at most 1024 bytes");
    }
    char key[96];
    client_key(c, name, key, sizeof key);
    int64_t now = hs_web_mono_ms();
    struct hs_web_throttle *t = throttle_find(w, key, 0);
    if (t != NULL && now < t->until_ms) {
        json_decref(body);
        char after[32];
        snprintf(after, sizeof after, "%lld", (long long)((t->until_ms - now + 999) / 1000));
        json_t *o = json_pack("{s:s, s:I}", "error", "too many failed logins; wait",
                              "retry_after_s", (json_int_t)((t->until_ms - now + 999) / 1000));
        char *text = json_dumps(o, JSON_COMPACT);
        json_decref(o);
        struct MHD_Response *r = text ? MHD_create_response_from_buffer(strlen(text), text,
                                                                        MHD_RESPMEM_MUST_FREE)
                                      : NULL;
        if (r == NULL) {
            free(text);
            return MHD_NO;
        }
        MHD_add_response_header(r, "Content-Type", "application/json");
        MHD_add_response_header(r, "Retry-After", after);
        enum MHD_Result ret = MHD_queue_response(c->conn, 429, r);
        MHD_destroy_response(r);
        return ret;
    }
    const hs_user *u = hs_users_check(&w->users, name, pass);
    if (u == NULL) {
        t = throttle_find(w, key, 1);
        t->failures++;
        int64_t wait = 1000LL << (t->failures > 7 ? 6 : t->failures - 1);
        t->until_ms = now + (wait > THROTTLE_MAX_MS ? THROTTLE_MAX_MS : wait);
        hs_log(HSP_LOG_WARNING, "web: failed login as '%s' from %s (%u in a row)", name, key,
               t->failures);
        json_decref(body);
        return hs_web_error(c, 401, NULL, "wrong user name or password");
    }
    if (t != NULL)
        memset(t, 0, sizeof *t);
    struct hs_web_session *slot = &w->sessions[0];
    for (size_t i = 0; i < HS_WEB_SESSIONS; i++) {
        if (!w->sessions[i].token[0] || now - w->sessions[i].last_ms > w->conf.session_ms) {
            slot = &w->sessions[i];
            break;
        }
        if (w->sessions[i].last_ms < slot->last_ms)
            slot = &w->sessions[i];
    }
    memset(slot, 0, sizeof *slot);
    if (random_hex(slot->token, HS_WEB_TOKEN_HEX) != 0 ||
        random_hex(slot->csrf, HS_WEB_TOKEN_HEX) != 0) {
        memset(slot, 0, sizeof *slot);
        json_decref(body);
        return hs_web_error(c, 500, NULL, "no random numbers for a session");
    }
    snprintf(slot->user, sizeof slot->user, "%s", u->name);
    slot->role = u->role;
    slot->last_ms = now;
    c->session = slot;
    c->access = u->role == HS_USER_OPERATOR ? HS_ACCESS_OPERATOR : HS_ACCESS_VIEWER;
    hs_log(HSP_LOG_NOTICE, "web: %s (%s) logged in", u->name, hs_user_role_name(u->role));
    json_decref(body);
    return set_cookie_reply(c, slot->token, 0);
}

enum MHD_Result hs_web_session_delete(struct hs_web_call *c)
{
    if (!same_origin(c))
        return hs_web_error(c, 403, NULL, "cross-site request refused");
    if (c->session == NULL)
        return hs_web_error(c, 401, NULL, "not logged in");
    const char *csrf = MHD_lookup_connection_value(c->conn, MHD_HEADER_KIND, "X-CSRF-Token");
    if (csrf == NULL || !same(csrf, c->session->csrf))
        return hs_web_error(c, 403, NULL, "missing or wrong X-CSRF-Token");
    memset(c->session, 0, sizeof *c->session);
    c->session = NULL;
    c->access = c->web->conf.public_view ? HS_ACCESS_VIEWER : HS_ACCESS_NONE;
    return set_cookie_reply(c, NULL, 1);
}
