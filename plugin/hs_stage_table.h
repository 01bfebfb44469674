/* Loads a pond's stage-storage table from a CSV file:
 *
 *     # survey of pond C3, 2025 (comments start with #)
 *     level_m,volume_m3,area_m2
 *     0.00,0,41800
 *     0.10,4215,42500
 *     ...
 *
 * The header names the columns; level_m (or its synonym depth_m: the
 * brine's height above the pond floor) and volume_m3 are required,
 * area_m2 is optional (without it the area is dV/dh of the interpolant).
 * Columns may come in any order. Blank lines and comments are skipped.
 * Every defect is reported as "FILE:LINE: what is wrong", including a
 * level or volume that does not increase (hc_stage_table_check).
 *
 * Error convention: 0 on success; -1 with a message in err (always
 * NUL-terminated) on failure. Memory: a loaded table owns its arrays;
 * release it with hs_stage_table_free (safe on a zeroed or freed table). */
#ifndef HS_STAGE_TABLE_H
#define HS_STAGE_TABLE_H

#include <stddef.h>

#include "hc_geometry.h"

#define HS_STAGE_TABLE_MAX_ROWS 10000

struct hs_stage_table {
    hc_stage_table view; /* points into the arrays below */
    double *level_m;
    double *volume_m3;
    double *area_m2;     /* NULL when the file has no area column */
    size_t *line_of_row; /* source line of each row, for messages */
};

int hs_stage_table_load(const char *path, struct hs_stage_table *out, char *err, size_t errlen);
/* The same from text already in memory (name is used in messages). */
int hs_stage_table_parse(const char *name, const char *text, struct hs_stage_table *out, char *err,
                         size_t errlen);
void hs_stage_table_free(struct hs_stage_table *t);

#endif
