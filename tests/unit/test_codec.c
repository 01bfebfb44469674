/* Register codec, point decoding and the read planner.
 * Vectors are hand-computed from IEEE 754 binary32/binary64 bit patterns and
 * two's complement; word/byte orders follow the usual ABCD naming (A = most
 * significant byte). libmodbus 3.1.6's float getters, which are correct
 * (libmodbus 3.1.6: only its setters are wrong), serve as an independent
 * cross-check. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>
#include <modbus.h>

#include "hp_codec.h"
#include "hp_plan.h"
#include "hp_point.h"

#define BIG HP_ORDER_BIG
#define LIT HP_ORDER_LITTLE

typedef struct {
    hp_reg_type type;
    hp_order byte_order, word_order;
    uint16_t regs[4];
    double value;
} vector;

static const vector vectors[] = {
    /* int16 / uint16: one register; word order is irrelevant. */
    {HP_INT16, BIG, BIG, {0xFFFF}, -1.0},
    {HP_INT16, BIG, BIG, {0x8000}, -32768.0},
    {HP_INT16, BIG, BIG, {0x7FFF}, 32767.0},
    {HP_INT16, LIT, BIG, {0x3412}, 0x1234},
    {HP_INT16, LIT, LIT, {0x00FF}, -256.0},        /* bytes FF 00 -> 0xFF00 */
    {HP_UINT16, BIG, BIG, {0xFFFF}, 65535.0},
    {HP_UINT16, LIT, BIG, {0x3412}, 4660.0},
    /* int32 -123456789 = 0xF8A432EB */
    {HP_INT32, BIG, BIG, {0xF8A4, 0x32EB}, -123456789.0},
    {HP_INT32, BIG, LIT, {0x32EB, 0xF8A4}, -123456789.0},
    {HP_INT32, LIT, BIG, {0xA4F8, 0xEB32}, -123456789.0},
    {HP_INT32, LIT, LIT, {0xEB32, 0xA4F8}, -123456789.0},
    {HP_INT32, BIG, BIG, {0x8000, 0x0000}, -2147483648.0},
    /* uint32 4000000000 = 0xEE6B2800 */
    {HP_UINT32, BIG, BIG, {0xEE6B, 0x2800}, 4000000000.0},
    {HP_UINT32, BIG, LIT, {0x2800, 0xEE6B}, 4000000000.0},
    {HP_UINT32, LIT, BIG, {0x6BEE, 0x0028}, 4000000000.0},
    {HP_UINT32, LIT, LIT, {0x0028, 0x6BEE}, 4000000000.0},
    /* float32: 1.0 = 0x3F800000, -2.5 = 0xC0200000, 0.1f = 0x3DCCCCCD */
    {HP_FLOAT32, BIG, BIG, {0x3F80, 0x0000}, 1.0},
    {HP_FLOAT32, BIG, LIT, {0x0000, 0x3F80}, 1.0},
    {HP_FLOAT32, LIT, BIG, {0x803F, 0x0000}, 1.0},
    {HP_FLOAT32, LIT, LIT, {0x0000, 0x803F}, 1.0},
    {HP_FLOAT32, BIG, BIG, {0xC020, 0x0000}, -2.5},
    {HP_FLOAT32, BIG, LIT, {0xCCCD, 0x3DCC}, (double)0.1f},
    {HP_FLOAT32, LIT, LIT, {0xCDCC, 0xCC3D}, (double)0.1f},
    /* float64: 1.5 = 0x3FF8000000000000, -2.25 = 0xC002000000000000,
     * 1214.5 = 0x4092FA0000000000 */
    {HP_FLOAT64, BIG, BIG, {0x3FF8, 0, 0, 0}, 1.5},
    {HP_FLOAT64, BIG, LIT, {0, 0, 0, 0xC002}, -2.25},
    {HP_FLOAT64, LIT, BIG, {0x9240, 0x00FA, 0, 0}, 1214.5},
    {HP_FLOAT64, LIT, LIT, {0, 0, 0x00FA, 0x9240}, 1214.5},
};

