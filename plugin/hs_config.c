/* The configuration reader's engine: file reading, section dispatch, key
 * tables, defaults, duplicates, required keys and the final passes. The
 * section types themselves live in plugin/hs_conf_*.c.
 *
 * libinih reads key = value lines. Debian's build calls the handler without
 * a line number, so the file is fed to ini_parse_stream() line by line
 * through our own reader, which knows the current line. The reader also
 * handles section headers itself (inih calls nobody for an empty section)
 * and strips leading blanks, so that inih never joins indented lines into a
 * multi-line value. */
#include <errno.h>
#include <ini.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_config.h"
#include "hs_suggest.h"

#define LINE_MAX_CHARS 190        /* inih's stack buffer is 200 with CR, LF, NUL */
#define FILE_MAX_BYTES (4u << 20) /* a site file is a few kB; refuse a runaway */

typedef struct {
    const hs_section_type *type;
    int index;                    /* in the type's array */
    int line;                     /* of the header */
    char name[2 * HS_NAME_MAX];
    size_t first_set, n_set;      /* its rows in cfg->sets */
} obj_rec;

typedef struct {
    const hs_key *key;
    int line;
} set_rec;

/* A reference density written as SG or degree Baume, converted once [site]
 * (reference temperature, modulus) is known. */
typedef struct {
    const hs_key *key;
    const hs_section_type *type;
    int index;
    int line;
    double value;
    hs_dref_scale scale;
} dref_rec;

struct hs_cfg {
    const char *path;
    hs_site *site;
    hs_diag *diag;
    unsigned errors;
    int line;                     /* line being read */
    char *text;                   /* the whole file */
    size_t pos, size;
    obj_rec *objs; size_t n_objs;
    set_rec *sets; size_t n_sets;
    dref_rec *drefs; size_t n_drefs;
    int cur;                      /* current object record, -1 = none */
    bool in_bad_section;          /* keys of a rejected section are skipped */
    bool oom;
};

void hs_cfg_error(hs_cfg *cfg, int line, const char *fmt, ...)
{
    char text[HS_DIAG_LEN - 64];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(text, sizeof text, fmt, ap);
    va_end(ap);
    cfg->errors++;
    if (cfg->diag->n >= HS_DIAG_MAX) {
        cfg->diag->dropped++;
        return;
    }
    char *out = cfg->diag->msg[cfg->diag->n++];
    /* A long path shortens the message; that is acceptable. */
    int n = line > 0 ? snprintf(out, HS_DIAG_LEN, "%s:%d: %s", cfg->path, line, text)
                     : snprintf(out, HS_DIAG_LEN, "%s: %s", cfg->path, text);
    if (n < 0)
        out[0] = '\0';
}

int hs_cfg_line(const hs_cfg *cfg)
{
    return cfg->line;
}

static const obj_rec *find_obj(const hs_cfg *cfg, const hs_section_type *type, size_t index)
{
    for (size_t i = 0; i < cfg->n_objs; i++)
        if (cfg->objs[i].type == type && cfg->objs[i].index == (int)index)
            return &cfg->objs[i];
    return NULL;
}

int hs_cfg_key_line(const hs_cfg *cfg, const hs_section_type *type, size_t index,
                    const char *key)
{
    const obj_rec *o = find_obj(cfg, type, index);
    if (!o)
        return 0;
    for (size_t i = o->first_set; i < o->first_set + o->n_set; i++)
        if (strcmp(cfg->sets[i].key->name, key) == 0)
            return cfg->sets[i].line;
    return 0;
}

int hs_cfg_where(const hs_cfg *cfg, const hs_section_type *type, size_t index,
                 const char *key)
{
    int line = hs_cfg_key_line(cfg, type, index, key);
    if (line == 0) {
        const obj_rec *o = find_obj(cfg, type, index);
        line = o ? o->line : 0;
    }
    return line;
}

/* Index of the new zeroed element, or -1 when out of memory. */
int hs_cfg_grow(void **array, size_t *count, size_t elem)
{
    void *p = realloc(*array, (*count + 1) * elem);
    if (!p)
        return -1;
    memset((char *)p + *count * elem, 0, elem);
    *array = p;
    return (int)(*count)++;
}

/* ---- values ---- */

static bool name_valid(const char *s, bool dot_ok)
{
    if (*s == '\0')
        return false;
    for (; *s; s++) {
        char c = *s;
        bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
                  (c >= '0' && c <= '9') || c == '-' || c == '_' || (dot_ok && c == '.');
        if (!ok)
            return false;
    }
    return true;
}

