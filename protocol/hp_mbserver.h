/* A read-only Modbus TCP server in its own thread. It answers Read Holding
 * Registers (FC 3) and Read Input Registers (FC 4) from a caller's read
 * function, and refuses every other function, writes included, with
 * exception 01 (Illegal Function). It has no write path at all: the caller
 * gives it only a read function.
 *
 * Framing is our own (MBAP header, Modbus Messaging on TCP/IP
 * Implementation Guide v1.0b §3.1.3) rather than libmodbus's server side:
 * modbus_receive() waits for the rest of a half-sent frame, so one slow
 * client would hold every other one, and modbus_reply() would carry out
 * writes on a mapping. Here each connection has its own buffer in a poll()
 * loop, so a hung or slow client costs only its own slot:
 *   - at most max_clients connections; the next one is accepted and closed;
 *   - a connection idle (no complete request) for idle_timeout_ms is closed;
 *   - a client that does not read its replies (send would block) is closed;
 *   - a malformed header (protocol id not 0, length out of 2..254) closes
 *     the connection, as there is no telling where the next frame starts.
 * Exceptions (Modbus Application Protocol v1.1b §7): 01 for any function
 * but 3 and 4 (whatever the unit id), 02 when the range leaves the map, 03 for a quantity outside
 * 1..125 (§6.3) or a malformed request, 0B for a unit id we are not (when
 * unit_id is not 0).
 *
 * Threads: the read function runs on the server's thread; it must be
 * thread-safe against whoever updates the data behind it.
 * Error convention: 0 / pointer on success, -1 / NULL with a reason in err. */
#ifndef HP_MBSERVER_H
#define HP_MBSERVER_H

#include <stddef.h>
#include <stdint.h>

#include "hp_netacl.h"

#define HP_MB_MAX_READ 125 /* registers per read, Modbus Application Protocol v1.1b §6.3 */

typedef struct hp_mbserver hp_mbserver;

/* Fills regs[0..n-1] with the registers starting at addr. Returns 0, or a
 * Modbus exception code (2: the range leaves the map). */
typedef int (*hp_mb_read_fn)(void *ctx, uint16_t addr, uint16_t n, uint16_t *regs);

typedef struct {
    const char *listen;        /* "ADDRESS:PORT" (hp_listen_parse) */
    uint8_t unit_id;           /* answer only this unit; 0: any */
    unsigned max_clients;      /* 0: 8 */
    int idle_timeout_ms;       /* 0: 60000 */
    const hp_acl *allow;       /* NULL or empty: every client */
    hp_mb_read_fn read;
    void *ctx;
} hp_mbserver_options;

typedef struct {
    uint64_t requests;         /* frames answered, exceptions included */
    uint64_t exceptions;
    uint64_t refused;          /* connections closed at accept: not allowed or full */
    uint64_t dropped;          /* connections closed: idle, malformed, not reading */
    unsigned clients;          /* open now */
} hp_mbserver_stats;

/* Binds, listens and starts the thread. The options are copied (allow
 * included). NULL with a reason in err when the address cannot be bound. */
hp_mbserver *hp_mbserver_start(const hp_mbserver_options *opt, char *err, size_t errlen);
/* Stops the thread, closes every socket, frees. NULL is allowed. */
void hp_mbserver_stop(hp_mbserver *s);
void hp_mbserver_stats_get(hp_mbserver *s, hp_mbserver_stats *out);
/* The port it listens on (useful with port 0 in tests). */
int hp_mbserver_port(const hp_mbserver *s);

#endif