static void decode_vectors(void **unused)
{
    (void)unused;
    for (size_t i = 0; i < sizeof vectors / sizeof vectors[0]; i++) {
        const vector *v = &vectors[i];
        double got;
        assert_int_equal(hp_decode(v->regs, v->type, v->byte_order, v->word_order, &got), 0);
        if (got != v->value)
            fail_msg("vector %zu (%s %s/%s): got %.17g want %.17g", i, hp_type_name(v->type),
                     hp_order_name(v->byte_order), hp_order_name(v->word_order), got, v->value);
    }
}

static void encode_vectors(void **unused)
{
    (void)unused;
    for (size_t i = 0; i < sizeof vectors / sizeof vectors[0]; i++) {
        const vector *v = &vectors[i];
        uint16_t regs[4] = {0};
        assert_int_equal(hp_encode(v->value, v->type, v->byte_order, v->word_order, regs), 0);
        assert_memory_equal(regs, v->regs, hp_type_registers(v->type) * sizeof regs[0]);
    }
}

/* Our float32 in each order against libmodbus's getters (ABCD naming). */
static void floats_agree_with_libmodbus(void **unused)
{
    (void)unused;
    srand(7);
    for (int i = 0; i < 2000; i++) {
        float f = (float)((rand() / (double)RAND_MAX - 0.5) * pow(10.0, rand() % 12 - 4));
        uint16_t r[2];
        assert_int_equal(hp_encode(f, HP_FLOAT32, BIG, BIG, r), 0);
        assert_true(modbus_get_float_abcd(r) == f);
        assert_int_equal(hp_encode(f, HP_FLOAT32, BIG, LIT, r), 0);
        assert_true(modbus_get_float_cdab(r) == f);
        assert_int_equal(hp_encode(f, HP_FLOAT32, LIT, BIG, r), 0);
        assert_true(modbus_get_float_badc(r) == f);
        assert_int_equal(hp_encode(f, HP_FLOAT32, LIT, LIT, r), 0);
        assert_true(modbus_get_float_dcba(r) == f);
    }
}

static void round_trips_and_saturation(void **unused)
{
    (void)unused;
    uint16_t r[4];
    double v;
    for (int t = 0; t < HP_TYPE_COUNT; t++)
        for (int bo = 0; bo < 2; bo++)
            for (int wo = 0; wo < 2; wo++) {
                assert_int_equal(hp_encode(-1234.0, (hp_reg_type)t, (hp_order)bo, (hp_order)wo, r), 0);
                assert_int_equal(hp_decode(r, (hp_reg_type)t, (hp_order)bo, (hp_order)wo, &v), 0);
                double want = (t == HP_UINT16 || t == HP_UINT32) ? 0.0 : -1234.0;
                assert_true(v == want);
            }
    assert_int_equal(hp_encode(1e9, HP_INT16, BIG, BIG, r), 0);
    assert_int_equal(r[0], 0x7FFF);
    assert_int_equal(hp_encode(NAN, HP_UINT16, BIG, BIG, r), 0);
    assert_int_equal(r[0], 0);
    assert_int_equal(hp_decode(r, HP_TYPE_COUNT, BIG, BIG, &v), -1);
    assert_int_equal(hp_decode(r, HP_INT16, (hp_order)2, BIG, &v), -1);
}

static hp_point point(hp_reg_type type, double lo, double hi)
{
    hp_point p = {.type = type, .scale = 0.1, .offset = 1.0, .valid_min = lo, .valid_max = hi};
    return p;
}

