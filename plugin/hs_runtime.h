/* The running job of one site: acquisition -> brine state -> store ->
 * alarms -> transfers -> MQTT and the host's emit. hs_plugin.c drives it
 * through the plugin ABI; nothing else needs to.
 *
 * Threads: one runtime belongs to the thread that calls these functions;
 * it starts one thread per field bus, which it stops in hs_runtime_close().
 * Error convention: functions return an hsp_result (HSP_OK = 0); the
 * reasons have been logged with hs_log(). */
#ifndef HS_RUNTIME_H
#define HS_RUNTIME_H

#include <stddef.h>
#include <stdint.h>

#include "halostage_plugin.h"

typedef struct hs_runtime hs_runtime;

/* Where values for the host go; emit may be NULL (nobody listens). */
struct hs_emit_sink {
    int (*emit)(void *data, const struct hsp_value *value);
    void *data;
};

/* Loads and validates config_path, opens the store, connects MQTT, starts
 * the bus threads. On success the caller owns *out. */
int hs_runtime_open(const char *config_path, const struct hs_emit_sink *sink, hs_runtime **out);
/* Does the work that is due; *next_ms says when to call again. */
int hs_runtime_tick(hs_runtime *rt, uint32_t *next_ms);
/* Validates config_path first; on error the running configuration stays. */
int hs_runtime_reload(hs_runtime *rt, const char *config_path);
/* One line: ponds, worst alarm, transfers running, outbox depth. */
void hs_runtime_status(hs_runtime *rt, char *buf, size_t len);
/* Pumps to their safe state, buses stopped, store and outbox flushed,
 * gateway offline published; frees rt. NULL is allowed. */
void hs_runtime_close(hs_runtime *rt);

#endif
