/* The web server's insides, shared by plugin/hs_web*.c only.
 *
 * Ownership: struct hs_web owns everything it points to. A struct hs_web_req
 * belongs to one connection (freed by the request-completed callback); a
 * struct hs_web_stream belongs to its live-update response (freed by the
 * response's free callback). Everything except the waiter list, the
 * counters marked atomic and `stopping` is used by the polling thread only;
 * the waiter list and `stopping` are guarded by `lock`. */
#ifndef HS_WEB_PRIVATE_H
#define HS_WEB_PRIVATE_H

#include <microhttpd.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdint.h>

#include <jansson.h>

#include "hs_brine_eval.h"
#include "hs_conf_web.h"
#include "hs_site.h"
#include "hs_store.h"
#include "hs_web.h"
#include "hs_web_users.h"

#define HS_WEB_BODY_MAX 8192       /* larger request bodies are refused (413) */
#define HS_WEB_SESSIONS 128        /* logins held at once; the oldest gives way */
#define HS_WEB_THROTTLE 256        /* (client, name) pairs with failed logins */
#define HS_WEB_STREAMS_MAX 32      /* live-update connections at once */
#define HS_WEB_KEEPALIVE_MS 15000  /* a comment line on idle live streams */
#define HS_WEB_COMMAND_WAIT_MS 8000 /* how long a write waits for the daemon */
#define HS_WEB_PULSE_MS 50
#define HS_WEB_TOKEN_HEX 64        /* 32 random bytes */

typedef enum { HS_ACCESS_NONE, HS_ACCESS_VIEWER, HS_ACCESS_OPERATOR } hs_web_access;

struct hs_web_session {
    char token[HS_WEB_TOKEN_HEX + 1];  /* the cookie; "" = free slot */
    char csrf[HS_WEB_TOKEN_HEX + 1];   /* must come back in X-CSRF-Token on writes */
    char user[HS_USER_NAME_MAX];
    hs_user_role role;
    int64_t last_ms;                   /* monotonic time of the last request */
};

struct hs_web_throttle {
    char key[96];                      /* client address '|' user name */
    unsigned failures;
    int64_t until_ms;                  /* monotonic; no attempt before this */
};

/* A connection suspended until the pulse thread resumes it. */
struct hs_web_waiter {
    struct MHD_Connection *conn;
    int stream;                        /* 1 live updates, 0 waiting for a command reply */
    struct hs_web_waiter *next;
};

struct hs_web_stream {
    struct hs_web *web;
    struct MHD_Connection *conn;
    uint64_t sent_seq;
    int64_t last_write_ms;
    int started;
    struct hs_web_waiter waiter;       /* its node in the waiter list */
};

struct hs_web_req {
    char *body;                        /* collected POST body, NUL-terminated */
    size_t body_len;
    int too_big;
    int64_t command_id;                /* > 0: waiting for the daemon's reply */
    int64_t command_deadline_ms;
    struct hs_web_waiter waiter;
};

struct hs_web {
    hs_site site;
    hs_web_conf conf;                  /* copy of site.web */
    hs_brine_models *models;           /* for the evaporation paths */
    hs_users users;
    hs_store *store;                   /* own connection, polling thread only */
    struct MHD_Daemon *daemon;
    char *tls_cert_pem, *tls_key_pem;

    struct hs_web_session sessions[HS_WEB_SESSIONS];
    struct hs_web_throttle throttle[HS_WEB_THROTTLE];

    pthread_mutex_t lock;
    pthread_cond_t wake;
    pthread_t pulse;
    int pulse_running;
    int stopping;
    struct hs_web_waiter *waiters;
    unsigned streams;

    atomic_uint_fast64_t seq;          /* bumped by hs_web_notify */
    atomic_int command_hint;

    char *ponds_text;                  /* cached /api/v1/ponds document */
    size_t ponds_len;
    uint64_t ponds_seq;
    int64_t ponds_ms;
    char **path_text;                  /* cached evaporation paths, per feed + 1 */
};

/* What one request is, as the dispatcher found it. */
struct hs_web_call {
    struct hs_web *web;
    struct MHD_Connection *conn;
    struct hs_web_req *req;
    const char *method;
    const char *url;
    struct hs_web_session *session;    /* NULL when not logged in */
    hs_web_access access;
};

/* hs_web.c: responses */
enum MHD_Result hs_web_send(struct hs_web_call *c, unsigned status, const char *type,
                            const void *data, size_t len, int copy);
/* Sends o (reference taken) as JSON. */
enum MHD_Result hs_web_json(struct hs_web_call *c, unsigned status, json_t *o);
/* {"error": reason[, "field": field]} */
enum MHD_Result hs_web_error(struct hs_web_call *c, unsigned status, const char *field,
                             const char *fmt, ...) __attribute__((format(printf, 4, 5)));
/* Suspends c's connection until the pulse thread wakes it: 0, or -1 when
 * the server is stopping (then answer at once). */
int hs_web_wait(struct hs_web_call *c);
int64_t hs_web_mono_ms(void);
int64_t hs_web_wall_ms(void);

/* hs_web_auth.c */
void hs_web_auth_identify(struct hs_web_call *c);
/* 0 when c may write (operator, CSRF token, same origin), else sends the
 * refusal and returns -1 with *result set. */
int hs_web_auth_write(struct hs_web_call *c, enum MHD_Result *result);
/* 1 when c may read, else sends 401 and sets *result. */
int hs_web_auth_read(struct hs_web_call *c, enum MHD_Result *result);
enum MHD_Result hs_web_session_get(struct hs_web_call *c);
enum MHD_Result hs_web_session_post(struct hs_web_call *c);
enum MHD_Result hs_web_session_delete(struct hs_web_call *c);
/* The request's body as a JSON object, or NULL after sending 400/413/415. */
json_t *hs_web_body_json(struct hs_web_call *c, enum MHD_Result *result);

/* hs_web_api.c: reads */
enum MHD_Result hs_web_api_ponds(struct hs_web_call *c);
enum MHD_Result hs_web_api_history(struct hs_web_call *c, const char *pond);
enum MHD_Result hs_web_api_path(struct hs_web_call *c, const char *pond);
enum MHD_Result hs_web_api_alarms(struct hs_web_call *c);
enum MHD_Result hs_web_api_transfers(struct hs_web_call *c);
enum MHD_Result hs_web_api_hydrometer_list(struct hs_web_call *c);
void hs_web_api_free(struct hs_web *w);

/* hs_web_write.c: the operator's writes */
enum MHD_Result hs_web_api_ack(struct hs_web_call *c, const char *event_id);
enum MHD_Result hs_web_api_shelve(struct hs_web_call *c, const char *pond, const char *rule,
                                  int unshelve);
enum MHD_Result hs_web_api_hydrometer(struct hs_web_call *c);
/* A resumed request that waits for a queued command's reply. */
enum MHD_Result hs_web_command_resume(struct hs_web_call *c);

/* hs_web_stream.c: live updates (server-sent events) */
enum MHD_Result hs_web_api_events(struct hs_web_call *c);

/* hs_web_static.c: the page's files, embedded at build time */
enum MHD_Result hs_web_static(struct hs_web_call *c);

#endif
