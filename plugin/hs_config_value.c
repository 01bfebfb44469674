/* Value parsers and unit tables of the configuration reader. Numbers go
 * through strtod/strtol with every error checked (no atoi): the whole text
 * must be used, overflow and NaN are refused. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hc_baume.h"
#include "hc_brine_density.h"
#include "hs_config.h"

/* Conversions to SI. Exact by definition unless noted. */
static const hs_unit length_units[] = {
    {"m", 1.0, 0.0}, {"cm", 0.01, 0.0}, {"mm", 0.001, 0.0}, {NULL, 0, 0}};
static const hs_unit area_units[] = {
    {"m2", 1.0, 0.0}, {"ha", 1.0e4, 0.0}, {"km2", 1.0e6, 0.0}, {NULL, 0, 0}};
static const hs_unit density_units[] = {
    {"kg/m3", 1.0, 0.0}, {"g/cm3", 1000.0, 0.0}, {"g/mL", 1000.0, 0.0},
    {"g/L", 1.0, 0.0}, {NULL, 0, 0}};
/* Temperatures are degC on ITS-90 throughout; t_C = (t_F - 32) * 5/9. */
static const hs_unit temperature_units[] = {
    {"C", 1.0, 0.0}, {"degC", 1.0, 0.0}, {"F", 5.0 / 9.0, -160.0 / 9.0},
    {"degF", 5.0 / 9.0, -160.0 / 9.0}, {NULL, 0, 0}};
static const hs_unit angle_units[] = {{"deg", 1.0, 0.0}, {NULL, 0, 0}};
/* Pressure in Pa. 1 mH2O = 9806.65 Pa is the conventional metre of water
 * (water 1000 kg/m3 under standard gravity 9.80665 m/s2, CGPM 1901). */
static const hs_unit pressure_units[] = {
    {"Pa", 1.0, 0.0}, {"kPa", 1.0e3, 0.0}, {"mbar", 100.0, 0.0},
    {"bar", 1.0e5, 0.0}, {"dbar", 1.0e4, 0.0}, {"mH2O", 9806.65, 0.0},
    {"psi", 6894.757293168, 0.0}, {NULL, 0, 0}};
/* Conductivity in mS/cm, the unit of PSS-78's C(35,15,0) = 42.914 mS/cm. */
static const hs_unit conductivity_units[] = {
    {"mS/cm", 1.0, 0.0}, {"uS/cm", 0.001, 0.0}, {"S/m", 10.0, 0.0},
    {"mS/m", 0.01, 0.0}, {NULL, 0, 0}};
/* Rain depth in m. */
static const hs_unit rain_units[] = {
    {"mm", 0.001, 0.0}, {"m", 1.0, 0.0}, {NULL, 0, 0}};
static const hs_unit state_units[] = {{"state", 1.0, 0.0}, {NULL, 0, 0}};
/* Relative humidity as a fraction; wind in m/s; irradiance in W/m2. */
static const hs_unit humidity_units[] = {{"%", 0.01, 0.0}, {"fraction", 1.0, 0.0}, {NULL, 0, 0}};
static const hs_unit speed_units[] = {
    {"m/s", 1.0, 0.0}, {"km/h", 1.0 / 3.6, 0.0}, {NULL, 0, 0}};
static const hs_unit irradiance_units[] = {{"W/m2", 1.0, 0.0}, {NULL, 0, 0}};

const hs_unit_kind hs_unit_length = {"length", length_units, false};
const hs_unit_kind hs_unit_area = {"area", area_units, false};
const hs_unit_kind hs_unit_density = {"density", density_units, false};
const hs_unit_kind hs_unit_density_ref = {"density at the reference temperature",
                                          density_units, false};
const hs_unit_kind hs_unit_temperature = {"temperature", temperature_units, false};
const hs_unit_kind hs_unit_angle = {"angle", angle_units, true};
const hs_unit_kind hs_unit_pressure = {"pressure", pressure_units, false};
const hs_unit_kind hs_unit_conductivity = {"conductivity", conductivity_units, false};
const hs_unit_kind hs_unit_rain = {"rain depth", rain_units, false};
const hs_unit_kind hs_unit_state = {"state", state_units, true};
const hs_unit_kind hs_unit_humidity = {"relative humidity", humidity_units, false};
const hs_unit_kind hs_unit_speed = {"speed", speed_units, false};
const hs_unit_kind hs_unit_irradiance = {"irradiance", irradiance_units, false};

