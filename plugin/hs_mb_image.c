/* Register image of the Modbus map (hs_mb_image.h). */
#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include "halostage_plugin.h"
#include "hs_mb_image.h"

struct hs_mb_image {
    pthread_mutex_t lock;
    hp_order word_order;
    size_t n_ponds, n_transfers;
    uint32_t heartbeat;
    size_t n_regs;
    uint16_t *regs;
};

static void put_u32(uint16_t *at, uint32_t v, hp_order word_order)
{
    hp_encode((double)v, HP_UINT32, HP_ORDER_BIG, word_order, at);
}

static void put_f32(uint16_t *at, double v, hp_order word_order)
{
    /* hp_encode writes NaN as the float NaN: "unknown" on the wire */
    hp_encode(v, HP_FLOAT32, HP_ORDER_BIG, word_order, at);
}

void hs_mb_pond_block(const hs_scada_pond *p, hp_order word_order, uint16_t *regs)
{
    memset(regs, 0, HS_MAP_POND_SIZE * sizeof *regs);
    for (size_t k = 0; k < hs_scada_pond_n_points; k++) {
        put_f32(regs + 2 * k, p->number[k], word_order);
        regs[HS_MAP_INT16_OFFSET + k] =
            (uint16_t)hs_scada_scaled(p->number[k], hs_scada_pond_points[k].scale);
    }
    for (unsigned c = 0; c < HS_CODE_TIME_HI; c++)
        regs[HS_MAP_CODE_OFFSET + c] = p->code[c];
    put_u32(regs + HS_MAP_CODE_OFFSET + HS_CODE_TIME_HI, p->time_s, word_order);
}

hs_mb_image *hs_mb_image_new(size_t n_ponds, size_t n_transfers, hp_order word_order)
{
    if (n_ponds > HS_MAP_POND_MAX || n_transfers > HS_MAP_TRANSFER_MAX)
        return NULL;
    hs_mb_image *im = calloc(1, sizeof *im);
    if (im == NULL)
        return NULL;
    im->n_regs = HS_MAP_POND_BASE + HS_MAP_POND_SIZE * n_ponds;
    im->regs = calloc(im->n_regs, sizeof *im->regs);
    if (im->regs == NULL) {
        free(im);
        return NULL;
    }
    pthread_mutex_init(&im->lock, NULL);
    im->word_order = word_order;
    im->n_ponds = n_ponds;
    im->n_transfers = n_transfers;
    uint16_t *s = im->regs + HS_MAP_SITE_BASE;
    s[0] = HS_MAP_VERSION;
    s[1] = HSP_ABI_CURRENT;
    s[2] = (uint16_t)n_ponds;
    s[3] = (uint16_t)n_transfers;
    s[8] = word_order == HP_ORDER_LITTLE;
    put_f32(s + 10, 1234.5, word_order);
    hs_scada_pond empty;
    hs_scada_pond_clear(&empty);
    for (size_t i = 0; i < n_ponds; i++)
        hs_mb_pond_block(&empty, word_order, im->regs + HS_MAP_POND_BASE + HS_MAP_POND_SIZE * i);
    for (size_t j = 0; j < n_transfers; j++)
        im->regs[HS_MAP_TRANSFER_BASE + HS_MAP_TRANSFER_SIZE * j] = 0xFFFF; /* no advice yet */
    return im;
}

void hs_mb_image_free(hs_mb_image *im)
{
    if (im == NULL)
        return;
    pthread_mutex_destroy(&im->lock);
    free(im->regs);
    free(im);
}

void hs_mb_image_pond(hs_mb_image *im, size_t pond, const hs_scada_pond *p)
{
    if (pond >= im->n_ponds)
        return;
    uint16_t block[HS_MAP_POND_SIZE];
    hs_mb_pond_block(p, im->word_order, block); /* encode outside the lock */
    pthread_mutex_lock(&im->lock);
    memcpy(im->regs + HS_MAP_POND_BASE + HS_MAP_POND_SIZE * pond, block, sizeof block);
    pthread_mutex_unlock(&im->lock);
}

void hs_mb_image_transfer(hs_mb_image *im, size_t transfer, const hs_scada_transfer *t)
{
    if (transfer >= im->n_transfers)
        return;
    uint16_t block[HS_MAP_TRANSFER_SIZE] = {t->advice, t->pump_on};
    put_u32(block + 2, t->reasons, im->word_order);
    pthread_mutex_lock(&im->lock);
    memcpy(im->regs + HS_MAP_TRANSFER_BASE + HS_MAP_TRANSFER_SIZE * transfer, block,
           sizeof block);
    pthread_mutex_unlock(&im->lock);
}

void hs_mb_image_beat(hs_mb_image *im, uint32_t now_s)
{
    pthread_mutex_lock(&im->lock);
    im->heartbeat++;
    put_u32(im->regs + 4, im->heartbeat, im->word_order);
    put_u32(im->regs + 6, now_s, im->word_order);
    pthread_mutex_unlock(&im->lock);
}

int hs_mb_image_read(void *arg, uint16_t addr, uint16_t n, uint16_t *regs)
{
    hs_mb_image *im = arg;
    if ((size_t)addr + n > im->n_regs)
        return 2;
    pthread_mutex_lock(&im->lock);
    memcpy(regs, im->regs + addr, n * sizeof *regs);
    pthread_mutex_unlock(&im->lock);
    return 0;
}
