/* halostage history --pond P --since 7d [--until T] [--step 1h] [--signal NAME]
 *                   [--json] [--limit N] --config FILE
 * A pond's history from the daemon's store, read while it writes (WAL).
 * Without --step: every stored state (up to --limit rows). With --step: the
 * min, mean and max per step from the 1-minute or 1-hour rollups, with the
 * sample count and the worst quality in the step. --signal shows one raw
 * signal ("POND.QUANTITY") instead of the pond's computed state; its raw
 * samples carry why they are not good (timeout, exception N, out-of-range,
 * flatline, ...). */
#include <getopt.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli_number.h"
#include "commands.h"
#include "hs_publish.h"
#include "store_opts.h"

/* The state quantities shown, in columns. */
static const struct {
    const char *field;
    const char *head;
    int decimals;
} cols[] = {
    {"density_kg_m3", "in-situ kg/m3", 1},
    {"density_uncertainty_kg_m3", "+-kg/m3", 1},
    {"baume", "deg Be", 2},
    {"temperature_c", "temp C", 1},
    {"depth_m", "depth m", 3},
    {"volume_m3", "volume m3", 0},
};
#define NCOLS (sizeof cols / sizeof cols[0])

struct bucket {
    int64_t t_ms;
    hs_point p[NCOLS];
    int have[NCOLS];
};

struct table {
    struct bucket *b;
    size_t n, cap;
    size_t col;
    int failed;
};

static struct bucket *bucket_at(struct table *t, int64_t t_ms)
{
    /* Points of one series come in time order; columns after the first
     * mostly hit existing buckets, found by binary search. */
    size_t lo = 0, hi = t->n;
    while (lo < hi) {
        size_t mid = (lo + hi) / 2;
        if (t->b[mid].t_ms < t_ms)
            lo = mid + 1;
        else
            hi = mid;
    }
    if (lo < t->n && t->b[lo].t_ms == t_ms)
        return &t->b[lo];
    if (t->n == t->cap) {
        size_t cap = t->cap ? t->cap * 2 : 256;
        struct bucket *more = realloc(t->b, cap * sizeof *more);
        if (more == NULL) {
            t->failed = 1;
            return NULL;
        }
        t->b = more;
        t->cap = cap;
    }
    memmove(&t->b[lo + 1], &t->b[lo], (t->n - lo) * sizeof t->b[0]);
    memset(&t->b[lo], 0, sizeof t->b[0]);
    t->b[lo].t_ms = t_ms;
    t->n++;
    return &t->b[lo];
}

static void add_point(void *ctx, const hs_point *p)
{
    struct table *t = ctx;
    struct bucket *b = bucket_at(t, p->t_ms);
    if (b) {
        b->p[t->col] = *p;
        b->have[t->col] = 1;
    }
}

static json_t *num(double v) { return isfinite(v) ? json_real(v) : json_null(); }

/* "timeout (errno 110)", "exception 2", "out-of-range"; "" for none. */
static void reason_text(const hs_point *p, char *buf, size_t len)
{
    if (p->reason[0] == '\0')
        snprintf(buf, len, "%s", "");
    else if (strcmp(p->reason, "exception") == 0)
        snprintf(buf, len, "exception %d", p->code);
    else if (p->code != 0)
        snprintf(buf, len, "%s (errno %d)", p->reason, p->code);
    else
        snprintf(buf, len, "%s", p->reason);
}