static int check_bounds(const hs_key *key, double v, char *msg, size_t len)
{
    if (!(key->min < key->max))
        return 0;
    const char *u = key->type == HS_KT_DURATION ? " ms"
                    : (key->type == HS_KT_DOUBLE && key->unit) ? " " : "";
    const char *un = (key->type == HS_KT_DOUBLE && key->unit) ? key->unit->units[0].name : "";
    if (v < key->min) {
        snprintf(msg, len, "%g%s%s is below the minimum %g%s%s", v, u, un, key->min, u, un);
        return -1;
    }
    if (v > key->max) {
        snprintf(msg, len, "%g%s%s is above the maximum %g%s%s", v, u, un, key->max, u, un);
        return -1;
    }
    return 0;
}

static int parse_unit_list(const hs_key *key, const char *text, uint8_t *out,
                           unsigned *count, char *msg, size_t len)
{
    char buf[LINE_MAX_CHARS + 1];
    unsigned n = 0;
    snprintf(buf, sizeof buf, "%s", text);
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok;
         tok = strtok_r(NULL, ",", &save)) {
        long lo, hi;
        char *dash = strchr(tok, '-');
        if (dash && dash != tok) {
            *dash = '\0';
            if (hs_parse_long(tok, &lo, msg, len) || hs_parse_long(dash + 1, &hi, msg, len))
                return -1;
        } else {
            if (hs_parse_long(tok, &lo, msg, len))
                return -1;
            hi = lo;
        }
        if (lo > hi || lo < (long)key->min || hi > (long)key->max) {
            snprintf(msg, len, "unit id range %ld-%ld is outside %g..%g", lo, hi,
                     key->min, key->max);
            return -1;
        }
        for (long v = lo; v <= hi; v++) {
            for (unsigned i = 0; i < n; i++)
                if (out[i] == v) {
                    snprintf(msg, len, "unit id %ld is listed twice", v);
                    return -1;
                }
            if (n >= key->size) {
                snprintf(msg, len, "more than %zu unit ids", key->size);
                return -1;
            }
            out[n++] = (uint8_t)v;
        }
    }
    if (n == 0) {
        snprintf(msg, len, "the list is empty");
        return -1;
    }
    *count = n;
    return 0;
}

static int parse_double_list(const hs_key *key, const char *text, double *out,
                             unsigned *count, char *msg, size_t len)
{
    char buf[LINE_MAX_CHARS + 1];
    unsigned n = 0;
    snprintf(buf, sizeof buf, "%s", text);
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok;
         tok = strtok_r(NULL, ",", &save)) {
        while (*tok == ' ' || *tok == '\t')
            tok++;
        if (n >= key->size) {
            snprintf(msg, len, "more than %zu values", key->size);
            return -1;
        }
        if (hs_parse_double(tok, &out[n], msg, len))
            return -1;
        n++;
    }
    *count = n;
    return 0;
}

