/* halostage status --config FILE [--json]: the operator's one-screen view
 * of the site from the daemon's history file: every pond's stage, density,
 * degree Baume, level and volume, active alarms, days to target, and the
 * current advice of every transfer with its reasons. Reads the store while
 * the daemon writes (WAL). */
#include <getopt.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "cli_number.h"
#include "commands.h"
#include "store_opts.h"
#include "hs_pond_doc.h"
#include "hs_alarm.h"
#include "hs_conf_transfer.h"
#include "hs_config.h"
#include "hs_lock.h"
#include "hs_publish.h"
#include "hs_store.h"
#include "hs_store_latest.h"

#define MAX_ALARMS 256

struct alarm_row {
    char pond[HS_ALARM_NAME_MAX];
    char rule[HS_ALARM_NAME_MAX];
    char state[32];
    double value;
    int64_t t_ms;
};

struct alarm_list {
    struct alarm_row rows[MAX_ALARMS];
    size_t n;
};

static void collect_alarm(void *ctx, const hs_journal_row *row)
{
    struct alarm_list *l = ctx;
    if (strcmp(row->to_state, "normal") == 0 || l->n >= MAX_ALARMS)
        return;
    struct alarm_row *a = &l->rows[l->n++];
    snprintf(a->pond, sizeof a->pond, "%s", row->pond);
    snprintf(a->rule, sizeof a->rule, "%s", row->rule);
    snprintf(a->state, sizeof a->state, "%s", row->to_state);
    a->value = row->value;
    a->t_ms = row->t_ms;
}

static int64_t wall_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static void num(char *buf, size_t len, double v, int decimals)
{
    if (isfinite(v))
        snprintf(buf, len, "%.*f", decimals, v);
    else
        snprintf(buf, len, "-");
}

/* A time span given in days, in the unit that reads best: "12-15 d",
 * "5.2 h", "40 min". A range shows both ends when they differ visibly. */
static void days(char *buf, size_t len, double lo, double hi)
{
    if (!isfinite(lo) && !isfinite(hi)) {
        snprintf(buf, len, "-");
        return;
    }
    double ref = isfinite(hi) ? hi : lo;
    double scale = 1.0;
    const char *unit = "d";
    if (ref < 1.0 / 24.0) {
        scale = 1440.0;
        unit = "min";
    } else if (ref < 1.0) {
        scale = 24.0;
        unit = "h";
    }
    double a = lo * scale, b = hi * scale;
    if (isfinite(a) && isfinite(b) && b - a >= 0.1 * b + 0.5)
        snprintf(buf, len, "%.0f-%.0f %s", a, b, unit);
    else if (!isfinite(b))
        snprintf(buf, len, ">%.0f %s", a, unit);
    else
        snprintf(buf, len, "%.1f %s", isfinite(a) ? (a + b) / 2 : b, unit);
}

/* "trigger-met,rain" from the stored reasons JSON. */
static void reason_names(const char *json, int interlocks_only, char *buf, size_t len)
{
    buf[0] = '\0';
    json_t *a = json_loads(json, 0, NULL);
    size_t i, used = 0;
    json_t *r;
    json_array_foreach(a, i, r) {
        const char *name = json_string_value(json_object_get(r, "name"));
        if (name == NULL || (interlocks_only && !json_is_true(json_object_get(r, "interlock"))))
            continue;
        int n = snprintf(buf + used, len - used, "%s%s", used ? "," : "", name);
        if (n < 0 || (size_t)n >= len - used)
            break;
        used += (size_t)n;
    }
    json_decref(a);
}

static void alarms_of(const struct alarm_list *l, const char *pond, char *buf, size_t len)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < l->n; i++) {
        if (strcmp(l->rows[i].pond, pond) != 0)
            continue;
        int n = snprintf(buf + used, len - used, "%s%s", used ? "," : "", l->rows[i].rule);
        if (n < 0 || (size_t)n >= len - used)
            break;
        used += (size_t)n;
    }
    if (used == 0)
        snprintf(buf, len, "-");
}

static void age_text(char *buf, size_t len, int64_t ms);

/* What the daemon left in the store (hs_runtime.c): its PID, when it
 * started, when it was last seen, when it stopped cleanly (0: it did not). */
struct daemon_marks {
    int64_t pid, started_ms, seen_ms, stopped_ms;
};

static void read_marks(hs_store *st, struct daemon_marks *m)
{
    if (hs_store_meta_get(st, "daemon_pid", 0, &m->pid) != 0 ||
        hs_store_meta_get(st, "daemon_started_ms", 0, &m->started_ms) != 0 ||
        hs_store_meta_get(st, "daemon_seen_ms", 0, &m->seen_ms) != 0 ||
        hs_store_meta_get(st, "daemon_stopped_ms", 0, &m->stopped_ms) != 0)
        memset(m, 0, sizeof *m);
}

