/* Register codec; see hp_codec.h. Bit patterns become floats through memcpy
 * (C11 §6.5 p7 allows access through unsigned char), never through pointer
 * casts. */
#include <math.h>
#include <string.h>

#include "hp_codec.h"

static const char *const type_names[HP_TYPE_COUNT] = {
    "int16", "uint16", "int32", "uint32", "float32", "float64",
};

unsigned hp_type_registers(hp_reg_type type)
{
    switch (type) {
    case HP_INT16:
    case HP_UINT16: return 1;
    case HP_INT32:
    case HP_UINT32:
    case HP_FLOAT32: return 2;
    case HP_FLOAT64: return 4;
    default: return 0;
    }
}

const char *hp_type_name(hp_reg_type type)
{
    return (unsigned)type < HP_TYPE_COUNT ? type_names[type] : "?";
}

const char *hp_order_name(hp_order order)
{
    switch (order) {
    case HP_ORDER_BIG: return "big";
    case HP_ORDER_LITTLE: return "little";
    default: return "?";
    }
}

static uint16_t swap16(uint16_t v)
{
    return (uint16_t)(((uint32_t)v >> 8) | (((uint32_t)v & 0xffu) << 8));
}

static int orders_valid(hp_order byte_order, hp_order word_order)
{
    return (unsigned)byte_order < HP_ORDER_COUNT && (unsigned)word_order < HP_ORDER_COUNT;
}

/* 0 on success, -1 on an invalid type or order. */
int hp_regs_to_bits(const uint16_t *regs, hp_reg_type type, hp_order byte_order,
                    hp_order word_order, uint64_t *bits)
{
    unsigned n = hp_type_registers(type);
    if (n == 0 || !orders_valid(byte_order, word_order))
        return -1;
    uint64_t acc = 0;
    for (unsigned i = 0; i < n; i++) {
        /* i counts words from the most significant one. */
        uint16_t w = regs[word_order == HP_ORDER_BIG ? i : n - 1 - i];
        if (byte_order == HP_ORDER_LITTLE)
            w = swap16(w);
        acc = (acc << 16) | (uint64_t)w;
    }
    *bits = acc;
    return 0;
}

static void bits_to_regs(uint64_t bits, unsigned n, hp_order byte_order,
                         hp_order word_order, uint16_t *regs)
{
    for (unsigned i = 0; i < n; i++) {
        uint16_t w = (uint16_t)((bits >> (16u * (n - 1 - i))) & 0xffffu);
        if (byte_order == HP_ORDER_LITTLE)
            w = swap16(w);
        regs[word_order == HP_ORDER_BIG ? i : n - 1 - i] = w;
    }
}

/* 0 on success, -1 on an invalid type or order. */
int hp_decode(const uint16_t *regs, hp_reg_type type, hp_order byte_order,
              hp_order word_order, double *value)
{
    uint64_t bits;
    if (hp_regs_to_bits(regs, type, byte_order, word_order, &bits) != 0)
        return -1;
    switch (type) {
    case HP_INT16:
        /* Two's complement by arithmetic, not by a narrowing conversion. */
        *value = bits >= 0x8000u ? (double)bits - 65536.0 : (double)bits;
        break;
    case HP_UINT16:
    case HP_UINT32:
        *value = (double)bits;
        break;
    case HP_INT32:
        *value = bits >= 0x80000000u ? (double)bits - 4294967296.0 : (double)bits;
        break;
    case HP_FLOAT32: {
        uint32_t b32 = (uint32_t)bits;
        float f;
        memcpy(&f, &b32, sizeof f);
        *value = (double)f;
        break;
    }
    case HP_FLOAT64:
        memcpy(value, &bits, sizeof *value);
        break;
    default:
        return -1;
    }
    return 0;
}

/* Rounds and clamps v to [lo, hi] and returns v - lo, which is exact and
 * non-negative, so the conversion to uint64_t is defined. */
static uint64_t saturate(double v, double lo, double hi)
{
    if (isnan(v))
        v = 0.0;
    v = nearbyint(v);
    if (v < lo)
        v = lo;
    if (v > hi)
        v = hi;
    return (uint64_t)(v - lo);
}

/* 0 on success, -1 on an invalid type or order. */
int hp_encode(double value, hp_reg_type type, hp_order byte_order,
              hp_order word_order, uint16_t *regs)
{
    unsigned n = hp_type_registers(type);
    uint64_t bits;
    if (n == 0 || !orders_valid(byte_order, word_order))
        return -1;
    switch (type) {
    case HP_INT16:
        /* (v + 32768) + 32768 modulo 2^16 is v's two's complement pattern. */
        bits = (saturate(value, -32768.0, 32767.0) + 0x8000u) & 0xffffu;
        break;
    case HP_UINT16:
        bits = saturate(value, 0.0, 65535.0);
        break;
    case HP_INT32:
        bits = (saturate(value, -2147483648.0, 2147483647.0) + 0x80000000u) & 0xffffffffu;
        break;
    case HP_UINT32:
        bits = saturate(value, 0.0, 4294967295.0);
        break;
    case HP_FLOAT32: {
        float f = (float)value;
        uint32_t b32;
        memcpy(&b32, &f, sizeof b32);
        bits = b32;
        break;
    }
    case HP_FLOAT64:
        memcpy(&bits, &value, sizeof bits);
        break;
    default:
        return -1;
    }
    bits_to_regs(bits, n, byte_order, word_order, regs);
    return 0;
}
