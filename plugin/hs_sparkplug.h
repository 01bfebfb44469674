/* The Sparkplug B edge node (Eclipse Sparkplug 3.0.0): one thread with its
 * own MQTT connection to the [mqtt] broker. Each pond is a device; the
 * metrics are in hs_spb_metrics.h.
 *
 * Why a second connection: the node's death certificate (NDEATH, carrying
 * the bdSeq of its NBIRTH) must be the last will of the MQTT session that
 * published the birth, and a connection has one will. The gateway's own
 * link already uses its will for the retained "online": false, and its
 * clean-session and reconnect policy serve the outbox. So the edge node
 * connects as <client_id>-spb with the NDEATH as its will, and makes a new
 * connection (bdSeq + 1, a new will) whenever one is lost, instead of
 * letting the library reconnect with a stale will.
 *
 * Session rules followed:
 *   - NBIRTH (seq 0) with bdSeq and Node Control/Rebirth, then a DBIRTH for
 *     every pond whose data is not bad; seq counts 0..255 over every
 *     message after it and wraps;
 *   - with primary_host_id set, nothing is born until spBv1.0/STATE/HOST
 *     says online (JSON, retained; an older timestamp is ignored); when the
 *     host goes offline the node publishes NDEATH, disconnects and waits
 *     again on a new connection;
 *   - DDATA by exception: only metrics that moved past their deadband;
 *     DDEATH when a pond's data goes bad, DBIRTH when it comes back;
 *   - an NCMD whose only metric is Node Control/Rebirth = true gives fresh
 *     births (same bdSeq); a DCMD with Device Control/Rebirth = true gives
 *     that pond's DBIRTH; every other command is refused and logged.
 *     Nothing inbound reaches a pump or a bus.
 *   - a clean stop publishes NDEATH before disconnecting.
 *
 * Threads: hs_sparkplug_pond/transfer copy under a mutex and return; the
 * node's thread does all MQTT work. Ownership: the node owns its copies of
 * every name and of the last values.
 * Error convention: NULL with a reason in err. */
#ifndef HS_SPARKPLUG_H
#define HS_SPARKPLUG_H

#include <stddef.h>
#include <stdint.h>

#include "hs_scada_map.h"
#include "hs_site.h"

typedef struct hs_sparkplug hs_sparkplug;

/* password: the [mqtt] password (read by the caller) or NULL. bd_seq: the
 * first session's bdSeq (what the last stop returned across a reload, and
 * what the history store kept across a restart, so a host never sees a
 * death certificate of an old session match a new birth). */
hs_sparkplug *hs_sparkplug_start(const hs_site *site, const char *password, uint64_t bd_seq,
                                 char *err, size_t errlen);
void hs_sparkplug_pond(hs_sparkplug *n, size_t pond, const hs_scada_pond *p);
void hs_sparkplug_transfer(hs_sparkplug *n, size_t transfer, const hs_scada_transfer *t);
/* The bdSeq the next session will use (the current one's plus one, mod
 * 256): what a new process must start from should this one die now. */
uint64_t hs_sparkplug_next_bd_seq(hs_sparkplug *n);
/* NDEATH, disconnect, join, free; returns the next bdSeq. NULL is allowed. */
uint64_t hs_sparkplug_stop(hs_sparkplug *n);

#endif