static void print_table(const struct table *t, int stepped, const char *signal)
{
    char when[40], why[64];
    if (signal) {
        printf("%-24s %12s %12s %12s %7s %-13s %s\n", "time (UTC)", "min", "mean", "max", "n",
               "worst quality", stepped ? "" : "reason");
        for (size_t i = 0; i < t->n; i++) {
            const hs_point *p = &t->b[i].p[0];
            hs_iso8601_ms(when, sizeof when, t->b[i].t_ms);
            reason_text(p, why, sizeof why);
            printf("%-24s %12.4g %12.4g %12.4g %7lld %-13s %s\n", when, p->min, p->mean, p->max,
                   (long long)p->count, hs_quality_name(p->worst), why);
        }
        return;
    }
    printf("%-24s", "time (UTC)");
    for (size_t c = 0; c < NCOLS; c++)
        printf(stepped ? " %26s" : " %14s", cols[c].head);
    printf(" %7s %s\n", stepped ? "n" : "", "quality");
    if (stepped) {
        printf("%-24s", "");
        for (size_t c = 0; c < NCOLS; c++)
            printf(" %26s", "min / mean / max");
        printf("\n");
    }
    for (size_t i = 0; i < t->n; i++) {
        const struct bucket *b = &t->b[i];
        hs_iso8601_ms(when, sizeof when, b->t_ms);
        printf("%-24s", when);
        int64_t n = 0;
        hs_quality worst = HS_QUALITY_GOOD;
        for (size_t c = 0; c < NCOLS; c++) {
            char cell[64];
            const hs_point *p = &b->p[c];
            int d = cols[c].decimals;
            if (!b->have[c] || !isfinite(p->mean))
                snprintf(cell, sizeof cell, "-");
            else if (stepped)
                snprintf(cell, sizeof cell, "%.*f / %.*f / %.*f", d, p->min, d, p->mean, d,
                         p->max);
            else
                snprintf(cell, sizeof cell, "%.*f", d, p->mean);
            printf(stepped ? " %26s" : " %14s", cell);
            if (b->have[c]) {
                if (p->count > n)
                    n = p->count;
                if (p->worst > worst)
                    worst = p->worst;
            }
        }
        if (stepped)
            printf(" %7lld", (long long)n);
        else
            printf(" %7s", "");
        printf(" %s\n", hs_quality_name(worst));
    }
}

static json_t *table_json(const struct table *t, const char *pond, const char *signal,
                          int64_t since, int64_t until, int64_t step)
{
    char a[40], b[40];
    hs_iso8601_ms(a, sizeof a, since);
    hs_iso8601_ms(b, sizeof b, until);
    json_t *points = json_array();
    for (size_t i = 0; i < t->n; i++) {
        char when[40];
        hs_iso8601_ms(when, sizeof when, t->b[i].t_ms);
        json_t *o = json_pack("{s:s}", "time", when);
        size_t ncols = signal ? 1 : NCOLS;
        for (size_t c = 0; c < ncols; c++) {
            const hs_point *p = &t->b[i].p[c];
            if (!t->b[i].have[c])
                continue;
            json_t *v = json_pack("{s:o, s:o, s:o, s:I, s:s}", "min", num(p->min), "mean",
                                  num(p->mean), "max", num(p->max), "count",
                                  (json_int_t)p->count, "worst_quality",
                                  hs_quality_name(p->worst));
            if (p->reason[0] != '\0') {
                json_object_set_new(v, "reason", json_string(p->reason));
                if (p->code != 0)
                    json_object_set_new(v, strcmp(p->reason, "exception") == 0 ? "exception"
                                                                              : "errno",
                                        json_integer(p->code));
            }
            json_object_set_new(o, signal ? "value" : cols[c].field, v);
        }
        json_array_append_new(points, o);
    }
    json_t *out = json_pack("{s:s, s:s, s:s, s:I, s:o}", "series", signal ? signal : pond,
                            "since", a, "until", b, "step_s", (json_int_t)(step / 1000),
                            "points", points);
    return out;
}

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage history --config FILE --pond POND --since WHEN [--until WHEN]\n"
            "                         [--step DURATION] [--signal POND.QUANTITY] [--json]\n"
            "                         [--limit N]\n"
            "  WHEN is a duration back from now (7d, 6h, 90min), now, or a UTC time\n"
            "  (2026-03-01T06:00Z). --step takes whole minutes (1min, 15min, 1h, 1d) and\n"
            "  reads the rollups, which the daemon writes every 15 minutes; without it every\n"
            "  stored state is listed, or the latest --limit of them (default 10000).\n");
}

