/* Bounded sample queue; see hp_queue.h. A ring buffer under one mutex. */
#include <errno.h>
#include <pthread.h>
#include <stdlib.h>

#include "hp_queue.h"
#include "hp_time.h"

struct hp_queue {
    pthread_mutex_t mu;
    pthread_cond_t nonempty;
    hp_sample *ring;      /* owned */
    size_t cap, head, count;
    uint64_t dropped;
};

hp_queue *hp_queue_new(size_t capacity)
{
    if (capacity == 0)
        return NULL;
    hp_queue *q = calloc(1, sizeof *q);
    if (!q)
        return NULL;
    q->ring = calloc(capacity, sizeof q->ring[0]);
    if (!q->ring || pthread_mutex_init(&q->mu, NULL) != 0) {
        free(q->ring);
        free(q);
        return NULL;
    }
    if (hp_cond_init_mono(&q->nonempty) != 0) {
        pthread_mutex_destroy(&q->mu);
        free(q->ring);
        free(q);
        return NULL;
    }
    q->cap = capacity;
    return q;
}

void hp_queue_free(hp_queue *q)
{
    if (!q)
        return;
    pthread_cond_destroy(&q->nonempty);
    pthread_mutex_destroy(&q->mu);
    free(q->ring);
    free(q);
}

void hp_queue_push(hp_queue *q, const hp_sample *sample)
{
    pthread_mutex_lock(&q->mu);
    if (q->count == q->cap) {
        q->head = (q->head + 1) % q->cap;
        q->count--;
        q->dropped++;
    }
    q->ring[(q->head + q->count) % q->cap] = *sample;
    q->count++;
    pthread_cond_signal(&q->nonempty);
    pthread_mutex_unlock(&q->mu);
}

size_t hp_queue_pop(hp_queue *q, hp_sample *out, size_t max, int64_t timeout_ms)
{
    struct timespec deadline;
    hp_deadline(timeout_ms, &deadline);
    pthread_mutex_lock(&q->mu);
    while (q->count == 0 && timeout_ms > 0) {
        if (pthread_cond_timedwait(&q->nonempty, &q->mu, &deadline) == ETIMEDOUT)
            break;
    }
    size_t n = 0;
    while (n < max && q->count > 0) {
        out[n++] = q->ring[q->head];
        q->head = (q->head + 1) % q->cap;
        q->count--;
    }
    pthread_mutex_unlock(&q->mu);
    return n;
}

uint64_t hp_queue_dropped(hp_queue *q)
{
    pthread_mutex_lock(&q->mu);
    uint64_t d = q->dropped;
    pthread_mutex_unlock(&q->mu);
    return d;
}