static void point_qualities(void **unused)
{
    (void)unused;
    hp_sample s;
    hp_point p = point(HP_INT16, 0.0, 50.0);
    uint16_t r[4] = {250};                      /* 250 * 0.1 + 1 = 26 */
    hp_point_decode(&p, r, &s);
    assert_int_equal(s.quality, HP_Q_GOOD);
    assert_true(fabs(s.value - 26.0) < 1e-12);
    r[0] = 1000;                                /* 101 > 50 */
    hp_point_decode(&p, r, &s);
    assert_int_equal(s.quality, HP_Q_OUT_OF_RANGE);
    assert_true(fabs(s.value - 101.0) < 1e-12);
    p.sentinels[0] = -32768;
    p.n_sentinels = 1;
    r[0] = 0x8000;
    hp_point_decode(&p, r, &s);
    assert_int_equal(s.quality, HP_Q_SENTINEL);
    assert_true(isnan(s.value));
    assert_true(s.raw == -32768.0);
    hp_point f = point(HP_FLOAT32, -INFINITY, INFINITY);
    uint16_t nan_regs[2] = {0x7FC0, 0x0000};
    hp_point_decode(&f, nan_regs, &s);
    assert_int_equal(s.quality, HP_Q_DECODE_ERROR);
    uint16_t inf_regs[2] = {0x7F80, 0x0000};
    hp_point_decode(&f, inf_regs, &s);
    assert_int_equal(s.quality, HP_Q_DECODE_ERROR);
    f.sentinels[0] = -9999.0;
    f.n_sentinels = 1;
    assert_int_equal(hp_encode(-9999.0, HP_FLOAT32, BIG, BIG, r), 0);
    hp_point_decode(&f, r, &s);
    assert_int_equal(s.quality, HP_Q_SENTINEL);
    assert_string_equal(hp_quality_name(HP_Q_COMM_FAIL), "comm-fail");
}

/* ---- planner ---- */

static hp_point at(uint8_t unit, hp_table table, uint16_t address, hp_reg_type type)
{
    hp_point p = {.unit_id = unit, .table = table, .address = address, .type = type};
    return p;
}

/* Exhaustive minimum: dp over the sorted points, any block that satisfies
 * both limits. */
static long minimum_reads(const hp_point *pts, const uint32_t *order, size_t n,
                          unsigned max_regs, unsigned max_gap)
{
    long best[n + 1];
    best[0] = 0;
    for (size_t j = 1; j <= n; j++) {
        best[j] = -1;
        for (size_t i = j; i-- > 0;) {
            /* block = order[i .. j) */
            const hp_point *a = &pts[order[i]];
            bool ok = true;
            uint32_t end = (uint32_t)a->address + hp_type_registers(a->type);
            for (size_t k = i + 1; k < j && ok; k++) {
                const hp_point *b = &pts[order[k]];
                ok = b->unit_id == a->unit_id && b->table == a->table &&
                     (b->address <= end || b->address - end <= max_gap);
                uint32_t e = (uint32_t)b->address + hp_type_registers(b->type);
                if (e > end)
                    end = e;
            }
            ok = ok && end - a->address <= max_regs;
            if (ok && best[i] >= 0 && (best[j] < 0 || best[i] + 1 < best[j]))
                best[j] = best[i] + 1;
        }
    }
    return best[n];
}

static void check_plan(const hp_point *pts, size_t n, unsigned max_regs, unsigned max_gap,
                       long expect)
{
    uint32_t which[200] = {0}, order[200] = {0};
    hp_read reads[200];
    memset(reads, 0, sizeof reads);
    assert_true(n <= 200);
    for (size_t i = 0; i < n; i++)
        which[i] = (uint32_t)(n - 1 - i); /* reversed: the planner must sort */
    long nr = hp_plan(pts, which, n, max_regs, max_gap, order, reads);
    assert_true(nr > 0);
    if (expect >= 0)
        assert_int_equal(nr, expect);
    assert_int_equal(nr, minimum_reads(pts, order, n, max_regs, max_gap));
    /* Every point lies inside its read, and reads respect the limit. */
    size_t covered = 0;
    for (long r = 0; r < nr; r++) {
        assert_true(reads[r].count >= 1 && reads[r].count <= max_regs);
        for (uint32_t k = reads[r].first; k < reads[r].first + reads[r].n_points; k++) {
            const hp_point *p = &pts[order[k]];
            assert_int_equal(p->unit_id, reads[r].unit_id);
            assert_int_equal(p->table, reads[r].table);
            assert_true(p->address >= reads[r].start);
            assert_true(p->address + hp_type_registers(p->type) <=
                        (unsigned)reads[r].start + reads[r].count);
            covered++;
        }
    }
    assert_int_equal(covered, n);
}

