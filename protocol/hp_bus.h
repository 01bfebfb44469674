/* Bus worker: one thread per field bus owns that bus's libmodbus context and
 * reads its points on their intervals, in the fewest transactions
 * (hp_plan.h), into the sample queue. A dead or hung device costs only its
 * own bus time: buses never wait for each other.
 *
 * Failure handling (libmodbus 3.1.6, see protocol/README.md): error
 * recovery stays NONE; a read is tried 1 + retries times; after a timeout
 * the line is flushed. A Modbus exception is not retried (the device
 * answered): its points get comm-fail with the exception code. Points not read good for stale_after get one
 * stale sample carrying the last good value. The protocol layer never
 * prints: codes travel in samples, device health in the stats.
 *
 * Health is kept per device (unit id), since an RS-485 line or a TCP serial
 * gateway carries several:
 * - a read that times out (after its retries) leaves its device's other
 *   reads of the cycle unsent: their points get comm-fail with errno
 *   EHOSTDOWN ("not asked"); the other devices are read as usual;
 * - after 3 timed-out attempts in a row a device is down: it is no longer
 *   asked every cycle, only probed (one attempt, its first read) every
 *   probe_interval; a probe that answers brings it up and its points are
 *   read in that same cycle. A silent device thus costs the line at most
 *   (1 + retries) response timeouts per cycle until it is down, then one
 *   response timeout per probe_interval;
 * - the link itself is a bus matter: a broken connection (reset, refused,
 *   bad descriptor, EIO), or every device of the bus down at once (a dead
 *   serial adapter or a half-open TCP connection looks so), closes the
 *   context, and reconnects back off exponentially from backoff_min to
 *   backoff_max with jitter. The devices keep their state across it.
 * - a TCP reply whose unit id is not the one asked is refused (EMBBADSLAVE)
 *   like a reply of the wrong length (libmodbus checks RTU addresses only).
 * hp_bus_stats says which devices are down (hp_bus_unit_down).
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
    uint64_t probes;          /* reads sent to a device that was down */
    uint64_t devices_down;    /* devices (unit ids) down now */
    uint64_t down_units[4];   /* bit u set: unit id u is down */
    uint64_t slow_cycles;     /* cycles without a timeout that took longer than the
                               * bus's shortest poll interval: the line cannot keep it */
    int64_t min_interval_ms;  /* the bus's shortest point interval */
} hp_bus_stats;

/* True when unit id `unit` is down (see the failure policy above). */
static inline bool hp_bus_unit_down(const hp_bus_stats *st, uint8_t unit)
{
    return (st->down_units[unit >> 6] >> (unit & 63)) & 1u;
}

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
 * cycle; on a broken link a waiting command brings the reconnect forward to
 * backoff_min after the last attempt. A newer command to the same output
 * replaces one still waiting; one
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
