/* The SCADA map: pond-state document -> values -> register block, the
 * scaled int16 copies, the register image's bounds, and the allow-list.
 * Floats are checked through libmodbus 3.1.6's getters, which are correct
 * (only its setters are wrong), as an independent decoder: modbus_get_float_abcd
 * reads high word first (our "big"), modbus_get_float_cdab low word first. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>
#include <cmocka.h>
#include <arpa/inet.h>
#include <modbus.h>

#include "conf_file.h"
#include "hp_netacl.h"
#include "hs_mb_image.h"
#include "hs_scada_map.h"

static size_t point(const char *name)
{
    for (size_t k = 0; k < hs_scada_pond_n_points; k++)
        if (strcmp(hs_scada_pond_points[k].name, name) == 0)
            return k;
    fail_msg("no point %s", name);
    return 0;
}

static json_t *doc(void)
{
    return json_pack("{s:f, s:f, s:f, s:s, s:s, s:s, s:s, s:n, s:s}", "density_kg_m3", 1213.25,
                     "baume", 25.125, "specific_gravity", 1.2119, "stage", "halite",
                     "next_stage", "magnesium-sulfate", "quality", "uncertain", "method",
                     "densitometer", "volume_m3", "time", "2026-03-01T12:00:05.250Z");
}

static void document_to_block(void **state)
{
    (void)state;
    json_t *d = doc();
    hs_scada_pond p;
    hs_scada_pond_clear(&p);
    p.code[HS_CODE_ALARM_BITS] = 0x0009; /* kept across a new document */
    hs_scada_pond_from_doc(&p, d);
    json_decref(d);
    assert_int_equal(p.code[HS_CODE_ALARM_BITS], 0x0009);
    assert_int_equal(p.code[HS_CODE_STAGE], 4);      /* halite */
    assert_int_equal(p.code[HS_CODE_NEXT_STAGE], 5); /* magnesium-sulfate */
    assert_int_equal(p.code[HS_CODE_QUALITY], 1);
    assert_int_not_equal(p.code[HS_CODE_METHOD], 0);
    assert_int_equal(p.time_s, 1772366405u); /* date -u -d 2026-03-01T12:00:05 +%s */
    assert_true(isnan(p.number[point("volume_m3")])); /* null -> unknown */

    uint16_t big[HS_MAP_POND_SIZE], little[HS_MAP_POND_SIZE];
    hs_mb_pond_block(&p, HP_ORDER_BIG, big);
    hs_mb_pond_block(&p, HP_ORDER_LITTLE, little);
    size_t k = point("density_kg_m3");
    assert_float_equal(modbus_get_float_abcd(big + 2 * k), 1213.25, 0);
    assert_float_equal(modbus_get_float_cdab(little + 2 * k), 1213.25, 0);
    k = point("baume");
    assert_float_equal(modbus_get_float_abcd(big + 2 * k), 25.125, 0);
    assert_int_equal((int16_t)big[HS_MAP_INT16_OFFSET + k], 2512); /* 2512.5: half to even */
    k = point("volume_m3");
    assert_true(isnan(modbus_get_float_abcd(big + 2 * k)));
    assert_int_equal((int16_t)big[HS_MAP_INT16_OFFSET + k], HS_MAP_INT16_UNKNOWN);
    assert_int_equal(big[HS_MAP_CODE_OFFSET + HS_CODE_STAGE], 4);
    /* uint32 time: high word first in big, low word first in little */
    assert_int_equal(big[HS_MAP_CODE_OFFSET + HS_CODE_TIME_HI], 1772366405u >> 16);
    assert_int_equal(little[HS_MAP_CODE_OFFSET + HS_CODE_TIME_HI], 1772366405u & 0xFFFF);
}

static void scaled_copies_saturate(void **state)
{
    (void)state;
    assert_int_equal(hs_scada_scaled(1e9, 1), 32767);
    assert_int_equal(hs_scada_scaled(-1e9, 1), -32767);
    assert_int_equal(hs_scada_scaled(NAN, 10), HS_MAP_INT16_UNKNOWN);
    assert_int_equal(hs_scada_scaled(-1.25, 10), -12); /* round half to even */
    assert_int_equal(hs_scada_scaled(1213.26, 10), 12133);
}

static void codes(void **state)
{
    (void)state;
    assert_int_equal(hs_scada_stage_code("seawater"), 1);
    assert_int_equal(hs_scada_stage_code("bischofite"), 7);
    assert_int_equal(hs_scada_stage_code("lava"), 0);
    assert_int_equal(hs_scada_stage_code(NULL), 0);
    assert_int_equal(hs_scada_quality_code("good"), 0);
    assert_int_equal(hs_scada_quality_code("bad"), 3);
    assert_int_equal(hs_scada_quality_code("???"), 3);
}

