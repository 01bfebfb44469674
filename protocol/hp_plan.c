/* Read planner; see hp_plan.h. */
#include "hp_bus_conf.h"
#include "hp_plan.h"

static int before(const hp_point *a, const hp_point *b)
{
    if (a->unit_id != b->unit_id)
        return a->unit_id < b->unit_id;
    if (a->table != b->table)
        return a->table < b->table;
    return a->address < b->address;
}

/* Returns the number of reads, or -1 on a bad argument. */
long hp_plan(const hp_point *points, const uint32_t *which, size_t n,
             unsigned max_registers, unsigned max_gap, uint32_t *order, hp_read *reads)
{
    if (max_registers < 1 || max_registers > HP_MAX_READ_REGISTERS)
        return -1;
    /* Insertion sort: a bus has tens to hundreds of points and the order is
     * nearly sorted already (the configuration lists them by address). */
    for (size_t i = 0; i < n; i++) {
        uint32_t v = which[i];
        size_t j = i;
        while (j > 0 && before(&points[v], &points[order[j - 1]])) {
            order[j] = order[j - 1];
            j--;
        }
        order[j] = v;
    }
    long nr = 0;
    hp_read *cur = NULL;
    for (size_t i = 0; i < n; i++) {
        const hp_point *p = &points[order[i]];
        unsigned width = hp_type_registers(p->type);
        if (width == 0 || width > max_registers)
            return -1;
        uint32_t lo = p->address, hi = lo + width; /* [lo, hi) */
        if (cur && cur->unit_id == p->unit_id && cur->table == p->table) {
            uint32_t end = (uint32_t)cur->start + cur->count;
            uint32_t new_end = hi > end ? hi : end;
            uint32_t gap = lo > end ? lo - end : 0;
            if (gap <= max_gap && new_end - cur->start <= max_registers) {
                cur->count = (uint16_t)(new_end - cur->start);
                cur->n_points++;
                continue;
            }
        }
        cur = &reads[nr++];
        cur->unit_id = p->unit_id;
        cur->table = p->table;
        cur->start = (uint16_t)lo;
        cur->count = (uint16_t)width;
        cur->first = (uint32_t)i;
        cur->n_points = 1;
    }
    return nr;
}