/* Since when the daemon has not been running: its clean stop, else the
 * last time it was seen; 0 unknown. */
static int64_t down_since(const struct daemon_marks *m)
{
    return m->stopped_ms > 0 ? m->stopped_ms : m->seen_ms;
}

/* Age past which a pond's newest stored state is stale. While the daemon
 * runs it stores a state row by exception (at least every
 * state_max_interval) and commits every commit_interval, so the newest row
 * may be that much older than the pond's state without being stale; a
 * stored state whose inputs went stale carries that quality itself. With
 * no daemon, older than stale_after is stale. */
static int64_t stale_limit_ms(const hs_site *site)
{
    long pid = 0;
    char err[300];
    int64_t limit = site->site.stale_after_ms;
    if (hs_lock_holder(site->site.database, &pid, err, sizeof err) > 0)
        limit += site->site.state_max_interval_ms + site->site.commit_interval_ms;
    return limit;
}

/* Who runs the site: the holder of the site lock (hs_lock.h); when nobody
 * does, since when and which process last held it. */
static void print_daemon(const hs_site *site, hs_store *st, int64_t now)
{
    long pid = 0;
    char err[300] = "", when[40], ago[24];
    struct daemon_marks m;
    read_marks(st, &m);
    int held = hs_lock_holder(site->site.database, &pid, err, sizeof err);
    if (held < 0) {
        printf("daemon: unknown (%s)\n", err);
    } else if (held) {
        printf("daemon: running, PID %ld holds the site lock", pid > 0 ? pid : (long)m.pid);
        if (m.started_ms > 0) {
            hs_iso8601_ms(when, sizeof when, m.started_ms);
            printf(" (since %s)", when);
        }
        printf("\n");
    } else if (m.pid > 0) {
        int64_t since = down_since(&m);
        hs_iso8601_ms(when, sizeof when, since);
        age_text(ago, sizeof ago, now - since);
        printf("daemon: NOT RUNNING since %s (%s ago%s); PID %lld last held the site; "
               "the states below are its last\n", since > 0 ? when : "an unknown time",
               since > 0 ? ago : "?", m.stopped_ms > 0 ? ", stopped" : ", not stopped cleanly",
               (long long)m.pid);
    } else {
        printf("daemon: NOT RUNNING (nobody holds the site lock, and none has run on this "
               "history)\n");
    }
}

static json_t *daemon_json(const hs_site *site, hs_store *st)
{
    long pid = 0;
    char err[300] = "", when[40];
    struct daemon_marks m;
    read_marks(st, &m);
    int held = hs_lock_holder(site->site.database, &pid, err, sizeof err);
    int64_t since = held == 0 ? down_since(&m) : 0;
    hs_iso8601_ms(when, sizeof when, since);
    return json_pack("{s:o, s:o, s:o, s:o, s:b}", "running",
                     held < 0 ? json_null() : json_boolean(held), "pid",
                     held > 0 && pid > 0 ? json_integer(pid) : json_null(), "last_pid",
                     m.pid > 0 ? json_integer(m.pid) : json_null(), "not_running_since",
                     since > 0 ? json_string(when) : json_null(), "stopped_cleanly",
                     m.stopped_ms > 0);
}

/* An age as it reads best: "40s", "12min", "5.2h", "3.0d". */
static void age_text(char *buf, size_t len, int64_t ms)
{
    double s = (double)ms / 1000.0;
    if (s < 0)
        snprintf(buf, len, "-");
    else if (s < 120)
        snprintf(buf, len, "%.0fs", s);
    else if (s < 7200)
        snprintf(buf, len, "%.0fmin", s / 60);
    else if (s < 172800)
        snprintf(buf, len, "%.1fh", s / 3600);
    else
        snprintf(buf, len, "%.1fd", s / 86400);
}

/* A device (bus, unit id) is shown down when the newest stored sample of
 * every signal read from it is a timeout or "not asked" (hp_bus.h). */
struct device_down {
    const char *bus;
    unsigned unit;
    int64_t last_try_ms, last_good_ms;
};

