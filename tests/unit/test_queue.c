/* The bounded sample queue between bus workers and the main loop: order,
 * drop-oldest when full (counted), waiting with a timeout, several producer
 * threads. No science here, so no source to cite. */
#include <pthread.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include "hp_queue.h"
#include "hp_time.h"

static hp_sample sample(uint32_t point, uint32_t bus)
{
    hp_sample s = {.point = point, .bus = bus, .quality = HP_Q_GOOD};
    return s;
}

static void fifo_and_drop_oldest(void **unused)
{
    (void)unused;
    hp_queue *q = hp_queue_new(4);
    assert_non_null(q);
    for (uint32_t i = 0; i < 6; i++) {
        hp_sample s = sample(i, 0);
        hp_queue_push(q, &s);
    }
    assert_int_equal(hp_queue_dropped(q), 2);
    hp_sample out[8];
    size_t n = hp_queue_pop(q, out, 8, 0);
    assert_int_equal(n, 4);
    for (size_t i = 0; i < n; i++)
        assert_int_equal(out[i].point, i + 2); /* the two oldest went */
    assert_int_equal(hp_queue_pop(q, out, 8, 0), 0);
    hp_queue_free(q);
    assert_null(hp_queue_new(0));
}

static void pop_waits_for_the_timeout(void **unused)
{
    (void)unused;
    hp_queue *q = hp_queue_new(2);
    hp_sample out[2];
    int64_t t0 = hp_mono_ms();
    assert_int_equal(hp_queue_pop(q, out, 2, 50), 0);
    assert_true(hp_mono_ms() - t0 >= 45);
    hp_queue_free(q);
}

typedef struct {
    hp_queue *q;
    uint32_t bus;
} producer_arg;

static void *producer(void *p)
{
    producer_arg *a = p;
    for (uint32_t i = 0; i < 1000; i++) {
        hp_sample s = sample(i, a->bus);
        hp_queue_push(a->q, &s);
    }
    return NULL;
}

static void producers_keep_their_order(void **unused)
{
    (void)unused;
    hp_queue *q = hp_queue_new(8192);
    pthread_t t[4];
    producer_arg args[4];
    for (uint32_t i = 0; i < 4; i++) {
        args[i].q = q;
        args[i].bus = i;
        assert_int_equal(pthread_create(&t[i], NULL, producer, &args[i]), 0);
    }
    uint32_t next[4] = {0};
    size_t total = 0;
    hp_sample out[64];
    while (total < 4000) {
        size_t n = hp_queue_pop(q, out, 64, 1000);
        assert_true(n > 0);
        for (size_t i = 0; i < n; i++) {
            assert_int_equal(out[i].point, next[out[i].bus]);
            next[out[i].bus]++;
        }
        total += n;
    }
    for (int i = 0; i < 4; i++)
        pthread_join(t[i], NULL);
    assert_int_equal(hp_queue_dropped(q), 0);
    hp_queue_free(q);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(fifo_and_drop_oldest),
        cmocka_unit_test(pop_waits_for_the_timeout),
        cmocka_unit_test(producers_keep_their_order),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