/* Stores TEXT into the object per the key's type. 0, or -1 with a reason. */
static int store_value(hs_cfg *cfg, const hs_key *key, void *obj, const char *text,
                       char *msg, size_t len)
{
    char *field = (char *)obj + key->offset;
    switch (key->type) {
    case HS_KT_STRING:
    case HS_KT_NAME:
        if (strlen(text) >= key->size) {
            snprintf(msg, len, "longer than %zu characters", key->size - 1);
            return -1;
        }
        if (key->type == HS_KT_NAME && !name_valid(text, false)) {
            snprintf(msg, len, "'%s' is not a name (letters, digits, '-', '_')", text);
            return -1;
        }
        memcpy(field, text, strlen(text) + 1);
        break;
    case HS_KT_PATH: {
        int n;
        if (*text == '\0') {
            snprintf(msg, len, "empty path");
            return -1;
        }
        if (text[0] == '/' || cfg->site->dir[0] == '\0')
            n = snprintf(field, key->size, "%s", text);
        else
            n = snprintf(field, key->size, "%s/%s", cfg->site->dir, text);
        if (n < 0 || (size_t)n >= key->size) {
            snprintf(msg, len, "path longer than %zu characters", key->size - 1);
            return -1;
        }
        break;
    }
    case HS_KT_INT:
    case HS_KT_INT32:
    case HS_KT_UINT:
    case HS_KT_UINT8:
    case HS_KT_UINT16: {
        long v;
        if (hs_parse_long(text, &v, msg, len) || check_bounds(key, (double)v, msg, len))
            return -1;
        if (key->type == HS_KT_INT)
            *(long *)(void *)field = v;
        else if (key->type == HS_KT_INT32)
            *(int *)(void *)field = (int)v;
        else if (key->type == HS_KT_UINT8)
            *(uint8_t *)(void *)field = (uint8_t)v;
        else if (key->type == HS_KT_UINT16)
            *(uint16_t *)(void *)field = (uint16_t)v;
        else
            *(unsigned *)(void *)field = (unsigned)v;
        break;
    }
    case HS_KT_DOUBLE: {
        double v;
        if (key->unit == &hs_unit_density_ref) {
            hs_dref_scale scale;
            if (hs_parse_density_ref(text, &v, &scale, msg, len) != 0)
                return -1;
            if (scale != HS_DREF_KG_M3) {
                if (cfg->cur < 0) {
                    snprintf(msg, len, "internal: SG or Be outside a section");
                    return -1;
                }
                int r = hs_cfg_grow((void **)&cfg->drefs, &cfg->n_drefs, sizeof cfg->drefs[0]);
                if (r < 0) {
                    cfg->oom = true;
                    return 0;
                }
                cfg->drefs[r] = (dref_rec){key, cfg->objs[cfg->cur].type,
                                           cfg->objs[cfg->cur].index, cfg->line, v, scale};
                *(double *)(void *)field = NAN; /* until [site] is known */
                break;
            }
            if (check_bounds(key, v, msg, len))
                return -1;
            *(double *)(void *)field = v;
            break;
        }
        int rc = key->unit ? hs_parse_quantity(text, key->unit, &v, msg, len)
                           : hs_parse_double(text, &v, msg, len);
        if (rc || check_bounds(key, v, msg, len))
            return -1;
        *(double *)(void *)field = v;
        break;
    }
    case HS_KT_DURATION: {
        int64_t v;
        if (hs_parse_duration_ms(text, &v, msg, len) || check_bounds(key, (double)v, msg, len))
            return -1;
        *(int64_t *)(void *)field = v;
        break;
    }
    case HS_KT_BOOL:
        if (hs_parse_bool(text, (bool *)(void *)field, msg, len))
            return -1;
        break;
    case HS_KT_ENUM: {
        size_t used = 0;
        char opts[200] = "";
        for (int i = 0; key->names[i]; i++) {
            if (strcmp(key->names[i], text) == 0) {
                *(int *)(void *)field = i;
                goto checked;
            }
            int n = snprintf(opts + used, sizeof opts - used, "%s%s", i ? ", " : "",
                             key->names[i]);
            if (n > 0 && (size_t)n < sizeof opts - used)
                used += (size_t)n;
        }
        snprintf(msg, len, "'%s' is not one of: %s", text, opts);
        return -1;
    }
    case HS_KT_UNIT_LIST:
        if (parse_unit_list(key, text, (uint8_t *)field,
                            (unsigned *)(void *)((char *)obj + key->count_offset), msg, len))
            return -1;
        break;
    case HS_KT_DOUBLE_LIST:
        if (parse_double_list(key, text, (double *)(void *)field,
                              (unsigned *)(void *)((char *)obj + key->count_offset), msg, len))
            return -1;
        break;
    }
checked:
    if (key->check && key->check(obj, msg, len) != 0)
        return -1;
    return 0;
}

/* ---- sections ---- */

static const hs_section_type *type_named(const char *kind)
{
    for (size_t i = 0; hs_section_types[i]; i++)
        if (strcmp(hs_section_types[i]->kind, kind) == 0)
            return hs_section_types[i];
    return NULL;
}

static void known_sections(char *buf, size_t len)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; hs_section_types[i] && used < len; i++) {
        int n = snprintf(buf + used, len - used, "%s%s", i ? ", " : "",
                         hs_section_types[i]->kind);
        if (n < 0)
            break;
        used += (size_t)n;
    }
}

static void apply_defaults(hs_cfg *cfg, const hs_section_type *type, void *obj)
{
    char msg[200];
    for (const hs_key *k = type->keys; k->name; k++) {
        if (!k->def)
            continue;
        if (store_value(cfg, k, obj, k->def, msg, sizeof msg) != 0)
            hs_cfg_error(cfg, cfg->line, "internal: default of '%s' in [%s]: %s",
                         k->name, type->kind, msg);
    }
}