const hs_unit *hs_unit_find(const hs_unit_kind *kind, const char *name)
{
    for (const hs_unit *u = kind->units; u->name; u++)
        if (strcmp(u->name, name) == 0)
            return u;
    return NULL;
}

/* 0, or -1 with a reason. */
int hs_parse_double(const char *text, double *out, char *msg, size_t len)
{
    char *end;
    errno = 0;
    double v = strtod(text, &end);
    if (end == text) {
        snprintf(msg, len, "'%s' is not a number", text);
        return -1;
    }
    while (isspace((unsigned char)*end))
        end++;
    if (*end != '\0') {
        snprintf(msg, len, "unexpected '%s' after the number", end);
        return -1;
    }
    if (errno == ERANGE && fabs(v) > 1.0) {
        snprintf(msg, len, "'%s' is out of range", text);
        return -1;
    }
    if (!isfinite(v)) {
        snprintf(msg, len, "'%s' is not a finite number", text);
        return -1;
    }
    *out = v;
    return 0;
}

/* 0, or -1 with a reason. */
int hs_parse_long(const char *text, long *out, char *msg, size_t len)
{
    char *end;
    errno = 0;
    /* Decimal, or hexadecimal with 0x; never octal ("010" is ten). */
    int base = (text[0] == '0' && (text[1] == 'x' || text[1] == 'X')) ? 16 : 10;
    long v = strtol(text, &end, base);
    if (end == text) {
        snprintf(msg, len, "'%s' is not an integer", text);
        return -1;
    }
    while (isspace((unsigned char)*end))
        end++;
    if (*end != '\0') {
        snprintf(msg, len, "unexpected '%s' after the integer", end);
        return -1;
    }
    if (errno == ERANGE) {
        snprintf(msg, len, "'%s' is out of range", text);
        return -1;
    }
    *out = v;
    return 0;
}

/* Splits "12.5 m" into the number and the unit text (may be empty). */
static int split_number(const char *text, double *v, const char **unit,
                        char *msg, size_t len)
{
    char *end;
    errno = 0;
    *v = strtod(text, &end);
    if (end == text) {
        snprintf(msg, len, "'%s' is not a number", text);
        return -1;
    }
    if ((errno == ERANGE && fabs(*v) > 1.0) || !isfinite(*v)) {
        snprintf(msg, len, "'%s' is not a finite number in range", text);
        return -1;
    }
    while (isspace((unsigned char)*end))
        end++;
    *unit = end;
    return 0;
}

static void list_units(const hs_unit_kind *kind, char *buf, size_t len)
{
    size_t used = 0;
    buf[0] = '\0';
    for (const hs_unit *u = kind->units; u->name && used < len; u++) {
        int n = snprintf(buf + used, len - used, "%s%s", used ? ", " : "", u->name);
        if (n < 0)
            break;
        used += (size_t)n;
    }
}

/* 0, or -1 with a reason. *si is in the kind's first unit. */
int hs_parse_quantity(const char *text, const hs_unit_kind *kind, double *si,
                      char *msg, size_t len)
{
    double v;
    const char *unit;
    char names[160];
    if (split_number(text, &v, &unit, msg, len) != 0)
        return -1;
    if (*unit == '\0') {
        if (kind->bare_ok) {
            *si = v;
            return 0;
        }
        list_units(kind, names, sizeof names);
        snprintf(msg, len, "'%s' needs a unit of %s (%s)", text, kind->what, names);
        return -1;
    }
    const hs_unit *u = hs_unit_find(kind, unit);
    if (!u) {
        list_units(kind, names, sizeof names);
        snprintf(msg, len, "unknown unit '%s' for a %s (use %s)", unit, kind->what, names);
        return -1;
    }
    *si = v * u->factor + u->offset;
    return 0;
}

