/* Bus worker: one thread per field bus owns that bus's libmodbus context and
 * reads its points on their intervals, in the fewest transactions
 * (hp_plan.h), into the sample queue. A dead or hung device costs only its
 * own bus time: buses never wait for each other.
 *
 * Failure handling (libmodbus 3.1.6, see protocol/README.md): error recovery stays
 * NONE; a read is tried 1 + retries times; after a timeout the line is
 * flushed; a broken link (reset, refused, bad descriptor) or repeated
 * timeouts close the context, and reconnects back off exponentially from
 * backoff_min to backoff_max with jitter. A Modbus exception is not retried
 * (the device answered): its points get comm-fail with the exception code.
 * Points not read good for stale_after get one stale sample carrying the
 * last good value. The protocol layer never prints: codes travel in samples.
 *
 * Error convention: hp_bus_start returns NULL on failure with errno set. */
#ifndef HP_BUS_H
#define HP_BUS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "hp_bus_conf.h"
#include "hp_outcmd.h"
#include "hp_point.h"
#include "hp_queue.h"

typedef struct hp_bus hp_bus;

typedef struct {
    uint64_t cycles;          /* completed poll cycles */
    uint64_t transactions;    /* read requests sent (including retries) */
    uint64_t failures;        /* reads that ended comm-fail */
    uint64_t exceptions;      /* replies that were Modbus exceptions */
    uint64_t reconnects;      /* connection attempts after the first */
    int64_t last_cycle_ms;    /* duration of the last cycle */
    int64_t max_cycle_ms;
    int64_t total_cycle_ms;   /* sum over cycles, for the mean */
    int last_errno;           /* errno of the last failure, 0 if none */
    uint64_t writes;          /* output writes carried out */
    uint64_t write_failures;  /* output writes the device refused or never answered */
} hp_bus_stats;

/* Starts the worker. points (n, copied) are read into queue (borrowed; it
 * must outlive the bus); each sample carries bus_id. once: read every point
 * once, then end (hp_bus_join). */
hp_bus *hp_bus_start(const hp_bus_conf *conf, const hp_point *points, size_t n,
                     uint32_t bus_id, hp_queue *queue, bool once);
/* Waits for a once-bus to finish (or stops a running one), then frees it. */
void hp_bus_join(hp_bus *bus);
/* Asks the worker to stop, waits for it and frees it. */
void hp_bus_stop(hp_bus *bus);
void hp_bus_get_stats(hp_bus *bus, hp_bus_stats *out);

/* Output commands (hp_outcmd.h) go ahead of queued reads: the worker wakes
 * for them and carries them out before each read block, so a command waits
 * at most one read (1 + retries response timeouts), never a whole poll
 * cycle. A newer command to the same output replaces one still waiting; one
 * still waiting after HP_OUTCMD_MAX_AGE_MS is dropped, never carried out
 * late. Commands waiting when the bus stops are carried out before it
 * closes. Returns 0 (*seq numbers the request), or -1 with errno ENOBUFS
 * when HP_OUTCMD_SLOTS distinct outputs are in use. Thread-safe. */
int hp_bus_command(hp_bus *bus, uint8_t unit_id, bool coil, uint16_t address,
                   hp_outcmd_kind kind, uint16_t value, uint32_t *seq);
/* The latest result for the output (0), or -1 (ENOENT) when none yet. */
int hp_bus_command_result(hp_bus *bus, uint8_t unit_id, bool coil, uint16_t address,
                          hp_outcmd_result *out);
/* A write without read-back (hp_bus_command with HP_OUTCMD_WRITE). */
int hp_bus_write(hp_bus *bus, uint8_t unit_id, bool coil, uint16_t address, uint16_t value);

#endif
