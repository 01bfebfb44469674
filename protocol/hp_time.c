/* Clocks; see hp_time.h. */
#include <time.h>

#include "hp_time.h"

int64_t hp_mono_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

int64_t hp_wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

void hp_deadline(int64_t ms_from_now, struct timespec *ts)
{
    clock_gettime(CLOCK_MONOTONIC, ts);
    if (ms_from_now < 0)
        ms_from_now = 0;
    ts->tv_sec += (time_t)(ms_from_now / 1000);
    ts->tv_nsec += (long)(ms_from_now % 1000) * 1000000L;
    if (ts->tv_nsec >= 1000000000L) {
        ts->tv_sec++;
        ts->tv_nsec -= 1000000000L;
    }
}

/* 0, or an error number from pthread. */
int hp_cond_init_mono(pthread_cond_t *cond)
{
    pthread_condattr_t attr;
    int rc = pthread_condattr_init(&attr);
    if (rc == 0)
        rc = pthread_condattr_setclock(&attr, CLOCK_MONOTONIC);
    if (rc == 0)
        rc = pthread_cond_init(cond, &attr);
    pthread_condattr_destroy(&attr);
    return rc;
}
