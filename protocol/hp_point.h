/* What the protocol layer reads: one point is a value at a Modbus register
 * location with its encoding and plausibility limits, and one sample is one
 * reading of a point. The protocol layer knows nothing of ponds; the plugin
 * maps its signals onto points (same index) and samples back onto signals.
 * Plain data, no pointers: copies by assignment. */
#ifndef HP_POINT_H
#define HP_POINT_H

#include <stdint.h>

#include "hp_codec.h"

#define HP_SENTINEL_MAX 4

/* Register tables a point may live in (Modbus Application Protocol v1.1b
 * §4.3: holding registers are read with function 0x03, input registers with
 * 0x04). */
typedef enum {
    HP_TABLE_HOLDING,
    HP_TABLE_INPUT,
    HP_TABLE_COUNT
} hp_table;

typedef struct {
    uint8_t unit_id;            /* Modbus unit (slave) id, 0..247 */
    hp_table table;
    uint16_t address;           /* zero-based protocol address */
    hp_reg_type type;
    hp_order byte_order;        /* within each 16-bit register */
    hp_order word_order;        /* of the registers of a 32/64-bit value */
    double scale;               /* value = raw * scale + offset */
    double offset;
    double valid_min;           /* engineering units; outside -> out-of-range */
    double valid_max;
    double sentinels[HP_SENTINEL_MAX]; /* raw values that mean "no reading" */
    unsigned n_sentinels;
    int64_t interval_ms;        /* poll interval */
} hp_point;

/* Sample qualities, best first. */
typedef enum {
    HP_Q_GOOD,
    HP_Q_STALE,         /* last good value is older than the stale limit */
    HP_Q_COMM_FAIL,     /* no answer, a dropped link or a Modbus exception */
    HP_Q_OUT_OF_RANGE,  /* decoded but outside the point's valid range */
    HP_Q_SENTINEL,      /* the device reported one of the "no reading" values */
    HP_Q_DECODE_ERROR,  /* NaN/infinite float, or a reply that cannot be decoded */
    HP_Q_COUNT
} hp_quality;

typedef struct {
    uint32_t point;     /* index of the point in the bus's point array */
    uint32_t bus;       /* index of the bus (set by the owner of the bus) */
    hp_quality quality;
    int exception;      /* Modbus exception code (1..11) or 0 */
    int sys_errno;      /* errno of a communication failure, or 0; EHOSTDOWN:
                         * not asked, its device did not answer (hp_bus.h) */
    double raw;         /* decoded register value before scale/offset; NaN if none */
    double value;       /* engineering value; NaN unless quality is good or
                         * out-of-range */
    int64_t time_ms;    /* wall-clock time of the read [ms since the epoch] */
    uint16_t regs[4];   /* the raw registers as read */
    uint8_t n_regs;
} hp_sample;

/* "good", "stale", "comm-fail", ...; "?" for an invalid value. */
const char *hp_quality_name(hp_quality quality);
/* Why a sample is not good, one short name: "timeout", "exception" (code in
 * sample->exception), "link" (a broken connection), "device-down" (not
 * asked), "bad-reply" (wrong length, CRC, unit id or transaction), "error"
 * (another errno), "out-of-range", "sentinel", "decode-error", "stale";
 * "" for a good sample. The number that goes with it: hp_sample_code. */
const char *hp_sample_reason(const hp_sample *sample);
/* The Modbus exception code or the errno behind a comm-fail, else 0. */
int hp_sample_code(const hp_sample *sample);
const char *hp_table_name(hp_table table);

/* Turns the registers of one point into a sample's raw, value and quality
 * (good, out-of-range, sentinel or decode-error). regs holds exactly
 * hp_type_registers(point->type) registers. Never fails; writes *sample. */
void hp_point_decode(const hp_point *point, const uint16_t *regs, hp_sample *sample);

#endif
