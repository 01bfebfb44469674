/* Output commands of one field bus: the requests the bus worker carries out
 * AHEAD of its queued reads (between any two read transactions), so a pump
 * command or a PLC heartbeat never waits behind a poll cycle full of read
 * timeouts. The bus worker owns the execution; any thread may post.
 *
 * One slot per output (unit id, coil or register, address): a newer request
 * replaces one still waiting (only the latest decision matters). A request
 * still waiting after HP_OUTCMD_MAX_AGE_MS is dropped, never carried out
 * late: its poster sees no result for its sequence number and decides again.
 *
 * Kinds:
 *   HP_OUTCMD_WRITE_VERIFY  write (Modbus Application Protocol v1.1b §6.5
 *                           Write Single Coil FC 05, §6.6 Write Single
 *                           Register FC 06), then read the same output back
 *                           (§6.1 Read Coils FC 01, §6.3 Read Holding
 *                           Registers FC 03) in the same turn;
 *   HP_OUTCMD_READ          read back only (what does the device say now?);
 *   HP_OUTCMD_WRITE         write only (the heartbeat: the echo in the reply
 *                           is its confirmation).
 * A write that timed out may still be applied later by a slow device, so the
 * read-back is tried even after a failed write: the result carries both.
 *
 * Results: the latest per output, with the sequence number of the request it
 * answers. Never prints (the protocol layer reports in results).
 * Error convention: 0 success, -1 with errno (ENOBUFS: table full). */
#ifndef HP_OUTCMD_H
#define HP_OUTCMD_H

#include <stdbool.h>
#include <stdint.h>

#include <modbus.h>

#define HP_OUTCMD_SLOTS 32
#define HP_OUTCMD_MAX_AGE_MS 10000

typedef enum { HP_OUTCMD_WRITE_VERIFY, HP_OUTCMD_READ, HP_OUTCMD_WRITE } hp_outcmd_kind;

typedef struct {
    uint32_t seq;        /* the request this answers; 0: none yet */
    int write_errno;     /* 0 written (or not asked), else errno (ETIMEDOUT, EMBXSFAIL, ...) */
    int read_errno;      /* 0 read back (or not asked), else errno */
    bool read;           /* a read-back value is in value */
    uint16_t value;      /* coil 0/1, or the register */
    int64_t done_ms;     /* monotonic time the turn ended */
    int64_t took_ms;     /* posted to done */
} hp_outcmd_result;

typedef struct hp_outcmd hp_outcmd;

hp_outcmd *hp_outcmd_new(void);
void hp_outcmd_free(hp_outcmd *q);

/* Poster: asks for one request; *seq (not NULL) receives its number. */
int hp_outcmd_post(hp_outcmd *q, uint8_t unit_id, bool coil, uint16_t address,
                   hp_outcmd_kind kind, uint16_t value, uint32_t *seq);
/* Poster: the latest result for the output; -1 (ENOENT) when none yet. */
int hp_outcmd_result_get(hp_outcmd *q, uint8_t unit_id, bool coil, uint16_t address,
                         hp_outcmd_result *out);

/* Worker: true when a request waits. */
bool hp_outcmd_pending(hp_outcmd *q);
/* Worker: carries out every waiting request on ctx, oldest first. Returns 0,
 * or the errno of a broken link (the rest stay waiting for the reconnect). */
int hp_outcmd_run(hp_outcmd *q, modbus_t *ctx, uint64_t *transactions, uint64_t *failures);

#endif
