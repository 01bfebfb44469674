/* The web server's life and its dispatcher (see hs_web.h): libmicrohttpd in
 * its own epoll polling thread with bounded connections, memory and time;
 * POST bodies capped here; a pulse thread resuming suspended connections. */
#include <arpa/inet.h>
#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <time.h>
#include <unistd.h>

#include "hs_config.h"
#include "hs_log.h"
#include "hs_web_private.h"

#define CONNECTION_TIMEOUT_S 30    /* idle connections close after this */
#define CONNECTION_MEMORY 65536    /* per connection: headers and body pieces */
#define PER_IP_LIMIT 32     /* several phones behind one NAT; 20 clients in the bench */
#define PEM_MAX (256 * 1024)

int64_t hs_web_mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int64_t hs_web_wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

/* ---- responses ---- */

static void security_headers(struct MHD_Response *r)
{
    /* everything from the gateway itself; nothing inline, no framing */
    MHD_add_response_header(r, "Content-Security-Policy",
                            "default-src 'self'; script-src 'self'; style-src 'self'; "
                            "img-src 'self' data:; connect-src 'self'; font-src 'self'; "
                            "object-src 'none'; base-uri 'none'; form-action 'self'; "
                            "frame-ancestors 'none'");
    MHD_add_response_header(r, "X-Content-Type-Options", "nosniff");
    MHD_add_response_header(r, "Referrer-Policy", "no-referrer");
    MHD_add_response_header(r, "X-Frame-Options", "DENY");
}

enum MHD_Result hs_web_send(struct hs_web_call *c, unsigned status, const char *type,
                            const void *data, size_t len, int copy)
{
    struct MHD_Response *r = MHD_create_response_from_buffer(
        len, (void *)(uintptr_t)data, copy ? MHD_RESPMEM_MUST_COPY : MHD_RESPMEM_PERSISTENT);
    if (r == NULL)
        return MHD_NO;
    MHD_add_response_header(r, "Content-Type", type);
    MHD_add_response_header(r, "Cache-Control", "no-store");
    security_headers(r);
    if (status == MHD_HTTP_UNAUTHORIZED)
        MHD_add_response_header(r, "WWW-Authenticate", "Cookie realm=\"halostage\"");
    enum MHD_Result ret = MHD_queue_response(c->conn, status, r);
    MHD_destroy_response(r);
    return ret;
}

enum MHD_Result hs_web_json(struct hs_web_call *c, unsigned status, json_t *o)
{
    char *text = o ? json_dumps(o, JSON_COMPACT | JSON_REAL_PRECISION(8)) : NULL;
    json_decref(o);
    if (text == NULL)
        return hs_web_send(c, 500, "application/json", "{\"error\":\"out of memory\"}", 25, 0);
    struct MHD_Response *r =
        MHD_create_response_from_buffer(strlen(text), text, MHD_RESPMEM_MUST_FREE);
    if (r == NULL) {
        free(text);
        return MHD_NO;
    }
    MHD_add_response_header(r, "Content-Type", "application/json");
    MHD_add_response_header(r, "Cache-Control", "no-store");
    security_headers(r);
    enum MHD_Result ret = MHD_queue_response(c->conn, status, r);
    MHD_destroy_response(r);
    return ret;
}

