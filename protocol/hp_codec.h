/* Register codec: values spread over 16-bit Modbus registers in any common
 * encoding. Modbus itself fixes only the byte order inside one register (big
 * endian, Modbus Application Protocol v1.1b §4.2); devices differ in how they
 * order bytes inside a register and registers inside a 32/64-bit value, so
 * both orders are parameters. Decoding uses explicit shifts into uint32_t /
 * uint64_t (no type punning through pointers, no shifts of promoted ints).
 * Error convention: functions return 0 on success, -1 on a bad argument. */
#ifndef HP_CODEC_H
#define HP_CODEC_H

#include <stdint.h>

typedef enum {
    HP_INT16,
    HP_UINT16,
    HP_INT32,
    HP_UINT32,
    HP_FLOAT32,
    HP_FLOAT64,
    HP_TYPE_COUNT
} hp_reg_type;

typedef enum {
    HP_ORDER_BIG,    /* most significant first */
    HP_ORDER_LITTLE, /* least significant first */
    HP_ORDER_COUNT
} hp_order;

/* Registers a value of this type occupies (1, 2 or 4); 0 for an invalid type. */
unsigned hp_type_registers(hp_reg_type type);
const char *hp_type_name(hp_reg_type type);
const char *hp_order_name(hp_order order);

/* Reassembles the value's bytes, most significant first, into a uint64_t
 * (right-aligned). Returns 0, or -1 on an invalid type or order. */
int hp_regs_to_bits(const uint16_t *regs, hp_reg_type type, hp_order byte_order,
                    hp_order word_order, uint64_t *bits);

/* Decodes the registers into *value. Integers convert exactly; floats may be
 * NaN or infinite (the caller judges those). Returns 0, or -1 on a bad type or
 * order. */
int hp_decode(const uint16_t *regs, hp_reg_type type, hp_order byte_order,
              hp_order word_order, double *value);

/* Encodes value into hp_type_registers(type) registers. Integers are rounded
 * to nearest and saturate at the type's limits; NaN becomes 0 for integer
 * types. Returns 0, or -1 on a bad type or order. */
int hp_encode(double value, hp_reg_type type, hp_order byte_order,
              hp_order word_order, uint16_t *regs);

#endif
