/* halostage export --csv|--json --config FILE [--what states|alarms|samples]
 *                  [--pond P] [--since WHEN] [--until WHEN]
 * The stored pond states (or the alarm journal, or the raw signal samples
 * with why each is not good) as CSV for spreadsheets:
 * one header line whose names carry their units, times in ISO 8601 UTC,
 * empty cells for unknown values. Reads while the daemon writes (WAL). */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli_number.h"
#include "commands.h"
#include "hs_pond_doc.h"
#include "hs_publish.h"
#include "store_opts.h"

/* A CSV cell: quoted when it holds a comma, quote or line break (RFC 4180). */
static void cell(const char *s)
{
    if (s == NULL)
        return;
    if (strpbrk(s, ",\"\r\n") == NULL) {
        fputs(s, stdout);
        return;
    }
    putchar('"');
    for (; *s; s++) {
        if (*s == '"')
            putchar('"');
        putchar(*s);
    }
    putchar('"');
}

static void numcell(double v, int digits)
{
    putchar(',');
    if (isfinite(v))
        printf("%.*g", digits, v);
}

static void textcell(const char *s)
{
    putchar(',');
    cell(s);
}

static void state_row(void *ctx, const hs_state_row *r)
{
    long *n = ctx;
    char when[40], warnings[256] = "";
    hs_iso8601_ms(when, sizeof when, r->t_ms);
    const hc_brine_state *s = &r->state;
    for (int b = 0; b < HC_WARN_COUNT_BITS; b++)
        if (s->warnings & (1u << b)) {
            size_t used = strlen(warnings);
            snprintf(warnings + used, sizeof warnings - used, "%s%s", used ? " " : "",
                     hc_warning_name(1u << b));
        }
    cell(when);
    textcell(r->pond);
    textcell(hs_quality_name(r->quality));
    numcell(s->density_kg_m3, 8);
    numcell(s->temperature_c, 6);
    numcell(s->specific_gravity, 7);
    numcell(s->reference_temperature_c, 5);
    numcell(s->baume, 6);
    numcell(s->baume_modulus, 6);
    numcell(s->practical_salinity, 7);
    numcell(s->salinity_g_kg, 7);
    numcell(s->concentration_factor, 6);
    textcell(s->stage == HC_STAGE_NONE ? NULL : hc_stage_name(s->stage));
    textcell(s->next_stage == HC_STAGE_NONE ? NULL : hc_stage_name(s->next_stage));
    numcell(s->next_stage_density_kg_m3, 8);
    numcell(s->saturation_index[HC_MIN_GYPSUM], 5);
    numcell(s->saturation_index[HC_MIN_HALITE], 5);
    numcell(s->water_activity, 5);
    textcell(hc_method_name(s->method));
    textcell(warnings);
    numcell(r->extra.depth_m, 6);
    numcell(r->extra.volume_m3, 8);
    numcell(r->extra.dissolved_salt_t, 7);
    numcell(r->extra.deposited_salt_t, 7);
    numcell(r->extra.net_evaporation_mm_day, 5);
    numcell(r->extra.days_to_target_low, 5);
    numcell(r->extra.days_to_target_high, 5);
    numcell(r->extra.days_to_next_stage, 5);
    putchar('\n');
    (*n)++;
}

/* One pond-state document per line (`--json`). */
struct json_ctx {
    long n;
    const hs_site *site;
};

static void state_doc(void *ctx, const hs_state_row *r)
{
    struct json_ctx *j = ctx;
    int p = hs_site_pond(j->site, r->pond);
    struct hs_pond_doc d;
    hs_pond_doc_from_row(&d, r, r->pond, p >= 0 ? hs_role_name(j->site->ponds[p].role) : NULL);
    json_t *o = hs_pond_doc_json(&d);
    char *text = o != NULL ? hs_doc_dumps(o) : NULL;
    if (text != NULL) {
        printf("%s\n", text);
        j->n++;
    }
    free(text);
    json_decref(o);
}

/* Raw samples of every signal (of one pond with --pond): SI value, quality,
 * reason and the exception code or errno behind it. */
static const char sample_header[] =
    "time (UTC ISO 8601),signal,value (SI unit of the quantity),quality,reason,"
    "exception code,errno\n";

struct sample_ctx {
    long n;
    const char *signal;
};

static void sample_row(void *ctx, const hs_point *p)
{
    struct sample_ctx *c = ctx;
    char when[40];
    hs_iso8601_ms(when, sizeof when, p->t_ms);
    int exc = strcmp(p->reason, "exception") == 0;
    cell(when);
    textcell(c->signal);
    numcell(p->mean, 10);
    textcell(hs_quality_name(p->worst));
    textcell(p->reason);
    putchar(',');
    if (exc && p->code != 0)
        printf("%d", p->code);
    putchar(',');
    if (!exc && p->code != 0)
        printf("%d", p->code);
    putchar('\n');
    c->n++;
}

static int export_samples(hs_store *st, const hs_site *site, const char *pond, int64_t since,
                          int64_t until, long *rows)
{
    struct sample_ctx c = {0, NULL};
    for (size_t i = 0; i < site->n_signals; i++) {
        const hs_signal *g = &site->signals[i];
        if (pond != NULL && strcmp(g->pond, pond) != 0)
            continue;
        c.signal = g->name;
        /* a signal never stored yet is no error: it has no rows */
        if (hs_store_history(st, g->name, since, until, 0, sample_row, &c) < 0 &&
            strstr(hs_store_error(st), "no series") == NULL)
            return -1;
    }
    *rows = c.n;
    return 0;
}