static void plan_fixed_maps(void **unused)
{
    (void)unused;
    /* The demo's dike PLC: blocks of 10, gap 8 joins them all: 81 registers. */
    hp_point plc[] = {
        at(1, HP_TABLE_HOLDING, 0, HP_UINT16), at(1, HP_TABLE_HOLDING, 1, HP_UINT16),
        at(1, HP_TABLE_HOLDING, 10, HP_UINT16), at(1, HP_TABLE_HOLDING, 20, HP_UINT16),
        at(1, HP_TABLE_HOLDING, 50, HP_FLOAT32), at(1, HP_TABLE_HOLDING, 52, HP_FLOAT32),
        at(1, HP_TABLE_HOLDING, 80, HP_UINT16),
    };
    check_plan(plc, 7, 125, 8, 4);   /* 0..10 (gap 8) | 20 (gap 9) | 50..53 | 80 */
    check_plan(plc, 7, 125, 30, 1);
    check_plan(plc, 7, 125, 0, 5);   /* adjacent points still share a read */
    check_plan(plc, 7, 40, 30, 2);   /* 0..20 ; 50..80 within 40 */
    /* Two units and two tables never share a read. */
    hp_point mixed[] = {
        at(1, HP_TABLE_INPUT, 0, HP_FLOAT32), at(1, HP_TABLE_INPUT, 2, HP_INT16),
        at(2, HP_TABLE_INPUT, 0, HP_FLOAT32), at(2, HP_TABLE_HOLDING, 2, HP_INT16),
        at(2, HP_TABLE_HOLDING, 4, HP_FLOAT64),
    };
    check_plan(mixed, 5, 125, 8, 3);
    /* A long map split by the 125-register limit: 300 consecutive registers. */
    hp_point many[150];
    for (int i = 0; i < 150; i++)
        many[i] = at(1, HP_TABLE_HOLDING, (uint16_t)(2 * i), HP_INT32);
    check_plan(many, 150, 125, 0, 3); /* 124 + 124 + 52 registers */
    /* A point wider than the device's limit cannot be read. */
    uint32_t w = 0, o;
    hp_read rd;
    hp_point wide = at(1, HP_TABLE_HOLDING, 0, HP_FLOAT64);
    assert_int_equal(hp_plan(&wide, &w, 1, 2, 0, &o, &rd), -1);
    assert_int_equal(hp_plan(&wide, &w, 1, 126, 0, &o, &rd), -1);
}

static void plan_random_maps_are_minimal(void **unused)
{
    (void)unused;
    srand(11);
    for (int trial = 0; trial < 300; trial++) {
        size_t n = 1 + (size_t)(rand() % 40);
        hp_point pts[40];
        uint16_t next = (uint16_t)(rand() % 20);
        for (size_t i = 0; i < n; i++) {
            hp_reg_type t = (hp_reg_type)(rand() % HP_TYPE_COUNT);
            pts[i] = at((uint8_t)(1 + rand() % 2), HP_TABLE_HOLDING, next, t);
            next = (uint16_t)(next + hp_type_registers(t) + (unsigned)(rand() % 30));
        }
        check_plan(pts, n, 4 + (unsigned)(rand() % 122), (unsigned)(rand() % 20), -1);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(decode_vectors),
        cmocka_unit_test(encode_vectors),
        cmocka_unit_test(floats_agree_with_libmodbus),
        cmocka_unit_test(round_trips_and_saturation),
        cmocka_unit_test(point_qualities),
        cmocka_unit_test(plan_fixed_maps),
        cmocka_unit_test(plan_random_maps_are_minimal),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