/* HEADER is the text between [ and ]. */
static void begin_section(hs_cfg *cfg, char *header)
{
    char known[200];
    char *name = NULL;
    char *sp;

    cfg->cur = -1;
    cfg->in_bad_section = true;
    while (*header == ' ' || *header == '\t')
        header++;
    sp = strpbrk(header, " \t");
    if (sp) {
        *sp = '\0';
        name = sp + 1;
        while (*name == ' ' || *name == '\t')
            name++;
        char *end = name + strlen(name);
        while (end > name && (end[-1] == ' ' || end[-1] == '\t'))
            *--end = '\0';
        if (*name == '\0')
            name = NULL;
    }
    const char *kind = header;
    const hs_section_type *type = type_named(kind);
    if (!type) {
        hs_suggest sg;
        char hint[96];
        hs_suggest_init(&sg, kind);
        for (size_t t = 0; hs_section_types[t]; t++)
            hs_suggest_offer(&sg, hs_section_types[t]->kind);
        known_sections(known, sizeof known);
        hs_cfg_error(cfg, cfg->line, "unknown section [%s]%s (known: %s)", kind,
                     hs_suggest_text(&sg, hint, sizeof hint), known);
        return;
    }
    if (type->named && !name) {
        hs_cfg_error(cfg, cfg->line, "section [%s] needs a name: [%s NAME]", kind, kind);
        return;
    }
    if (!type->named && name) {
        hs_cfg_error(cfg, cfg->line, "section [%s] takes no name (found '%s')", kind, name);
        return;
    }
    if (name && (strlen(name) >= 2 * HS_NAME_MAX - 1 || !name_valid(name, true))) {
        hs_cfg_error(cfg, cfg->line,
                     "'%s' is not a valid name (letters, digits, '-', '_', at most %d)",
                     name, HS_NAME_MAX - 1);
        return;
    }
    for (size_t i = 0; i < cfg->n_objs; i++) {
        const obj_rec *o = &cfg->objs[i];
        if (o->type == type && (!name || strcmp(o->name, name) == 0)) {
            if (name)
                hs_cfg_error(cfg, cfg->line, "duplicate section [%s %s] (first on line %d)",
                             kind, name, o->line);
            else
                hs_cfg_error(cfg, cfg->line, "duplicate section [%s] (first on line %d)",
                             kind, o->line);
            return;
        }
    }
    int index = type->add(cfg->site, cfg, name);
    if (index < 0)
        return;
    int r = hs_cfg_grow((void **)&cfg->objs, &cfg->n_objs, sizeof cfg->objs[0]);
    if (r < 0) {
        cfg->oom = true;
        return;
    }
    obj_rec *o = &cfg->objs[r];
    o->type = type;
    o->index = index;
    o->line = cfg->line;
    snprintf(o->name, sizeof o->name, "%s", name ? name : "");
    o->first_set = cfg->n_sets;
    cfg->cur = r;
    cfg->in_bad_section = false;
    apply_defaults(cfg, type, type->at(cfg->site, (size_t)index));
}

static const char *section_label(const obj_rec *o, char *buf, size_t len)
{
    if (o->name[0])
        snprintf(buf, len, "[%s %s]", o->type->kind, o->name);
    else
        snprintf(buf, len, "[%s]", o->type->kind);
    return buf;
}

static int on_key(void *user, const char *section, const char *name, const char *value)
{
    hs_cfg *cfg = user;
    char msg[240], label[120];
    (void)section; /* we track sections ourselves, with their lines */

    if (cfg->cur < 0) {
        if (!cfg->in_bad_section)
            hs_cfg_error(cfg, cfg->line, "key '%s' outside any section", name);
        return 1;
    }
    obj_rec *o = &cfg->objs[cfg->cur];
    const hs_key *key = NULL;
    for (const hs_key *k = o->type->keys; k->name; k++)
        if (strcmp(k->name, name) == 0)
            key = k;
    if (!key) {
        hs_suggest sg;
        char hint[96];
        hs_suggest_init(&sg, name);
        for (const hs_key *k = o->type->keys; k->name; k++)
            hs_suggest_offer(&sg, k->name);
        hs_cfg_error(cfg, cfg->line, "unknown key '%s' in %s%s", name,
                     section_label(o, label, sizeof label), hs_suggest_text(&sg, hint, sizeof hint));
        return 1;
    }
    for (size_t i = o->first_set; i < cfg->n_sets; i++)
        if (cfg->sets[i].key == key) {
            hs_cfg_error(cfg, cfg->line, "duplicate key '%s' in %s (first on line %d)",
                         name, section_label(o, label, sizeof label), cfg->sets[i].line);
            return 1;
        }
    void *obj = o->type->at(cfg->site, (size_t)o->index);
    if (store_value(cfg, key, obj, value, msg, sizeof msg) != 0) {
        hs_cfg_error(cfg, cfg->line, "%s: %s", name, msg);
        /* Fall through: record it as set so that "missing" is not reported too. */
    }
    int r = hs_cfg_grow((void **)&cfg->sets, &cfg->n_sets, sizeof cfg->sets[0]);
    if (r < 0) {
        cfg->oom = true;
        return 0;
    }
    cfg->sets[r].key = key;
    cfg->sets[r].line = cfg->line;
    o->n_set = cfg->n_sets - o->first_set;
    return 1;
}

