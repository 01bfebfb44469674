/* Bounded sample queue from the bus workers (producers) to the main loop
 * (one consumer). When full, the oldest sample is dropped and counted: a slow
 * consumer must never block a bus worker (the newest reading matters most).
 * Error convention: hp_queue_new returns NULL when out of memory; the rest
 * cannot fail. Thread-safe. */
#ifndef HP_QUEUE_H
#define HP_QUEUE_H

#include <stddef.h>
#include <stdint.h>

#include "hp_point.h"

typedef struct hp_queue hp_queue;

hp_queue *hp_queue_new(size_t capacity);
void hp_queue_free(hp_queue *queue);
void hp_queue_push(hp_queue *queue, const hp_sample *sample);
/* Waits up to timeout_ms (0 = do not wait) for at least one sample, then
 * moves up to max samples into out. Returns how many. */
size_t hp_queue_pop(hp_queue *queue, hp_sample *out, size_t max, int64_t timeout_ms);
/* Samples dropped because the queue was full, since it was made. */
uint64_t hp_queue_dropped(hp_queue *queue);

#endif
