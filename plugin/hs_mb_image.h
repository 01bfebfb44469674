/* The register image behind the read-only Modbus server: the site's map
 * (hs_scada_map.h) as 16-bit registers, rebuilt piecewise by the runtime's
 * thread as documents arrive and copied out by the server's thread. One
 * mutex guards it; each side holds it only to copy at most one pond block
 * or one read (125 registers), so neither waits on the other for long.
 *
 * Ownership: the image owns its register array; create/free on the
 * runtime's thread. Error convention: NULL / -1 on failure. */
#ifndef HS_MB_IMAGE_H
#define HS_MB_IMAGE_H

#include <stddef.h>
#include <stdint.h>

#include "hp_codec.h"
#include "hs_scada_map.h"

typedef struct hs_mb_image hs_mb_image;

hs_mb_image *hs_mb_image_new(size_t n_ponds, size_t n_transfers, hp_order word_order);
void hs_mb_image_free(hs_mb_image *im);

void hs_mb_image_pond(hs_mb_image *im, size_t pond, const hs_scada_pond *p);
void hs_mb_image_transfer(hs_mb_image *im, size_t transfer, const hs_scada_transfer *t);
/* Heartbeat + 1 and the time of this update [s since the epoch]. */
void hs_mb_image_beat(hs_mb_image *im, uint32_t now_s);

/* hp_mb_read_fn: copies n registers from addr; 2 (illegal data address)
 * when the range leaves the map. Thread-safe. */
int hs_mb_image_read(void *im, uint16_t addr, uint16_t n, uint16_t *regs);

/* Encodes one pond's block (HS_MAP_POND_SIZE registers) into regs. */
void hs_mb_pond_block(const hs_scada_pond *p, hp_order word_order, uint16_t *regs);

#endif