/* 0, or -1 with a reason. */
int hs_parse_duration_ms(const char *text, int64_t *ms, char *msg, size_t len)
{
    static const struct { const char *name; double ms; } units[] = {
        {"ms", 1.0}, {"s", 1e3}, {"min", 60e3}, {"h", 3600e3}, {"d", 86400e3},
    };
    double v;
    const char *unit;
    if (split_number(text, &v, &unit, msg, len) != 0)
        return -1;
    if (*unit == '\0') {
        snprintf(msg, len, "'%s' needs a unit (ms, s, min, h, d)", text);
        return -1;
    }
    for (size_t i = 0; i < sizeof units / sizeof units[0]; i++) {
        if (strcmp(unit, units[i].name) != 0)
            continue;
        double total = v * units[i].ms;
        if (total < 0 || total > 9.0e15) {
            snprintf(msg, len, "duration '%s' is out of range", text);
            return -1;
        }
        *ms = (int64_t)llround(total);
        return 0;
    }
    snprintf(msg, len, "unknown duration unit '%s' (use ms, s, min, h, d)", unit);
    return -1;
}

/* 0, or -1 with a reason. */
int hs_parse_bool(const char *text, bool *out, char *msg, size_t len)
{
    static const char *const yes[] = {"yes", "true", "on", "1"};
    static const char *const no[] = {"no", "false", "off", "0"};
    for (size_t i = 0; i < 4; i++) {
        if (strcmp(text, yes[i]) == 0) { *out = true; return 0; }
        if (strcmp(text, no[i]) == 0) { *out = false; return 0; }
    }
    snprintf(msg, len, "'%s' is not yes or no", text);
    return -1;
}

/* The trade's spellings of the two scales without a unit of density. */
static hs_dref_scale dref_scale_of(const char *unit, int *known)
{
    static const char *const sg[] = {"SG", "sg"};
    static const char *const be[] = {"Be", "degBe", "\xc2\xb0" "Be", "B\xc3\xa9",
                                     "\xc2\xb0" "B\xc3\xa9", "deg Be"};
    *known = 1;
    for (size_t i = 0; i < sizeof sg / sizeof sg[0]; i++)
        if (strcmp(unit, sg[i]) == 0)
            return HS_DREF_SG;
    for (size_t i = 0; i < sizeof be / sizeof be[0]; i++)
        if (strcmp(unit, be[i]) == 0)
            return HS_DREF_BAUME;
    *known = 0;
    return HS_DREF_KG_M3;
}

/* 0, or -1 with a reason. */
int hs_parse_density_ref(const char *text, double *v, hs_dref_scale *scale, char *msg,
                         size_t len)
{
    double x;
    const char *unit;
    if (split_number(text, &x, &unit, msg, len) != 0)
        return -1;
    if (*unit == '\0') {
        snprintf(msg, len, "'%s' is ambiguous: a density at the reference temperature needs "
                 "its scale, e.g. 1.210 SG, 25.5 Be or 1210 kg/m3", text);
        return -1;
    }
    int known;
    *scale = dref_scale_of(unit, &known);
    if (known) {
        *v = x;
        return 0;
    }
    const hs_unit *u = hs_unit_find(&hs_unit_density_ref, unit);
    if (u == NULL) {
        snprintf(msg, len, "unknown unit '%s' for a density at the reference temperature "
                 "(use kg/m3, g/cm3, g/mL, g/L, SG or Be)", unit);
        return -1;
    }
    *v = x * u->factor + u->offset;
    return 0;
}

/* 0, or -1 with a reason. */
int hs_density_ref_to_kg_m3(double v, hs_dref_scale scale, double t_ref_c, double modulus,
                            double *kg_m3, char *msg, size_t len)
{
    double sg = v;
    if (scale == HS_DREF_KG_M3) {
        *kg_m3 = v;
        return 0;
    }
    if (scale == HS_DREF_BAUME && hc_sg_from_baume(v, modulus, &sg) != HC_OK) {
        snprintf(msg, len, "%g Be is not on the heavy-liquid scale of modulus %g "
                 "(0 <= Be < modulus)", v, modulus);
        return -1;
    }
    if (!(sg >= 0.9 && sg <= 1.6)) {
        snprintf(msg, len, "SG %g is not a brine's specific gravity (0.9 to 1.6)", sg);
        return -1;
    }
    /* rho(t_ref) = SG rho_w(t_ref), rho_w by Laliberte & Cooper 2004 eq. 8
     * as the brine states use [kg/m3] */
    *kg_m3 = sg * hc_water_density_lc(t_ref_c);
    return 0;
}