int hs_cmd_history(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'}, {"pond", required_argument, NULL, 'p'},
        {"since", required_argument, NULL, 's'},  {"until", required_argument, NULL, 'u'},
        {"step", required_argument, NULL, 't'},   {"signal", required_argument, NULL, 'g'},
        {"limit", required_argument, NULL, 'l'},  {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},         {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *pond = NULL, *since_s = NULL, *until_s = "now", *step_s = NULL;
    const char *signal = NULL;
    long limit = 10000;
    int json = 0, c;
    char msg[256];
    optind = 1;
    opterr = 0; /* one line of our own instead of getopt's and the usage */
    while ((c = getopt_long(argc, argv, "c:p:s:u:t:g:l:jh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'p': pond = optarg; break;
        case 's': since_s = optarg; break;
        case 'u': until_s = optarg; break;
        case 't': step_s = optarg; break;
        case 'g': signal = optarg; break;
        case 'l':
            if (hs_parse_long(optarg, &limit, msg, sizeof msg) != 0 || limit < 1) {
                fprintf(stderr, "halostage history: --limit: %s\n",
                        limit < 1 ? "must be at least 1" : msg);
                return 2;
            }
            break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("history", argv, argc); return 2;
        }
    }
    if (config == NULL || since_s == NULL || (pond == NULL) == (signal == NULL) || optind < argc) {
        fprintf(stderr, "halostage history: need --config, --since and one of --pond or "
                        "--signal (see --help)\n");
        return 2;
    }
    int64_t since, until, step = 0;
    if (hs_cli_window("history", since_s, until_s, &since, &until) != 0)
        return 2;
    if (step_s) {
        int parsed = hs_parse_duration_ms(step_s, &step, msg, sizeof msg) == 0;
        if (!parsed || step < 60000 || step % 60000 != 0) {
            /* "0s" parses but is no step: say what a step is, not a parse error */
            fprintf(stderr, "halostage history: --step %s: %s\n", step_s,
                    parsed ? "must be whole minutes (1min, 15min, 1h, 1d)" : msg);
            return 2;
        }
    }
    if (until <= since) {
        fprintf(stderr, "halostage history: --until must be later than --since\n");
        return 2;
    }
    hs_site site;
    hs_store *st;
    int rc = hs_cli_open(config, &site, &st);
    if (rc != 0)
        return rc;
    rc = hs_cli_known_pond("history", "--pond", &site, pond);
    if (rc == 0)
        rc = hs_cli_known_signal("history", &site, signal);
    if (rc != 0) {
        hs_store_close(st);
        hs_site_free(&site);
        return rc;
    }
    struct table t = {0};
    char series[160];
    size_t ncols = signal ? 1 : NCOLS;
    for (size_t col = 0; col < ncols && rc == 0; col++) {
        if (signal)
            snprintf(series, sizeof series, "%s", signal);
        else
            snprintf(series, sizeof series, "%s:%s", pond, cols[col].field);
        t.col = col;
        if (hs_store_history(st, series, since, until, step, add_point, &t) < 0) {
            fprintf(stderr, "halostage history: %s\n", hs_store_error(st));
            if (strstr(hs_store_error(st), "no series"))
                fprintf(stderr, "  (no %s '%s' in the history yet)\n", signal ? "signal" : "pond",
                        signal ? signal : pond);
            rc = 1;
        }
    }
    if (rc == 0 && step == 0 && t.n > (size_t)limit) {
        /* The latest rows are the ones asked about; say what was left out. */
        fprintf(stderr, "halostage history: showing the last %ld of %zu stored states "
                        "(--limit; narrow --since or use --step for the rest)\n", limit, t.n);
        memmove(t.b, t.b + (t.n - (size_t)limit), (size_t)limit * sizeof t.b[0]);
        t.n = (size_t)limit;
    }
    if (t.failed) {
        fprintf(stderr, "halostage history: out of memory\n");
        rc = 1;
    }
    if (rc == 0) {
        if (json) {
            json_t *o = table_json(&t, pond, signal, since, until, step);
            char *text = o ? json_dumps(o, JSON_COMPACT | JSON_REAL_PRECISION(15)) : NULL;
            if (text)
                printf("%s\n", text);
            free(text);
            json_decref(o);
        } else {
            char a[40], b[40];
            hs_iso8601_ms(a, sizeof a, since);
            hs_iso8601_ms(b, sizeof b, until);
            printf("%s %s, %s .. %s, %s\n", signal ? "signal" : "pond", signal ? signal : pond,
                   a, b, step ? step_s : "every stored state");
            if (t.n == 0)
                printf("(nothing stored in this range%s)\n",
                       step ? "; the daemon writes rollups every 15 minutes" : "");
            else
                print_table(&t, step != 0, signal);
        }
    }
    free(t.b);
    hs_store_close(st);
    hs_site_free(&site);
    return rc;
}
