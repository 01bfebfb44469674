/* Clocks of the protocol layer: monotonic for intervals and timeouts, wall
 * clock only for the time stamp a sample carries. */
#ifndef HP_TIME_H
#define HP_TIME_H

#include <pthread.h>
#include <stdint.h>

int64_t hp_mono_ms(void);
int64_t hp_wall_ms(void);
/* An absolute CLOCK_MONOTONIC deadline ms from now, for a condition
 * variable made with hp_cond_init_mono. */
void hp_deadline(int64_t ms_from_now, struct timespec *ts);
int hp_cond_init_mono(pthread_cond_t *cond);

#endif
