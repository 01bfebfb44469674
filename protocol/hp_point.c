/* Point decoding and quality names; see hp_point.h. */
#include <errno.h>
#include <math.h>
#include <modbus.h>
#include <string.h>

#include "hp_point.h"

const char *hp_quality_name(hp_quality quality)
{
    static const char *const names[HP_Q_COUNT] = {
        "good", "stale", "comm-fail", "out-of-range", "sentinel", "decode-error",
    };
    return (unsigned)quality < HP_Q_COUNT ? names[quality] : "?";
}

const char *hp_sample_reason(const hp_sample *s)
{
    switch (s->quality) {
    case HP_Q_GOOD: return "";
    case HP_Q_STALE: return "stale";
    case HP_Q_OUT_OF_RANGE: return "out-of-range";
    case HP_Q_SENTINEL: return "sentinel";
    case HP_Q_DECODE_ERROR: return "decode-error";
    case HP_Q_COMM_FAIL: break;
    default: return "?";
    }
    if (s->exception)
        return "exception";
    switch (s->sys_errno) {
    case ETIMEDOUT: return "timeout";
    case EHOSTDOWN: return "device-down";
    case ECONNRESET: case EPIPE: case EBADF: case ECONNREFUSED: case ENOTCONN:
    case ECONNABORTED: case EIO: return "link";
    case EMBBADDATA: case EMBBADCRC: case EMBBADSLAVE: case EMBMDATA: case EMBBADEXC:
        return "bad-reply";
    default: return "error";
    }
}

int hp_sample_code(const hp_sample *s)
{
    if (s->quality != HP_Q_COMM_FAIL)
        return 0;
    return s->exception ? s->exception : s->sys_errno;
}

const char *hp_table_name(hp_table table)
{
    switch (table) {
    case HP_TABLE_HOLDING: return "holding";
    case HP_TABLE_INPUT: return "input";
    default: return "?";
    }
}

/* Never fails: a bad encoding yields quality decode-error. */
void hp_point_decode(const hp_point *point, const uint16_t *regs, hp_sample *sample)
{
    unsigned n = hp_type_registers(point->type);
    double raw;

    sample->exception = 0;
    sample->sys_errno = 0;
    sample->raw = NAN;
    sample->value = NAN;
    sample->n_regs = (uint8_t)n;
    if (n > 0)
        memcpy(sample->regs, regs, n * sizeof regs[0]);
    if (hp_decode(regs, point->type, point->byte_order, point->word_order, &raw) != 0
        || !isfinite(raw)) {
        sample->quality = HP_Q_DECODE_ERROR;
        return;
    }
    sample->raw = raw;
    for (unsigned i = 0; i < point->n_sentinels && i < HP_SENTINEL_MAX; i++) {
        /* Sentinels are exact raw patterns; float32 sentinels compare in
         * single precision, as the device stored them. */
        double s = point->sentinels[i];
        if (point->type == HP_FLOAT32 ? (float)s == (float)raw : s == raw) {
            sample->quality = HP_Q_SENTINEL;
            return;
        }
    }
    sample->value = raw * point->scale + point->offset;
    if (!isfinite(sample->value)) {
        sample->value = NAN;
        sample->quality = HP_Q_DECODE_ERROR;
        return;
    }
    sample->quality = (sample->value < point->valid_min || sample->value > point->valid_max)
                          ? HP_Q_OUT_OF_RANGE : HP_Q_GOOD;
}
