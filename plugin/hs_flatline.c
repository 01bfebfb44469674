/* Stuck-sensor detection; see hs_flatline.h. */
#include "hs_flatline.h"

hs_flat_event hs_flatline_feed(hs_flatline *f, double value, int64_t t_ms, int64_t after_ms)
{
    int was = f->stuck;
    if (after_ms <= 0) {
        f->have = f->stuck = 0;
        return was ? HS_FLAT_MOVED : HS_FLAT_NONE;
    }
    if (!f->have || value != f->value) {
        f->value = value;
        f->since_ms = t_ms;
        f->have = 1;
        f->stuck = 0;
        return was ? HS_FLAT_MOVED : HS_FLAT_NONE;
    }
    f->stuck = t_ms - f->since_ms >= after_ms;
    return f->stuck && !was ? HS_FLAT_STUCK : HS_FLAT_NONE;
}
