/* What the Sparkplug B edge node says about a site: the metrics of each
 * pond (a device) and of the node itself, for births and for data by
 * exception. Pure: no I/O, no allocation; strings point into the constant
 * tables (hs_scada_map.h) or into the caller's names.
 *
 * Metric names (each pond device, in DBIRTH with datatype, unit property
 * "unit" and alias; DDATA by alias only):
 *   the numbers of hs_scada_pond_points by their name (Float), and
 *   stage, next_stage, quality, level_quality, method (String),
 *   alarm_bits (UInt16, bit = hs_rule_kind).
 * Node (NBIRTH/NDATA): bdSeq (UInt64), Node Control/Rebirth (Boolean),
 *   transfer/<name>/advice (String), transfer/<name>/pump_on (Boolean),
 *   transfer/<name>/reason_bits (UInt32).
 * Aliases are unique within the edge node: pond i, number k has
 * 1000 (i + 1) + k, its codes 1000 (i + 1) + 50 + c; transfer j has
 * 100 + 4 j + m. */
#ifndef HS_SPB_METRICS_H
#define HS_SPB_METRICS_H

#include <stddef.h>
#include <stdint.h>

#include "hp_spb.h"
#include "hs_scada_map.h"

#define HS_SPB_POND_METRICS_MAX 24
#define HS_SPB_TRANSFER_METRICS 3
#define HS_SPB_NAME_MAX 96

/* Names of one transfer's metrics, built once by the caller. */
typedef struct {
    char name[HS_SPB_TRANSFER_METRICS][HS_SPB_NAME_MAX];
} hs_spb_transfer_names;

void hs_spb_transfer_names_init(hs_spb_transfer_names *t, const char *transfer);

/* 1 when the pond's data is bad (no document, or quality bad): DDEATH. */
int hs_spb_pond_dead(const hs_scada_pond *p);

/* Every metric of pond i for its DBIRTH. Returns the count. */
size_t hs_spb_pond_birth(size_t i, const hs_scada_pond *p, hp_spb_metric *out);
/* The metrics of pond i that changed beyond their deadband since sent
 * (what was last published), by alias, for DDATA; sent is brought up to
 * date for those. Returns the count (0: nothing to send). */
size_t hs_spb_pond_changes(size_t i, hs_scada_pond *sent, const hs_scada_pond *now,
                           hp_spb_metric *out);

/* bdSeq and Node Control/Rebirth for NBIRTH (2 metrics), or bdSeq alone
 * for the NDEATH will (1 metric). */
size_t hs_spb_node_birth(uint64_t bd_seq, hp_spb_metric *out);
size_t hs_spb_node_death(uint64_t bd_seq, hp_spb_metric *out);
/* Transfer j's metrics: all of them (birth, names given) or the changed
 * ones by alias (sent updated). */
size_t hs_spb_transfer_birth(size_t j, const hs_spb_transfer_names *names,
                             const hs_scada_transfer *t, hp_spb_metric *out);
size_t hs_spb_transfer_changes(size_t j, hs_scada_transfer *sent, const hs_scada_transfer *now,
                               hp_spb_metric *out);

#endif
