/* Shorthands for the key tables of plugin/hs_conf_*.c (private to them).
 * ST is the section's object type; every key is written on one line. */
#ifndef HS_CONF_KEYS_H
#define HS_CONF_KEYS_H

#include <stddef.h>

#include "hs_config.h"

#define KEY_STR(nm, st, f, dv, fl, h) \
    {.name = nm, .type = HS_KT_STRING, .offset = offsetof(st, f), \
     .size = sizeof(((st *)0)->f), .def = dv, .flags = fl, .help = h}
#define KEY_PATH(nm, st, f, dv, fl, h) \
    {.name = nm, .type = HS_KT_PATH, .offset = offsetof(st, f), \
     .size = sizeof(((st *)0)->f), .def = dv, .flags = fl, .help = h}
#define KEY_NAME(nm, st, f, fl, h) \
    {.name = nm, .type = HS_KT_NAME, .offset = offsetof(st, f), \
     .size = sizeof(((st *)0)->f), .flags = fl, .help = h}
#define KEY_INT32(nm, st, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_INT32, .offset = offsetof(st, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}
#define KEY_UINT(nm, st, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_UINT, .offset = offsetof(st, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}
#define KEY_U8(nm, st, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_UINT8, .offset = offsetof(st, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}
#define KEY_U16(nm, st, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_UINT16, .offset = offsetof(st, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}
#define KEY_DBL(nm, st, f, unitp, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_DOUBLE, .offset = offsetof(st, f), .unit = unitp, \
     .min = lo, .max = hi, .def = dv, .flags = fl, .help = h}
#define KEY_DUR(nm, st, f, lo, hi, dv, fl, h) \
    {.name = nm, .type = HS_KT_DURATION, .offset = offsetof(st, f), .min = lo, .max = hi, \
     .def = dv, .flags = fl, .help = h}
#define KEY_BOOL(nm, st, f, dv, fl, h) \
    {.name = nm, .type = HS_KT_BOOL, .offset = offsetof(st, f), .def = dv, .flags = fl, \
     .help = h}
#define KEY_ENUM(nm, st, f, namesp, dv, fl, h) \
    {.name = nm, .type = HS_KT_ENUM, .offset = offsetof(st, f), .names = namesp, \
     .def = dv, .flags = fl, .help = h}

#define HS_NO_DEFAULT NULL
#define SEC_MS 1000.0

#endif
