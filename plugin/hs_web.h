/* The operators' page and its JSON API (/api/v1/...), served by the daemon
 * when the site has a [web] section (hs_conf_web.h).
 *
 * Threads: libmicrohttpd runs the server in its own polling thread (epoll),
 * plus one small "pulse" thread that wakes suspended connections (live
 * updates, answers to queued commands). The web side never touches the
 * runtime's memory: it loads its own copy of the site, reads the history
 * through its own SQLite connection (WAL, short busy timeout) and queues
 * acknowledgements and shelves in the store's command queue exactly as
 * `halostage ack` does, which the daemon applies with the same checks and
 * journal. So a slow browser can never stall polling or the store, and
 * there is no path from the page to a pump or a register.
 *
 * The runtime calls only these four functions, from its own thread.
 * Error convention: hs_web_start returns 0, or -1 after logging why. */
#ifndef HS_WEB_H
#define HS_WEB_H

typedef struct hs_web hs_web;

/* Starts serving for the configuration at config_path (which must have a
 * [web] section). On success the caller owns *out. */
int hs_web_start(const char *config_path, hs_web **out);
/* New pond states are in the store: live views update. Never blocks. */
void hs_web_notify(hs_web *web);
/* 1 (once) when the page has queued a command since the last call, so the
 * daemon should take its command queue now rather than at its next turn. */
int hs_web_take_command_hint(hs_web *web);
/* Ends every connection and the threads; frees web. NULL is allowed. */
void hs_web_stop(hs_web *web);

#endif
