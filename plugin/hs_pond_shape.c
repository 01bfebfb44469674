/* See hs_pond_shape.h. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hs_pond_shape.h"

int hs_pond_shape_of(const hs_pond *p, struct hs_stage_table *table, int *table_loaded,
                     hc_pond_shape *shape, char *err, size_t errlen)
{
    memset(shape, 0, sizeof *shape);
    if (p->stage_storage[0] != '\0') {
        if (hs_stage_table_load(p->stage_storage, table, err, errlen) != 0)
            return -1;
        *table_loaded = 1;
        shape->is_table = 1;
        shape->table = table->view;
        return 0;
    }
    if (!isfinite(p->floor_area_m2))
        return 1;
    /* crest at the freeboard when given; otherwise 2 m (common practice,
     * no source: solar pond dikes are rarely higher) */
    shape->prism = (hc_prism){p->floor_area_m2, 0, isfinite(p->side_slope) ? p->side_slope : 0,
                              isfinite(p->freeboard_m) ? p->freeboard_m : 2.0};
    if (hc_prism_check(&shape->prism) != HC_OK) {
        snprintf(err, errlen, "area and side slope give no usable geometry");
        return -1;
    }
    return 0;
}