static void image_bounds_and_site_block(void **state)
{
    (void)state;
    hs_mb_image *im = hs_mb_image_new(3, 2, HP_ORDER_BIG);
    assert_non_null(im);
    uint16_t regs[125];
    assert_int_equal(hs_mb_image_read(im, 0, 12, regs), 0);
    assert_int_equal(regs[0], HS_MAP_VERSION);
    assert_int_equal(regs[2], 3);
    assert_int_equal(regs[3], 2);
    assert_float_equal(modbus_get_float_abcd(regs + 10), 1234.5, 0);
    assert_int_equal(hs_mb_image_read(im, 100, 2, regs), 0);
    assert_int_equal(regs[0], 0xFFFF); /* no advice yet */
    /* last pond's block ends at 1000 + 3 * 100 */
    assert_int_equal(hs_mb_image_read(im, 1200, 100, regs), 0);
    assert_int_equal(hs_mb_image_read(im, 1201, 100, regs), 2);
    hs_mb_image_beat(im, 1000);
    hs_mb_image_beat(im, 1001);
    assert_int_equal(hs_mb_image_read(im, 4, 4, regs), 0);
    assert_int_equal(regs[1], 2);
    assert_int_equal(regs[3], 1001);
    hs_scada_transfer t = {.advice = 1, .pump_on = 1, .reasons = 0x10200};
    hs_mb_image_transfer(im, 1, &t);
    assert_int_equal(hs_mb_image_read(im, 108, 4, regs), 0);
    assert_int_equal(regs[0], 1);
    assert_int_equal(regs[1], 1);
    assert_int_equal(regs[2], 0x0001);
    assert_int_equal(regs[3], 0x0200);
    hs_mb_image_free(im);
    assert_null(hs_mb_image_new(HS_MAP_POND_MAX + 1, 0, HP_ORDER_BIG));
}

static struct sockaddr_in v4(const char *a)
{
    struct sockaddr_in s = {.sin_family = AF_INET};
    inet_pton(AF_INET, a, &s.sin_addr);
    return s;
}

static void allow_list(void **state)
{
    (void)state;
    hp_acl acl;
    char err[160];
    assert_int_equal(hp_acl_parse("127.0.0.1, 10.20.0.0/16 fd00::/8", &acl, err, sizeof err), 0);
    assert_int_equal(acl.n, 3);
    struct sockaddr_in a = v4("10.20.255.1"), b = v4("10.21.0.1"), c = v4("127.0.0.1");
    assert_true(hp_acl_allows(&acl, (struct sockaddr *)&a));
    assert_false(hp_acl_allows(&acl, (struct sockaddr *)&b));
    assert_true(hp_acl_allows(&acl, (struct sockaddr *)&c));
    struct sockaddr_in6 m = {.sin6_family = AF_INET6};
    inet_pton(AF_INET6, "::ffff:10.20.3.4", &m.sin6_addr); /* IPv4 on an IPv6 socket */
    assert_true(hp_acl_allows(&acl, (struct sockaddr *)&m));
    inet_pton(AF_INET6, "fd12::1", &m.sin6_addr);
    assert_true(hp_acl_allows(&acl, (struct sockaddr *)&m));
    inet_pton(AF_INET6, "fe80::1", &m.sin6_addr);
    assert_false(hp_acl_allows(&acl, (struct sockaddr *)&m));
    assert_int_equal(hp_acl_parse("", &acl, err, sizeof err), 0);
    assert_true(hp_acl_allows(&acl, (struct sockaddr *)&b)); /* empty: everyone */
    assert_int_equal(hp_acl_parse("10.0.0.0/33", &acl, err, sizeof err), -1);
    assert_non_null(strstr(err, "prefix"));
    assert_int_equal(hp_acl_parse("gateway.local", &acl, err, sizeof err), -1);
    struct sockaddr_storage ss;
    socklen_t len;
    assert_int_equal(hp_listen_parse("[::1]:1502", &ss, &len, err, sizeof err), 0);
    assert_int_equal(ss.ss_family, AF_INET6);
    assert_int_equal(hp_listen_parse("127.0.0.1:0", &ss, &len, err, sizeof err), -1);
    assert_int_equal(hp_listen_parse("::1:1502", &ss, &len, err, sizeof err), -1);
}

/* The two sections' own checks, each naming the file and line. */
static void config_errors(void **state)
{
    (void)state;
    conf_dir cd;
    assert_int_equal(conf_dir_make(&cd, "scada"), 0);
    conf_expect_error(&cd, CONF_BASE_TWO_PONDS "[modbus_server]\nlisten = 0.0.0.0\n", 37,
                      "listen: '0.0.0.0': expected ADDRESS:PORT");
    conf_expect_error(&cd, CONF_BASE_TWO_PONDS "[modbus_server]\nlisten = plc.local:1502\n", 37,
                      "must be numeric");
    conf_expect_error(&cd,
                      CONF_BASE_TWO_PONDS "[modbus_server]\nlisten = 127.0.0.1:1502\n"
                                          "allow = 10.0.0.0/40\n",
                      38, "allow: '10.0.0.0/40': prefix length out of range");
    conf_expect_error(&cd, CONF_BASE_TWO_PONDS "[modbus_server]\nlisten = 127.0.0.1:1502\n"
                                               "word_order = middle\n", 38, "word_order");
    conf_expect_error(&cd, CONF_BASE_TWO_PONDS "[sparkplug]\ngroup_id = g\nedge_node_id = e\n",
                      36, "[sparkplug] needs the [mqtt] section");
    conf_expect_error(&cd,
                      CONF_BASE_TWO_PONDS "[mqtt]\nuri = mqtt://127.0.0.1:1883\n"
                                          "[sparkplug]\ngroup_id = g/h\nedge_node_id = e\n",
                      39, "group_id: 'g/h' must be one topic level");
    conf_expect_error(&cd,
                      CONF_BASE_TWO_PONDS "[mqtt]\nuri = mqtt://127.0.0.1:1883\nclient_id = gw\n"
                                          "[sparkplug]\ngroup_id = g\nedge_node_id = e\n"
                                          "client_id = gw\n",
                      42, "client_id: must differ");
    conf_dir_remove(&cd, NULL);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(document_to_block),
        cmocka_unit_test(scaled_copies_saturate),
        cmocka_unit_test(codes),
        cmocka_unit_test(image_bounds_and_site_block),
        cmocka_unit_test(allow_list),
        cmocka_unit_test(config_errors),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