/* ini_reader: hands inih one line at a time, so cfg->line is always the line
 * inih is working on. Lines we judge ourselves reach inih as blank lines. */
static char *next_line(char *str, int num, void *stream)
{
    hs_cfg *cfg = stream;
    if (cfg->pos >= cfg->size)
        return NULL;
    const char *start = cfg->text + cfg->pos;
    const char *nl = memchr(start, '\n', cfg->size - cfg->pos);
    size_t n = nl ? (size_t)(nl - start) : cfg->size - cfg->pos;
    cfg->pos += n + (nl ? 1 : 0);
    cfg->line++;
    if (n > 0 && start[n - 1] == '\r')
        n--;
    while (n > 0 && (*start == ' ' || *start == '\t')) {
        start++;
        n--;
    }
    strcpy(str, "\n");
    if (n > LINE_MAX_CHARS || (int)n + 2 > num) {
        hs_cfg_error(cfg, cfg->line, "line longer than %d characters", LINE_MAX_CHARS);
        return str;
    }
    if (memchr(start, '\0', n)) {
        hs_cfg_error(cfg, cfg->line, "NUL byte in the line");
        return str;
    }
    char line[LINE_MAX_CHARS + 1];
    memcpy(line, start, n);
    line[n] = '\0';
    if (n == 0 || line[0] == ';' || line[0] == '#')
        return str;
    if (line[0] == '[') {
        char *close = strchr(line, ']');
        const char *rest = close ? close + 1 : NULL;
        while (rest && (*rest == ' ' || *rest == '\t'))
            rest++;
        if (!close || (*rest != '\0' && *rest != ';' && *rest != '#')) {
            hs_cfg_error(cfg, cfg->line, "malformed section header (expected [KIND] or [KIND NAME])");
            cfg->cur = -1;
            cfg->in_bad_section = true;
            return str;
        }
        *close = '\0';
        begin_section(cfg, line + 1);
        return str;
    }
    if (!strpbrk(line, "=:")) {
        hs_cfg_error(cfg, cfg->line, "expected KEY = VALUE");
        return str;
    }
    if (line[0] == '=' || line[0] == ':') {
        hs_cfg_error(cfg, cfg->line, "missing key name before '%c'", line[0]);
        return str;
    }
    memcpy(str, line, n);
    str[n] = '\n';
    str[n + 1] = '\0';
    return str;
}

static int read_file(hs_cfg *cfg)
{
    FILE *f = fopen(cfg->path, "rb");
    if (!f) {
        hs_cfg_error(cfg, 0, "cannot open: %s", strerror(errno));
        return -1;
    }
    size_t cap = 8192, n = 0;
    char *buf = malloc(cap);
    while (buf) {
        if (n == cap) {
            if (cap >= FILE_MAX_BYTES) {
                hs_cfg_error(cfg, 0, "larger than %u bytes", FILE_MAX_BYTES);
                free(buf);
                buf = NULL;
                break;
            }
            char *p = realloc(buf, cap * 2);
            if (!p) {
                free(buf);
                buf = NULL;
                break;
            }
            buf = p;
            cap *= 2;
        }
        size_t got = fread(buf + n, 1, cap - n, f);
        n += got;
        if (got == 0)
            break;
    }
    if (buf && ferror(f)) {
        hs_cfg_error(cfg, 0, "read error: %s", strerror(errno));
        free(buf);
        buf = NULL;
    }
    fclose(f);
    if (!buf) {
        if (cfg->errors == 0)
            hs_cfg_error(cfg, 0, "out of memory");
        return -1;
    }
    cfg->text = buf;
    cfg->size = n;
    return 0;
}

