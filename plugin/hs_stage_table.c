/* Stage-storage table CSV loader (see hs_stage_table.h). */
#include "hs_stage_table.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_FILE_BYTES (4u << 20)
#define MAX_COLUMNS 8

enum { COL_NONE = -1, COL_LEVEL, COL_VOLUME, COL_AREA };

static int fail(char *err, size_t errlen, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Writes the message; returns -1 for `return fail(...)`. */
static int fail(char *err, size_t errlen, const char *fmt, ...)
{
    if (err != NULL && errlen > 0) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err, errlen, fmt, ap);
        va_end(ap);
    }
    return -1;
}

void hs_stage_table_free(struct hs_stage_table *t)
{
    if (t == NULL)
        return;
    free(t->level_m);
    free(t->volume_m3);
    free(t->area_m2);
    free(t->line_of_row);
    memset(t, 0, sizeof *t);
}

static char *trim(char *s)
{
    while (*s == ' ' || *s == '\t')
        s++;
    size_t n = strlen(s);
    while (n > 0 && (s[n - 1] == ' ' || s[n - 1] == '\t' || s[n - 1] == '\r'))
        s[--n] = '\0';
    return s;
}

/* Splits line at commas in place; returns the field count (at most max),
 * or max + 1 when there are more fields. */
static int split(char *line, char **fields, int max)
{
    int n = 0;
    char *p = line;
    for (;;) {
        char *comma = strchr(p, ',');
        if (comma != NULL)
            *comma = '\0';
        if (n == max)
            return max + 1;
        fields[n++] = trim(p);
        if (comma == NULL)
            return n;
        p = comma + 1;
    }
}

static int column_kind(const char *name)
{
    if (strcmp(name, "level_m") == 0 || strcmp(name, "depth_m") == 0)
        return COL_LEVEL;
    if (strcmp(name, "volume_m3") == 0)
        return COL_VOLUME;
    if (strcmp(name, "area_m2") == 0)
        return COL_AREA;
    return COL_NONE;
}

static int parse_number(const char *s, double *out)
{
    if (*s == '\0')
        return -1;
    char *end;
    errno = 0;
    double v = strtod(s, &end);
    if (errno != 0 || *end != '\0' || !isfinite(v))
        return -1;
    *out = v;
    return 0;
}

static const char *column_label(int kind)
{
    return kind == COL_LEVEL ? "level_m" : kind == COL_VOLUME ? "volume_m3" : "area_m2";
}

/* Grows the row arrays to hold `need` rows. */
static int reserve(struct hs_stage_table *t, size_t *cap, size_t need, int with_area)
{
    if (need <= *cap)
        return 0;
    size_t n = *cap ? *cap * 2 : 64;
    double *l = realloc(t->level_m, n * sizeof *l);
    if (l == NULL)
        return -1;
    t->level_m = l;
    double *v = realloc(t->volume_m3, n * sizeof *v);
    if (v == NULL)
        return -1;
    t->volume_m3 = v;
    size_t *ln = realloc(t->line_of_row, n * sizeof *ln);
    if (ln == NULL)
        return -1;
    t->line_of_row = ln;
    if (with_area) {
        double *a = realloc(t->area_m2, n * sizeof *a);
        if (a == NULL)
            return -1;
        t->area_m2 = a;
    }
    *cap = n;
    return 0;
}

static const char *check_reason(hc_status st, int has_area)
{
    switch (st) {
    case HC_ERR_ARGUMENT:
        return "level_m must increase and volume_m3 must increase with it (table not monotone)";
    case HC_ERR_NEGATIVE:
        return has_area ? "volume_m3 and area_m2 must not be negative"
                        : "volume_m3 must not be negative";
    case HC_ERR_NOT_FINITE:
        return "value is not a finite number";
    default:
        return hc_status_text(st);
    }
}

