/* Read planner: the fewest Modbus read transactions that cover a set of
 * points. Points of the same unit and register table are read together when
 * the block stays within the per-read limit (at most 125 registers, Modbus
 * Application Protocol v1.1b §6.3 Read Holding Registers and §6.4 Read Input
 * Registers) and the unused registers between neighbours are at most max_gap.
 *
 * Greedy left-to-right packing over the points sorted by address is optimal
 * here: both limits only forbid a block from growing, so extending the
 * current block as far as allowed never costs a read later (tests compare it
 * with an exhaustive dynamic programme). Allocation-free: the caller gives
 * the arrays. Error convention: returns the number of reads, or -1 on a bad
 * argument (a point wider than max_registers, max_registers out of 1..125). */
#ifndef HP_PLAN_H
#define HP_PLAN_H

#include <stddef.h>
#include <stdint.h>

#include "hp_point.h"

typedef struct {
    uint8_t unit_id;
    hp_table table;
    uint16_t start;     /* first register */
    uint16_t count;     /* registers, 1..max_registers */
    uint32_t first;     /* index into order[] of its first point */
    uint32_t n_points;  /* its points are order[first .. first + n_points) */
} hp_read;

/* Plans reads for the points named by which[0..n) (indexes into points).
 * order (n entries) receives the same indexes sorted by unit, table and
 * address; reads (n entries suffice) receives the reads in that order. */
long hp_plan(const hp_point *points, const uint32_t *which, size_t n,
             unsigned max_registers, unsigned max_gap, uint32_t *order, hp_read *reads);

#endif