static size_t devices_down(const hs_site *site, hs_store *st, struct device_down *out, size_t max)
{
    size_t n = 0;
    for (size_t i = 0; i < site->n_signals && n < max; i++) {
        const hs_signal *g = &site->signals[i];
        int seen = 0;
        for (size_t j = 0; j < i && !seen; j++)
            seen = site->signals[j].bus_index == g->bus_index &&
                   site->signals[j].point.unit_id == g->point.unit_id;
        if (seen || g->bus_index < 0)
            continue; /* each device once, from its first signal */
        struct device_down d = {g->bus, g->point.unit_id, 0, 0};
        int down = 1;
        for (size_t j = i; j < site->n_signals && down; j++) {
            const hs_signal *h = &site->signals[j];
            if (h->bus_index != g->bus_index || h->point.unit_id != g->point.unit_id)
                continue;
            hs_point p;
            int64_t good = 0;
            down = hs_store_latest_sample(st, h->name, &p, &good) == 0 &&
                   (strcmp(p.reason, "timeout") == 0 || strcmp(p.reason, "device-down") == 0);
            if (p.t_ms > d.last_try_ms)
                d.last_try_ms = p.t_ms;
            if (good > d.last_good_ms)
                d.last_good_ms = good;
        }
        if (down)
            out[n++] = d;
    }
    return n;
}

static void print_devices_down(const hs_site *site, hs_store *st)
{
    struct device_down d[64];
    size_t n = devices_down(site, st, d, 64);
    for (size_t i = 0; i < n; i++) {
        char last[40] = "never";
        if (d[i].last_good_ms > 0)
            hs_iso8601_ms(last, sizeof last, d[i].last_good_ms);
        printf("%sdevice down: bus %s unit id %u (no answer; last good sample %s)\n",
               i == 0 ? "\n" : "", d[i].bus, d[i].unit, last);
    }
}

static void print_table(const hs_site *site, hs_store *st, const struct alarm_list *alarms,
                        int64_t now)
{
    printf("site %s, %s; REF kg/m3 and Be at the reference temperature %g degC\n",
           site->site.name, site->site.database, site->site.reference_temperature_c);
    print_daemon(site, st, now);
    printf("%-9s %-12s %-17s %9s %6s %6s %7s %10s %9s %-8s %7s %s\n", "POND", "ROLE", "STAGE",
           "REF kg/m3", "+-", "Be", "LEVEL m", "VOLUME m3", "TO TARGET", "QUALITY", "AGE",
           "ALARMS");
    int64_t stale_limit = stale_limit_ms(site);
    for (size_t i = 0; i < site->n_ponds; i++) {
        const hs_pond *p = &site->ponds[i];
        hs_state_row row;
        int rc = hs_store_latest_state(st, p->name, &row);
        char rho[16] = "-", u_rho[16] = "-", be[16] = "-", lvl[16] = "-", vol[16] = "-", d[24] = "-";
        char al[200], age[24] = "-";
        const char *stage = "-", *quality = rc == 0 ? hs_quality_name(row.quality) : "no data";
        if (rc == 0) {
            /* the density decisions compare: at the reference temperature */
            num(rho, sizeof rho, row.state.density_ref_kg_m3, 1);
            num(u_rho, sizeof u_rho, row.state.density_uncertainty_kg_m3, 1);
            num(be, sizeof be, row.state.baume, 2);
            num(lvl, sizeof lvl, row.extra.depth_m, 3);
            num(vol, sizeof vol, row.extra.volume_m3, 0);
            days(d, sizeof d, row.extra.days_to_target_low, row.extra.days_to_target_high);
            if (row.state.stage != HC_STAGE_NONE)
                stage = hc_stage_name(row.state.stage);
            age_text(age, sizeof age, now - row.t_ms);
            if (now - row.t_ms > stale_limit)
                quality = "stale"; /* see stale_limit_ms */
        }
        alarms_of(alarms, p->name, al, sizeof al);
        printf("%-9s %-12s %-17s %9s %6s %6s %7s %10s %9s %-8s %7s %s\n", p->name,
               hs_role_name(p->role), stage, rho, u_rho, be, lvl, vol, d, quality, age, al);
    }
    if (site->n_transfers > 0) {
        printf("\n%-16s %-18s %-8s %s\n", "TRANSFER", "FROM -> TO", "ADVICE", "REASONS");
        for (size_t i = 0; i < site->n_transfers; i++) {
            const hs_transfer_conf *t = &site->transfers[i];
            hs_transfer_row tr;
            char route[2 * HS_NAME_MAX + 8], reasons[400] = "";
            snprintf(route, sizeof route, "%s -> %s", t->source, t->destination);
            int rc = hs_store_latest_transfer(st, t->name, &tr);
            if (rc == 0)
                reason_names(tr.reasons, 0, reasons, sizeof reasons);
            printf("%-16s %-18s %-8s %s%s\n", t->name, route, rc == 0 ? tr.advice : "-",
                   rc == 0 ? reasons : "no decision yet", t->actuate ? " [ACTUATED]" : "");
        }
    }
    print_devices_down(site, st);
    printf("\n%zu alarm(s) not back to normal", alarms->n);
    for (size_t i = 0; i < alarms->n; i++)
        printf("%s %s/%s %s", i ? "," : ":", alarms->rows[i].pond, alarms->rows[i].rule,
               alarms->rows[i].state);
    printf("\n");
}