enum MHD_Result hs_web_error(struct hs_web_call *c, unsigned status, const char *field,
                             const char *fmt, ...)
{
    char msg[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    json_t *o = json_pack("{s:s}", "error", msg);
    if (o && field)
        json_object_set_new(o, "field", json_string(field));
    return hs_web_json(c, status, o);
}

/* ---- waiting connections ---- */

int hs_web_wait(struct hs_web_call *c)
{
    pthread_mutex_lock(&c->web->lock);
    if (c->web->stopping) {
        pthread_mutex_unlock(&c->web->lock);
        return -1;
    }
    c->req->waiter.conn = c->conn;
    c->req->waiter.stream = 0;
    c->req->waiter.next = c->web->waiters;
    c->web->waiters = &c->req->waiter;
    MHD_suspend_connection(c->conn);
    pthread_mutex_unlock(&c->web->lock);
    return 0;
}

/* Resumes waiters: every command waiter, and the streams when there is news
 * or a keepalive is due (all: resume_all). Called with lock held. */
static void resume_due(struct hs_web *w, int resume_all)
{
    uint64_t seq = atomic_load(&w->seq);
    int64_t now = hs_web_mono_ms();
    struct hs_web_waiter **pp = &w->waiters;
    while (*pp != NULL) {
        struct hs_web_waiter *it = *pp;
        int go = resume_all || !it->stream;
        if (!go) {
            struct hs_web_stream *s =
                (struct hs_web_stream *)((char *)it - offsetof(struct hs_web_stream, waiter));
            go = s->sent_seq != seq || now - s->last_write_ms >= HS_WEB_KEEPALIVE_MS;
        }
        if (go) {
            *pp = it->next;
            it->next = NULL;
            MHD_resume_connection(it->conn);
        } else {
            pp = &it->next;
        }
    }
}

static void *pulse_main(void *arg)
{
    struct hs_web *w = arg;
    pthread_mutex_lock(&w->lock);
    while (!w->stopping) {
        struct timespec ts;
        clock_gettime(CLOCK_MONOTONIC, &ts);
        ts.tv_nsec += HS_WEB_PULSE_MS * 1000000L;
        if (ts.tv_nsec >= 1000000000L) {
            ts.tv_sec++;
            ts.tv_nsec -= 1000000000L;
        }
        pthread_cond_timedwait(&w->wake, &w->lock, &ts);
        resume_due(w, w->stopping);
    }
    resume_due(w, 1);
    pthread_mutex_unlock(&w->lock);
    return NULL;
}

/* ---- dispatch ---- */

/* Splits "/api/v1/a/b/c" after the prefix into up to max parts (in buf). */
static int split_path(const char *url, char *buf, size_t len, char **parts, int max)
{
    if ((size_t)snprintf(buf, len, "%s", url) >= len)
        return -1;
    int n = 0;
    for (char *save = NULL, *p = strtok_r(buf, "/", &save); p; p = strtok_r(NULL, "/", &save)) {
        if (n == max)
            return -1;
        parts[n++] = p;
    }
    return n;
}

static enum MHD_Result route_api(struct hs_web_call *c)
{
    char buf[512], *part[8];
    int n = split_path(c->url + strlen("/api/v1"), buf, sizeof buf, part, 8);
    int get = strcmp(c->method, "GET") == 0, post = strcmp(c->method, "POST") == 0;
    enum MHD_Result res;
    if (n < 1)
        return hs_web_error(c, 404, NULL, "no such resource: %s", c->url);
    if (n == 1 && strcmp(part[0], "session") == 0) {
        if (get)
            return hs_web_session_get(c);
        if (post)
            return hs_web_session_post(c);
        if (strcmp(c->method, "DELETE") == 0)
            return hs_web_session_delete(c);
        return hs_web_error(c, 405, NULL, "%s: GET, POST or DELETE", c->url);
    }
    if (post) {
        if (hs_web_auth_write(c, &res) != 0)
            return res;
        if (n == 3 && strcmp(part[0], "alarms") == 0 && strcmp(part[2], "ack") == 0)
            return hs_web_api_ack(c, part[1]);
        if (n == 4 && strcmp(part[0], "alarms") == 0 &&
            (strcmp(part[3], "shelve") == 0 || strcmp(part[3], "unshelve") == 0))
            return hs_web_api_shelve(c, part[1], part[2], part[3][0] == 'u');
        if (n == 1 && strcmp(part[0], "hydrometer") == 0)
            return hs_web_api_hydrometer(c);
        return hs_web_error(c, 404, NULL, "no such resource for POST: %s", c->url);
    }
    if (!get)
        return hs_web_error(c, 405, NULL, "%s %s: this API takes GET and POST", c->method,
                            c->url);
    if (!hs_web_auth_read(c, &res))
        return res;
    if (n == 1 && strcmp(part[0], "ponds") == 0)
        return hs_web_api_ponds(c);
    if (n == 3 && strcmp(part[0], "ponds") == 0 && strcmp(part[2], "history") == 0)
        return hs_web_api_history(c, part[1]);
    if (n == 3 && strcmp(part[0], "ponds") == 0 && strcmp(part[2], "path") == 0)
        return hs_web_api_path(c, part[1]);
    if (n == 1 && strcmp(part[0], "alarms") == 0)
        return hs_web_api_alarms(c);
    if (n == 1 && strcmp(part[0], "transfers") == 0)
        return hs_web_api_transfers(c);
    if (n == 1 && strcmp(part[0], "hydrometer") == 0)
        return hs_web_api_hydrometer_list(c);
    if (n == 1 && strcmp(part[0], "events") == 0)
        return hs_web_api_events(c);
    return hs_web_error(c, 404, NULL, "no such resource: %s", c->url);
}

static enum MHD_Result on_request(void *cls, struct MHD_Connection *conn, const char *url,
                                  const char *method, const char *version,
                                  const char *upload_data, size_t *upload_data_size,
                                  void **con_cls)
{
    (void)version;
    struct hs_web *w = cls;
    struct hs_web_req *req = *con_cls;
    if (req == NULL) {
        req = calloc(1, sizeof *req);
        if (req == NULL)
            return MHD_NO;
        *con_cls = req;
        return MHD_YES; /* headers only; the body (if any) comes next */
    }
    if (*upload_data_size > 0) {
        size_t add = *upload_data_size;
        *upload_data_size = 0;
        if (req->too_big || req->body_len + add > HS_WEB_BODY_MAX) {
            req->too_big = 1;
            return MHD_YES; /* read and drop the rest; answered 413 below */
        }
        char *grown = realloc(req->body, req->body_len + add + 1);
        if (grown == NULL)
            return MHD_NO;
        memcpy(grown + req->body_len, upload_data, add);
        req->body = grown;
        req->body_len += add;
        req->body[req->body_len] = '\0';
        return MHD_YES;
    }
    struct hs_web_call c = {.web = w, .conn = conn, .req = req, .method = method, .url = url};
    hs_web_auth_identify(&c);
    if (req->command_id > 0)
        return hs_web_command_resume(&c);
    if (req->too_big)
        return hs_web_error(&c, 413, NULL, "request body larger than %d bytes", HS_WEB_BODY_MAX);
    if (strncmp(url, "/api/v1/", 8) == 0 || strcmp(url, "/api/v1") == 0)
        return route_api(&c);
    if (strncmp(url, "/api/", 5) == 0)
        return hs_web_error(&c, 404, NULL, "unknown API version in %s; this gateway speaks v1",
                            url);
    if (strcmp(method, "GET") != 0 && strcmp(method, "HEAD") != 0)
        return hs_web_error(&c, 405, NULL, "%s %s: the page's files take GET", method, url);
    return hs_web_static(&c);
}

static void on_completed(void *cls, struct MHD_Connection *conn, void **con_cls,
                         enum MHD_RequestTerminationCode toe)
{
    (void)cls;
    (void)conn;
    (void)toe;
    struct hs_web_req *req = *con_cls;
    if (req != NULL) {
        free(req->body);
        free(req);
        *con_cls = NULL;
    }
}

static void on_mhd_log(void *cls, const char *fmt, va_list ap)
{
    (void)cls;
    char msg[300];
    vsnprintf(msg, sizeof msg, fmt, ap);
    msg[strcspn(msg, "\n")] = '\0';
    /* a browser closing its live view is ordinary */
    hs_log(strstr(msg, "no longer available") ? HSP_LOG_DEBUG : HSP_LOG_WARNING, "web: %s", msg);
}

/* ---- life ---- */

static char *read_pem(const char *path)
{
    FILE *f = fopen(path, "r");
    if (f == NULL) {
        hs_log(HSP_LOG_ERR, "web: %s: %s", path, strerror(errno));
        return NULL;
    }
    char *buf = malloc(PEM_MAX + 1);
    size_t n = buf ? fread(buf, 1, PEM_MAX, f) : 0;
    int too_long = buf && n == PEM_MAX && fgetc(f) != EOF;
    fclose(f);
    if (buf == NULL || n == 0 || too_long) {
        hs_log(HSP_LOG_ERR, "web: %s: empty, unreadable or larger than %d bytes", path, PEM_MAX);
        free(buf);
        return NULL;
    }
    buf[n] = '\0';
    return buf;
}

static int bind_address(const hs_web_conf *conf, struct sockaddr_storage *ss)
{
    memset(ss, 0, sizeof *ss);
    struct sockaddr_in *a4 = (struct sockaddr_in *)ss;
    struct sockaddr_in6 *a6 = (struct sockaddr_in6 *)ss;
    if (inet_pton(AF_INET, conf->address, &a4->sin_addr) == 1) {
        a4->sin_family = AF_INET;
        a4->sin_port = htons((uint16_t)conf->port);
        return AF_INET;
    }
    if (inet_pton(AF_INET6, conf->address, &a6->sin6_addr) == 1) {
        a6->sin6_family = AF_INET6;
        a6->sin6_port = htons((uint16_t)conf->port);
        return AF_INET6;
    }
    return -1;
}

int hs_web_start(const char *config_path, hs_web **out)
{
    struct hs_web *w = calloc(1, sizeof *w);
    if (w == NULL)
        return -1;
    pthread_mutex_init(&w->lock, NULL);
    pthread_condattr_t ca;
    pthread_condattr_init(&ca);
    pthread_condattr_setclock(&ca, CLOCK_MONOTONIC);
    pthread_cond_init(&w->wake, &ca);
    pthread_condattr_destroy(&ca);
    hs_diag diag;
    if (hs_site_load(config_path, &w->site, &diag) != 0) {
        hs_log(HSP_LOG_ERR, "web: %s", diag.n ? diag.msg[0] : "the configuration failed");
        free(w);
        return -1;
    }
    char msg[600];
    if (w->site.web == NULL) {
        hs_log(HSP_LOG_ERR, "web: %s has no [web] section", config_path);
        goto fail;
    }
    w->conf = *w->site.web;
    if (w->conf.users_file[0] &&
        hs_users_load(w->conf.users_file, 1, &w->users, msg, sizeof msg) != 0) {
        hs_log(HSP_LOG_ERR, "web: %s", msg);
        goto fail;
    }
    if (hs_brine_models_build(&w->site, &w->models) != 0)
        w->models = NULL; /* the path view says it has no path */
    hs_store_options opt;
    hs_store_options_default(&opt);
    opt.busy_timeout_ms = 1000; /* a page may wait a second, never the daemon */
    opt.batch_rows = 1;
    w->store = hs_store_open(w->site.site.database, HS_STORE_READ, &opt, msg, sizeof msg);
    if (w->store == NULL) {
        hs_log(HSP_LOG_ERR, "web: %s", msg);
        goto fail;
    }
    w->path_text = calloc(w->site.n_feeds + 1, sizeof *w->path_text);
    if (w->path_text == NULL)
        goto fail;
    struct sockaddr_storage ss;
    if (bind_address(&w->conf, &ss) < 0) {
        hs_log(HSP_LOG_ERR, "web: listen %s: not an address", w->conf.listen);
        goto fail;
    }
    unsigned flags = MHD_USE_INTERNAL_POLLING_THREAD | MHD_USE_EPOLL | MHD_ALLOW_SUSPEND_RESUME |
                     MHD_USE_ERROR_LOG;
    if (ss.ss_family == AF_INET6)
        flags |= MHD_USE_IPv6;
    if (w->conf.tls_cert[0]) {
        w->tls_cert_pem = read_pem(w->conf.tls_cert);
        w->tls_key_pem = read_pem(w->conf.tls_key);
        if (w->tls_cert_pem == NULL || w->tls_key_pem == NULL)
            goto fail;
        flags |= MHD_USE_TLS;
    }
    if (pthread_create(&w->pulse, NULL, pulse_main, w) != 0)
        goto fail;
    w->pulse_running = 1;
    struct MHD_OptionItem tls_opts[] = {
        {MHD_OPTION_HTTPS_MEM_CERT, 0, w->tls_cert_pem},
        {MHD_OPTION_HTTPS_MEM_KEY, 0, w->tls_key_pem},
        {MHD_OPTION_END, 0, NULL},
    };
    w->daemon = MHD_start_daemon(
        flags, (uint16_t)w->conf.port, NULL, NULL, on_request, w,
        MHD_OPTION_EXTERNAL_LOGGER, on_mhd_log, w,
        MHD_OPTION_SOCK_ADDR, (struct sockaddr *)&ss,
        MHD_OPTION_CONNECTION_LIMIT, (unsigned)w->conf.max_clients,
        MHD_OPTION_PER_IP_CONNECTION_LIMIT, (unsigned)PER_IP_LIMIT,
        MHD_OPTION_CONNECTION_TIMEOUT, (unsigned)CONNECTION_TIMEOUT_S,
        MHD_OPTION_CONNECTION_MEMORY_LIMIT, (size_t)CONNECTION_MEMORY,
        MHD_OPTION_NOTIFY_COMPLETED, on_completed, w,
        MHD_OPTION_ARRAY, w->tls_cert_pem ? tls_opts : tls_opts + 2,
        MHD_OPTION_END);
    if (w->daemon == NULL) {
        hs_log(HSP_LOG_ERR, "web: cannot listen on %s (in use, or not this machine's address?)",
               w->conf.listen);
        goto fail;
    }
    hs_log(HSP_LOG_NOTICE, "web: the page is at %s://%s/ (%zu logins%s)",
           w->tls_cert_pem ? "https" : "http", w->conf.listen, w->users.n,
           w->conf.public_view ? ", views public" : "");
    *out = w;
    return 0;
fail:
    hs_web_stop(w);
    return -1;
}

void hs_web_notify(hs_web *web)
{
    if (web != NULL)
        atomic_fetch_add(&web->seq, 1);
}

int hs_web_take_command_hint(hs_web *web)
{
    return web != NULL && atomic_exchange(&web->command_hint, 0) != 0;
}

void hs_web_stop(hs_web *w)
{
    if (w == NULL)
        return;
    MHD_socket listener = MHD_INVALID_SOCKET;
    if (w->daemon != NULL)
        listener = MHD_quiesce_daemon(w->daemon); /* no new connections; the socket is ours */
    if (listener != MHD_INVALID_SOCKET)
        close(listener); /* so a client of a stopping server is refused, not left waiting */
    pthread_mutex_lock(&w->lock);
    w->stopping = 1;
    pthread_cond_signal(&w->wake);
    pthread_mutex_unlock(&w->lock);
    if (w->pulse_running)
        pthread_join(w->pulse, NULL); /* it resumed every suspended connection */
    if (w->daemon != NULL)
        MHD_stop_daemon(w->daemon);
    hs_web_api_free(w);
    hs_store_close(w->store);
    hs_brine_models_free(w->models);
    hs_users_free(&w->users);
    free(w->tls_cert_pem);
    free(w->tls_key_pem);
    hs_site_free(&w->site);
    pthread_cond_destroy(&w->wake);
    pthread_mutex_destroy(&w->lock);
    free(w);
}
