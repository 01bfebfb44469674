/* A pond's geometry from its configuration: its stage-storage table when
 * it names one, else the prism of its floor area and dike slope. Shared by
 * the daemon's hydrology and `halostaged --once`.
 * Memory: a loaded table is the caller's (hs_stage_table_free); *table is
 * untouched when the pond has none.
 * Error convention: 0 shape filled; 1 the pond has no geometry; -1 the
 * geometry is unusable, with a reason in err. */
#ifndef HS_POND_SHAPE_H
#define HS_POND_SHAPE_H

#include <stddef.h>

#include "hc_geometry.h"
#include "hs_site.h"
#include "hs_stage_table.h"

int hs_pond_shape_of(const hs_pond *p, struct hs_stage_table *table, int *table_loaded,
                     hc_pond_shape *shape, char *err, size_t errlen);

#endif