static const char state_header[] =
    "time (UTC ISO 8601),pond,quality,density (kg/m3),temperature (degC),"
    "specific gravity (1),reference temperature (degC),baume (deg Be),baume modulus (1),"
    "practical salinity (PSS-78),salinity (g/kg),concentration factor (1),stage,next stage,"
    "next stage density (kg/m3),gypsum saturation index (log10),"
    "halite saturation index (log10),water activity (1),method,warnings,depth (m),"
    "volume (m3),dissolved salt (t),deposited salt (t),net evaporation (mm/day),"
    "days to target low (d),days to target high (d),days to next stage (d)\n";

static void journal_row(void *ctx, const hs_journal_row *r)
{
    long *n = ctx;
    char when[40], until[40] = "";
    hs_iso8601_ms(when, sizeof when, r->t_ms);
    if (r->shelved_until_ms)
        hs_iso8601_ms(until, sizeof until, r->shelved_until_ms);
    cell(when);
    printf(",%llu,%llu", (unsigned long long)r->event_id, (unsigned long long)r->episode_id);
    textcell(r->pond);
    textcell(r->rule);
    textcell(r->from_state);
    textcell(r->to_state);
    textcell(r->cause);
    numcell(r->value, 8);
    numcell(r->limit, 8);
    textcell(hs_alarm_priority_name((hs_alarm_priority)r->priority));
    textcell(r->actor);
    textcell(r->note);
    textcell(until);
    putchar('\n');
    (*n)++;
}

static const char journal_header[] =
    "time (UTC ISO 8601),event id,episode id,pond,rule,from,to,cause,"
    "value (unit of the rule's quantity),limit (same unit),priority,operator,note,"
    "shelved until (UTC ISO 8601)\n";

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage export --csv|--json --config FILE [--what states|alarms|samples]\n"
            "                        [--pond POND] [--since WHEN] [--until WHEN]\n"
            "  CSV on stdout; the header names carry the units; times are ISO 8601 UTC.\n"
            "  --json: the pond states as pond-state documents, one per line.\n"
            "  samples: every raw signal sample with its quality and why it is not good.\n"
            "  WHEN: a duration back from now (30d), now, or a UTC time (2026-03-01T06:00Z).\n"
            "  Default: the pond states of the last 30 days.\n");
}

int hs_cmd_export(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'}, {"pond", required_argument, NULL, 'p'},
        {"since", required_argument, NULL, 's'},  {"until", required_argument, NULL, 'u'},
        {"what", required_argument, NULL, 'w'},   {"csv", no_argument, NULL, 'x'},
        {"json", no_argument, NULL, 'j'},         {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *pond = NULL, *since_s = "30d", *until_s = "now";
    const char *what = "states";
    int csv = 0, json = 0, c;
    optind = 1;
    opterr = 0; /* one line of our own instead of getopt's and the usage */
    while ((c = getopt_long(argc, argv, "c:p:s:u:w:xh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'p': pond = optarg; break;
        case 's': since_s = optarg; break;
        case 'u': until_s = optarg; break;
        case 'w': what = optarg; break;
        case 'x': csv = 1; break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("export", argv, argc); return 2;
        }
    }
    if (config == NULL || csv + json != 1 || optind < argc ||
        (strcmp(what, "states") != 0 && strcmp(what, "alarms") != 0 &&
         strcmp(what, "samples") != 0) ||
        (json && strcmp(what, "states") != 0)) {
        fprintf(stderr, "halostage export: need --config and one of --csv or --json; --what is "
                        "states, alarms or samples, --json exports states (see --help)\n");
        return 2;
    }
    int64_t since, until;
    if (hs_cli_window("export", since_s, until_s, &since, &until) != 0)
        return 2;
    hs_site site;
    hs_store *st;
    int rc = hs_cli_open(config, &site, &st);
    if (rc != 0)
        return rc;
    rc = hs_cli_known_pond("export", "--pond", &site, pond);
    if (rc != 0) {
        hs_store_close(st);
        hs_site_free(&site);
        return rc;
    }
    long rows = 0;
    int n;
    if (json) {
        struct json_ctx j = {0, &site};
        n = hs_store_states(st, pond, since, until, state_doc, &j);
        rows = j.n;
    } else if (strcmp(what, "states") == 0) {
        fputs(state_header, stdout);
        n = hs_store_states(st, pond, since, until, state_row, &rows);
    } else if (strcmp(what, "samples") == 0) {
        fputs(sample_header, stdout);
        n = export_samples(st, &site, pond, since, until, &rows);
    } else {
        fputs(journal_header, stdout);
        n = hs_store_journal_range(st, pond, since, until, journal_row, &rows);
    }
    if (n < 0) {
        fprintf(stderr, "halostage export: %s\n", hs_store_error(st));
        rc = 1;
    }
    if (fflush(stdout) != 0 || ferror(stdout)) {
        perror("halostage export: writing");
        rc = 1;
    }
    fprintf(stderr, "halostage export: %ld rows\n", rows);
    hs_store_close(st);
    hs_site_free(&site);
    return rc;
}