static json_t *status_json(const hs_site *site, hs_store *st, const struct alarm_list *alarms,
                           int64_t now)
{
    json_t *ponds = json_array(), *transfers = json_array(), *al = json_array();
    int64_t stale_limit = stale_limit_ms(site);
    for (size_t i = 0; i < site->n_ponds; i++) {
        const hs_pond *p = &site->ponds[i];
        hs_state_row row;
        struct hs_pond_doc d;
        if (hs_store_latest_state(st, p->name, &row) == 0) {
            hs_pond_doc_from_row(&d, &row, p->name, hs_role_name(p->role));
            d.now_ms = now;
            d.stale_after_ms = stale_limit;
        } else {
            hs_pond_doc_init(&d);
            d.pond = p->name;
            d.role = hs_role_name(p->role);
            d.note = "no stored state";
        }
        json_t *o = hs_pond_doc_json(&d);
        json_array_append_new(ponds, o);
    }
    for (size_t i = 0; i < site->n_transfers; i++) {
        const hs_transfer_conf *t = &site->transfers[i];
        hs_transfer_row tr;
        json_t *o = json_pack("{s:s, s:s, s:s, s:b}", "transfer", t->name, "source", t->source,
                              "destination", t->destination, "actuate", t->actuate ? 1 : 0);
        if (hs_store_latest_transfer(st, t->name, &tr) == 0) {
            json_object_set_new(o, "advice", json_string(tr.advice));
            json_object_set_new(o, "reasons", json_loads(tr.reasons, 0, NULL));
            json_object_set_new(o, "time_ms", json_integer(tr.t_ms));
        }
        json_array_append_new(transfers, o);
    }
    for (size_t i = 0; i < alarms->n; i++)
        json_array_append_new(al, json_pack("{s:s, s:s, s:s, s:o, s:I}", "pond",
                                            alarms->rows[i].pond, "rule", alarms->rows[i].rule,
                                            "state", alarms->rows[i].state, "value",
                                            isfinite(alarms->rows[i].value) ? json_real(alarms->rows[i].value) : json_null(),
                                            "time_ms", (json_int_t)alarms->rows[i].t_ms));
    json_t *down = json_array();
    struct device_down d[64];
    size_t nd = devices_down(site, st, d, 64);
    for (size_t i = 0; i < nd; i++)
        json_array_append_new(down, json_pack("{s:s, s:i, s:I, s:o}", "bus", d[i].bus,
                                              "unit_id", (int)d[i].unit, "last_try_ms",
                                              (json_int_t)d[i].last_try_ms, "last_good_ms",
                                              d[i].last_good_ms > 0
                                                  ? json_integer(d[i].last_good_ms)
                                                  : json_null()));
    return json_pack("{s:s, s:o, s:o, s:o, s:o, s:o}", "site", site->site.name, "daemon",
                     daemon_json(site, st), "ponds", ponds, "transfers", transfers, "alarms", al,
                     "devices_down", down);
}

static void usage(FILE *out)
{
    fprintf(out, "usage: halostage status --config FILE [--json]\n"
                 "  every pond's latest state, level and volume, days to target, active\n"
                 "  alarms, and each transfer's current advice, from the daemon's history\n");
}

int hs_cmd_status(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL;
    int json = 0, c;
    optind = 1;
    opterr = 0; /* one line of our own instead of getopt's and the usage */
    while ((c = getopt_long(argc, argv, "c:jh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: hs_cli_bad_option("status", argv, argc); return 2;
        }
    }
    if (config == NULL || optind != argc) {
        fputs("halostage status: need --config FILE and nothing else (see --help)\n", stderr);
        return 2;
    }
    hs_site site;
    if (hs_cli_load_site(config, &site) != 0)
        return HS_EXIT_CONFIG;
    char err[512];
    hs_store *st = hs_store_open(site.site.database, HS_STORE_READ, NULL, err, sizeof err);
    if (st == NULL) {
        fprintf(stderr, "halostage status: %s (has halostaged run yet?)\n", err);
        hs_site_free(&site);
        return 1;
    }
    static struct alarm_list alarms;
    alarms.n = 0;
    int rc = 0;
    if (hs_store_journal_latest(st, collect_alarm, &alarms) != 0) {
        fprintf(stderr, "halostage status: %s\n", hs_store_error(st));
        rc = 1;
    } else if (json) {
        json_t *o = status_json(&site, st, &alarms, wall_ms());
        char *text = hs_doc_dumps(o);
        if (text)
            printf("%s\n", text);
        free(text);
        json_decref(o);
    } else {
        print_table(&site, st, &alarms, wall_ms());
    }
    hs_store_close(st);
    hs_site_free(&site);
    return rc;
}
