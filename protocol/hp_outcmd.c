/* Output commands of one bus; see hp_outcmd.h. The mutex guards the slots;
 * the Modbus transactions run outside it. */
#include <errno.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include "hp_outcmd.h"
#include "hp_time.h"

typedef struct {
    bool used;
    uint8_t unit_id;
    bool coil;
    uint16_t address;
    bool waiting;          /* a request not yet carried out */
    hp_outcmd_kind kind;
    uint16_t value;
    uint32_t seq;
    int64_t posted_ms;
    hp_outcmd_result result;
} slot;

struct hp_outcmd {
    pthread_mutex_t mu;
    slot slots[HP_OUTCMD_SLOTS];
    uint32_t next_seq;
};

hp_outcmd *hp_outcmd_new(void)
{
    hp_outcmd *q = calloc(1, sizeof *q);
    if (q == NULL)
        return NULL;
    if (pthread_mutex_init(&q->mu, NULL) != 0) {
        free(q);
        return NULL;
    }
    q->next_seq = 1;
    return q;
}

void hp_outcmd_free(hp_outcmd *q)
{
    if (q == NULL)
        return;
    pthread_mutex_destroy(&q->mu);
    free(q);
}

static slot *find(hp_outcmd *q, uint8_t unit_id, bool coil, uint16_t address, bool add)
{
    slot *free_slot = NULL;
    for (size_t i = 0; i < HP_OUTCMD_SLOTS; i++) {
        slot *s = &q->slots[i];
        if (s->used && s->unit_id == unit_id && s->coil == coil && s->address == address)
            return s;
        if (!s->used && free_slot == NULL)
            free_slot = s;
    }
    if (!add || free_slot == NULL)
        return NULL;
    memset(free_slot, 0, sizeof *free_slot);
    free_slot->used = true;
    free_slot->unit_id = unit_id;
    free_slot->coil = coil;
    free_slot->address = address;
    return free_slot;
}

int hp_outcmd_post(hp_outcmd *q, uint8_t unit_id, bool coil, uint16_t address,
                   hp_outcmd_kind kind, uint16_t value, uint32_t *seq)
{
    if (q == NULL || seq == NULL) {
        errno = EINVAL;
        return -1;
    }
    pthread_mutex_lock(&q->mu);
    slot *s = find(q, unit_id, coil, address, true);
    if (s == NULL) {
        pthread_mutex_unlock(&q->mu);
        errno = ENOBUFS;
        return -1;
    }
    s->waiting = true;
    s->kind = kind;
    s->value = coil ? (value != 0) : value;
    s->seq = q->next_seq++;
    if (q->next_seq == 0)
        q->next_seq = 1; /* 0 means "no result yet" */
    s->posted_ms = hp_mono_ms();
    *seq = s->seq;
    pthread_mutex_unlock(&q->mu);
    return 0;
}

int hp_outcmd_result_get(hp_outcmd *q, uint8_t unit_id, bool coil, uint16_t address,
                         hp_outcmd_result *out)
{
    pthread_mutex_lock(&q->mu);
    slot *s = find(q, unit_id, coil, address, false);
    int rc = s != NULL && s->result.seq != 0 ? 0 : -1;
    if (rc == 0)
        *out = s->result;
    pthread_mutex_unlock(&q->mu);
    if (rc != 0)
        errno = ENOENT;
    return rc;
}

bool hp_outcmd_pending(hp_outcmd *q)
{
    bool any = false;
    pthread_mutex_lock(&q->mu);
    for (size_t i = 0; i < HP_OUTCMD_SLOTS && !any; i++)
        any = q->slots[i].used && q->slots[i].waiting;
    pthread_mutex_unlock(&q->mu);
    return any;
}

static bool link_broken(int e)
{
    return e == ECONNRESET || e == EPIPE || e == EBADF || e == ECONNREFUSED || e == ENOTCONN ||
           e == ECONNABORTED || e == EIO;
}

/* The oldest waiting request, taken out of its slot; false when none. */
static bool take(hp_outcmd *q, slot *out)
{
    slot *oldest = NULL;
    int64_t now = hp_mono_ms();
    pthread_mutex_lock(&q->mu);
    for (size_t i = 0; i < HP_OUTCMD_SLOTS; i++) {
        slot *s = &q->slots[i];
        if (!s->used || !s->waiting)
            continue;
        if (now - s->posted_ms > HP_OUTCMD_MAX_AGE_MS) {
            s->waiting = false; /* too old to be a current decision */
            continue;
        }
        if (oldest == NULL || s->posted_ms < oldest->posted_ms)
            oldest = s;
    }
    if (oldest != NULL) {
        *out = *oldest;
        oldest->waiting = false;
    }
    pthread_mutex_unlock(&q->mu);
    return oldest != NULL;
}

static void put_result(hp_outcmd *q, const slot *done, const hp_outcmd_result *r)
{
    pthread_mutex_lock(&q->mu);
    slot *s = find(q, done->unit_id, done->coil, done->address, false);
    if (s != NULL)
        s->result = *r;
    pthread_mutex_unlock(&q->mu);
}

int hp_outcmd_run(hp_outcmd *q, modbus_t *ctx, uint64_t *transactions, uint64_t *failures)
{
    slot c;
    while (take(q, &c)) {
        hp_outcmd_result r = {.seq = c.seq};
        modbus_set_slave(ctx, c.unit_id);
        if (c.kind != HP_OUTCMD_READ) {
            int rc = c.coil ? modbus_write_bit(ctx, c.address, c.value ? 1 : 0)
                            : modbus_write_register(ctx, c.address, c.value);
            (*transactions)++;
            if (rc != 1) {
                r.write_errno = errno ? errno : EIO;
                (*failures)++;
                modbus_flush(ctx); /* a late answer must not be read as the next one's */
            }
        }
        if (c.kind != HP_OUTCMD_WRITE && !link_broken(r.write_errno)) {
            uint8_t bit = 0;
            uint16_t reg = 0;
            int rc = c.coil ? modbus_read_bits(ctx, c.address, 1, &bit)
                            : modbus_read_registers(ctx, c.address, 1, &reg);
            (*transactions)++;
            if (rc == 1) {
                r.read = true;
                r.value = c.coil ? (bit != 0) : reg;
            } else {
                r.read_errno = errno ? errno : EIO;
                (*failures)++;
                modbus_flush(ctx);
            }
        }
        r.done_ms = hp_mono_ms();
        r.took_ms = r.done_ms - c.posted_ms;
        put_result(q, &c, &r);
        if (link_broken(r.write_errno) || link_broken(r.read_errno))
            return link_broken(r.write_errno) ? r.write_errno : r.read_errno;
    }
    return 0;
}
