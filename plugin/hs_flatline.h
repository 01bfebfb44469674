/* Stuck-sensor (flatline) detection: an analyser that repeats exactly the
 * same value for longer than its signal's flatline_after is stuck, the
 * commonest analyser failure (a frozen transmitter output, a hung
 * converter). Exact equality on purpose: a live conductivity or temperature
 * signal always moves in its last digits over hours. Pure logic, no I/O. */
#ifndef HS_FLATLINE_H
#define HS_FLATLINE_H

#include <stdint.h>

typedef struct {
    double value;      /* the value being repeated */
    int64_t since_ms;  /* when it was first seen [ms since the epoch] */
    int have;          /* a value has been seen */
    int stuck;         /* repeated for flatline_after or longer */
} hs_flatline;

typedef enum {
    HS_FLAT_NONE,      /* nothing changed */
    HS_FLAT_STUCK,     /* it has just become stuck */
    HS_FLAT_MOVED,     /* it was stuck and moves again */
} hs_flat_event;

/* Feeds one good value read at t_ms. after_ms <= 0 turns the check off (and
 * clears a stuck state). */
hs_flat_event hs_flatline_feed(hs_flatline *f, double value, int64_t t_ms, int64_t after_ms);

#endif