/* SG and degree Baume values, now that [site] is read. */
static void convert_drefs(hs_cfg *cfg)
{
    char msg[200];
    const hs_site_conf *site = &cfg->site->site;
    for (size_t i = 0; i < cfg->n_drefs; i++) {
        const dref_rec *d = &cfg->drefs[i];
        double v;
        if (hs_density_ref_to_kg_m3(d->value, d->scale, site->reference_temperature_c,
                                    site->baume_modulus, &v, msg, sizeof msg) != 0 ||
            !isfinite(v) || check_bounds(d->key, v, msg, sizeof msg) != 0) {
            if (!isfinite(v))
                snprintf(msg, sizeof msg, "no reference temperature to convert it with");
            hs_cfg_error(cfg, d->line, "%s: %s", d->key->name, msg);
            continue;
        }
        void *obj = d->type->at(cfg->site, (size_t)d->index);
        *(double *)(void *)((char *)obj + d->key->offset) = v;
    }
}

static void final_passes(hs_cfg *cfg)
{
    char label[120];
    convert_drefs(cfg);
    for (size_t i = 0; i < cfg->n_objs; i++) {
        const obj_rec *o = &cfg->objs[i];
        for (const hs_key *k = o->type->keys; k->name; k++) {
            if (!(k->flags & HS_KEY_REQUIRED))
                continue;
            if (hs_cfg_key_line(cfg, o->type, (size_t)o->index, k->name) == 0)
                hs_cfg_error(cfg, o->line, "%s: missing required key '%s'",
                             section_label(o, label, sizeof label), k->name);
        }
    }
    for (size_t t = 0; hs_section_types[t]; t++) {
        const hs_section_type *type = hs_section_types[t];
        bool seen = false;
        for (size_t i = 0; i < cfg->n_objs && !seen; i++)
            seen = cfg->objs[i].type == type;
        /* Named at the file's last line (where one would add it), so that
         * every message about the file's content reads FILE:LINE:. */
        if (type->required && !seen)
            hs_cfg_error(cfg, cfg->line > 0 ? cfg->line : 1,
                         "missing section [%s%s] (none in the file)", type->kind,
                         type->named ? " NAME" : "");
    }
    for (size_t i = 0; i < cfg->n_objs; i++)
        if (cfg->objs[i].type->finish)
            cfg->objs[i].type->finish(cfg->site, cfg, (size_t)cfg->objs[i].index);
    for (size_t t = 0; hs_section_types[t]; t++)
        if (hs_section_types[t]->link)
            hs_section_types[t]->link(cfg->site, cfg);
}

void hs_site_free(hs_site *site)
{
    for (size_t t = 0; hs_section_types[t]; t++)
        if (hs_section_types[t]->release)
            hs_section_types[t]->release(site);
    memset(site, 0, sizeof *site);
}

/* 0 on success; -1 with the reasons in diag. */
int hs_site_load(const char *path, hs_site *site, hs_diag *diag)
{
    hs_cfg cfg = {.path = path, .site = site, .diag = diag, .cur = -1};
    memset(site, 0, sizeof *site);
    memset(diag, 0, sizeof *diag);
    site->site.feed_index = -1;
    if (strlen(path) >= sizeof site->path) {
        hs_cfg_error(&cfg, 0, "path too long");
        return -1;
    }
    snprintf(site->path, sizeof site->path, "%s", path);
    const char *slash = strrchr(path, '/');
    if (slash)
        snprintf(site->dir, sizeof site->dir, "%.*s", (int)(slash - path), path);
    else
        snprintf(site->dir, sizeof site->dir, ".");
    if (slash == path)
        snprintf(site->dir, sizeof site->dir, "/");

    if (read_file(&cfg) != 0)
        return -1;
    int rc = ini_parse_stream(next_line, &cfg, on_key, &cfg);
    if (rc > 0 && cfg.errors == 0)
        hs_cfg_error(&cfg, rc, "cannot parse this line");
    else if (rc < 0)
        cfg.oom = true;
    if (!cfg.oom)
        final_passes(&cfg);
    if (cfg.oom)
        hs_cfg_error(&cfg, 0, "out of memory");
    free(cfg.text);
    free(cfg.objs);
    free(cfg.sets);
    free(cfg.drefs);
    if (cfg.errors > 0) {
        hs_site_free(site);
        return -1;
    }
    return 0;
}
