/* Live updates as server-sent events (text/event-stream): an "update"
 * event whenever the daemon has stored new pond states, a comment line
 * every HS_WEB_KEEPALIVE_MS otherwise. Between events the connection is
 * suspended (it costs no polling); the pulse thread resumes it. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_web_private.h"

static ssize_t stream_read(void *cls, uint64_t pos, char *buf, size_t max)
{
    (void)pos;
    struct hs_web_stream *s = cls;
    struct hs_web *w = s->web;
    uint64_t seq = atomic_load(&w->seq);
    int64_t now = hs_web_mono_ms();
    int n = 0;
    if (max < 128)
        return 0;
    pthread_mutex_lock(&w->lock);
    int stopping = w->stopping;
    pthread_mutex_unlock(&w->lock);
    if (stopping)
        return MHD_CONTENT_READER_END_OF_STREAM;
    if (!s->started) {
        /* the browser reconnects 3 s after a lost connection */
        n = snprintf(buf, max, "retry: 3000\n\n");
        s->started = 1;
    } else if (s->sent_seq != seq) {
        n = snprintf(buf, max, "event: update\ndata: {\"seq\":%llu,\"time_ms\":%lld}\n\n",
                     (unsigned long long)seq, (long long)hs_web_wall_ms());
        s->sent_seq = seq;
    } else if (now - s->last_write_ms >= HS_WEB_KEEPALIVE_MS) {
        n = snprintf(buf, max, ": still here\n\n");
    }
    if (n > 0) {
        s->last_write_ms = now;
        return n;
    }
    pthread_mutex_lock(&w->lock);
    if (w->stopping) {
        pthread_mutex_unlock(&w->lock);
        return MHD_CONTENT_READER_END_OF_STREAM;
    }
    s->waiter.conn = s->conn;
    s->waiter.stream = 1;
    s->waiter.next = w->waiters;
    w->waiters = &s->waiter;
    MHD_suspend_connection(s->conn);
    pthread_mutex_unlock(&w->lock);
    return 0;
}

static void stream_free(void *cls)
{
    struct hs_web_stream *s = cls;
    pthread_mutex_lock(&s->web->lock);
    s->web->streams--;
    pthread_mutex_unlock(&s->web->lock);
    free(s);
}

enum MHD_Result hs_web_api_events(struct hs_web_call *c)
{
    struct hs_web *w = c->web;
    pthread_mutex_lock(&w->lock);
    int full = w->streams >= HS_WEB_STREAMS_MAX;
    if (!full)
        w->streams++;
    pthread_mutex_unlock(&w->lock);
    if (full)
        return hs_web_error(c, 503, NULL, "too many live views open (%d)", HS_WEB_STREAMS_MAX);
    struct hs_web_stream *s = calloc(1, sizeof *s);
    struct MHD_Response *r =
        s ? MHD_create_response_from_callback(MHD_SIZE_UNKNOWN, 512, stream_read, s, stream_free)
          : NULL;
    if (r == NULL) {
        if (s != NULL)
            free(s);
        pthread_mutex_lock(&w->lock);
        w->streams--;
        pthread_mutex_unlock(&w->lock);
        return MHD_NO;
    }
    s->web = w;
    s->conn = c->conn;
    s->sent_seq = atomic_load(&w->seq);
    s->last_write_ms = hs_web_mono_ms();
    MHD_add_response_header(r, "Content-Type", "text/event-stream");
    MHD_add_response_header(r, "Cache-Control", "no-store");
    MHD_add_response_header(r, "X-Content-Type-Options", "nosniff");
    enum MHD_Result ret = MHD_queue_response(c->conn, 200, r);
    MHD_destroy_response(r);
    return ret;
}