int hs_stage_table_parse(const char *name, const char *text, struct hs_stage_table *out, char *err,
                         size_t errlen)
{
    struct hs_stage_table t;
    memset(&t, 0, sizeof t);
    memset(out, 0, sizeof *out);
    char *copy = strdup(text);
    if (copy == NULL)
        return fail(err, errlen, "%s: out of memory", name);
    int cols[MAX_COLUMNS], ncols = 0, have[3] = {0, 0, 0};
    size_t cap = 0, rows = 0, lineno = 0;
    int rc = -1;
    /* Walk line by line by hand so that blank lines keep their numbers. */
    for (char *line = copy; line != NULL; ) {
        char *nl = strchr(line, '\n');
        if (nl != NULL)
            *nl = '\0';
        lineno++;
        char *s = trim(line);
        line = nl != NULL ? nl + 1 : NULL;
        if (*s == '\0' || *s == '#')
            continue;
        char *f[MAX_COLUMNS + 1];
        int nf = split(s, f, MAX_COLUMNS);
        if (nf > MAX_COLUMNS) {
            fail(err, errlen, "%s:%zu: more than %d columns", name, lineno, MAX_COLUMNS);
            goto out;
        }
        if (ncols == 0) { /* the header */
            for (int i = 0; i < nf; i++) {
                int k = column_kind(f[i]);
                if (k == COL_NONE) {
                    fail(err, errlen,
                         "%s:%zu: unknown column '%s' (expected level_m or depth_m, volume_m3, area_m2)",
                         name, lineno, f[i]);
                    goto out;
                }
                if (have[k]) {
                    fail(err, errlen, "%s:%zu: column '%s' given twice (depth_m and level_m are the same column)", name, lineno, f[i]);
                    goto out;
                }
                have[k] = 1;
                cols[i] = k;
            }
            if (!have[COL_LEVEL] || !have[COL_VOLUME]) {
                fail(err, errlen, "%s:%zu: header needs level_m (or depth_m) and volume_m3 columns", name,
                     lineno);
                goto out;
            }
            ncols = nf;
            continue;
        }
        if (nf != ncols) {
            fail(err, errlen, "%s:%zu: %d fields, the header has %d", name, lineno, nf, ncols);
            goto out;
        }
        if (rows >= HS_STAGE_TABLE_MAX_ROWS) {
            fail(err, errlen, "%s:%zu: more than %d rows", name, lineno, HS_STAGE_TABLE_MAX_ROWS);
            goto out;
        }
        if (reserve(&t, &cap, rows + 1, have[COL_AREA]) != 0) {
            fail(err, errlen, "%s: out of memory", name);
            goto out;
        }
        for (int i = 0; i < nf; i++) {
            double v;
            if (parse_number(f[i], &v) != 0) {
                fail(err, errlen, "%s:%zu: %s '%s' is not a number", name, lineno,
                     column_label(cols[i]), f[i]);
                goto out;
            }
            if (cols[i] == COL_LEVEL)
                t.level_m[rows] = v;
            else if (cols[i] == COL_VOLUME)
                t.volume_m3[rows] = v;
            else
                t.area_m2[rows] = v;
        }
        t.line_of_row[rows] = lineno;
        rows++;
    }
    if (ncols == 0) {
        fail(err, errlen, "%s: empty table (no header line)", name);
        goto out;
    }
    if (rows < 2) {
        fail(err, errlen, "%s: a stage-storage table needs at least 2 rows, found %zu", name, rows);
        goto out;
    }
    t.view.n = rows;
    t.view.level_m = t.level_m;
    t.view.volume_m3 = t.volume_m3;
    t.view.area_m2 = t.area_m2;
    size_t bad = 0;
    hc_status st = hc_stage_table_check(&t.view, &bad);
    if (st != HC_OK) {
        fail(err, errlen, "%s:%zu: %s", name, t.line_of_row[bad], check_reason(st, have[COL_AREA]));
        goto out;
    }
    *out = t;
    rc = 0;
out:
    free(copy);
    if (rc != 0)
        hs_stage_table_free(&t);
    return rc;
}

int hs_stage_table_load(const char *path, struct hs_stage_table *out, char *err, size_t errlen)
{
    memset(out, 0, sizeof *out);
    FILE *f = fopen(path, "rb");
    if (f == NULL)
        return fail(err, errlen, "%s: cannot open: %s", path, strerror(errno));
    char *buf = malloc(MAX_FILE_BYTES + 1);
    if (buf == NULL) {
        fclose(f);
        return fail(err, errlen, "%s: out of memory", path);
    }
    size_t n = fread(buf, 1, MAX_FILE_BYTES + 1, f);
    int read_error = ferror(f);
    fclose(f);
    int rc;
    if (read_error)
        rc = fail(err, errlen, "%s: read error", path);
    else if (n > MAX_FILE_BYTES)
        rc = fail(err, errlen, "%s: larger than %u bytes", path, MAX_FILE_BYTES);
    else if (memchr(buf, '\0', n) != NULL)
        rc = fail(err, errlen, "%s: contains a NUL byte (not a text file)", path);
    else {
        buf[n] = '\0';
        rc = hs_stage_table_parse(path, buf, out, err, errlen);
    }
    free(buf);
    return rc;
}
