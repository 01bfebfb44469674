/* halostage-sim --config FILE [--speed N] [--rtu BUS=PTY]...
 *               [--fault BUS[:UNIT]=KIND[:MS]]...
 *               [--truth FILE] [--faults FILE]
 *               [--noise SCALE] [--conductivity-noise PCT] [--seed N]
 *               [--rain POND:MM@HOURS]... [--speed-after HOURS:N]
 * KIND: timeout, exception, drop, nan, sentinel, stuck, latency:MS. BUS * is every bus.
 * Stops on SIGTERM or SIGINT. SIGHUP reads the faults again (--fault and
 * --faults FILE), so a test can silence a device and bring it back. */
#include <getopt.h>
#include <signal.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hs_config.h"
#include "sim.h"

static volatile sig_atomic_t stop_flag, reload_flag;

static void on_signal(int sig)
{
    if (sig == SIGHUP)
        reload_flag = 1;
    else
        stop_flag = 1;
}

static void usage(FILE *to)
{
    fprintf(to, "usage: halostage-sim --config FILE [--speed N] [--rtu BUS=PTY]...\n"
                "                     [--fault BUS[:UNIT]=KIND]... [--truth FILE]\n"
                "  KIND: timeout, exception, drop, nan, sentinel, stuck, latency:MS; BUS * = all\n"
                "  --truth FILE: keep the model's true pond values in FILE (JSON)\n"
                "  --faults FILE: faults from a file, one BUS[:UNIT]=KIND a line, # comments\n"
                "  --noise SCALE: times the built-in noise of every signal (1; 0: exact values)\n"
                "  --conductivity-noise PCT: conductivity noise, normal, of this standard\n"
                "    deviation in percent (instead of the built-in +-0.2 %% uniform)\n"
                "  --seed N: the noise's pseudo-random sequence (default: from the clock)\n"
                "  --speed-after HOURS:N: speed N once HOURS simulated hours have passed\n"
                "  --rain POND:MM@HOURS: MM mm of rain on POND (* = every pond) within the\n"
                "    simulated hour that starts HOURS after the start; with any --rain the\n"
                "    built-in rain events are off\n"
                "  SIGHUP reads the faults again\n");
}

/* POND:MM@HOURS, POND a pond of the config or *. */
static int parse_rain(sim *s, const char *text)
{
    const char *colon = strrchr(text, ':'), *at = colon ? strchr(colon, '@') : NULL;
    if (!colon || !at || s->n_rains >= SIM_RAINS_MAX)
        return -1;
    sim_rain r = {.pond = -1};
    char name[HS_NAME_MAX];
    if ((size_t)(colon - text) >= sizeof name)
        return -1;
    snprintf(name, sizeof name, "%.*s", (int)(colon - text), text);
    if (strcmp(name, "*") != 0) {
        r.pond = -1;
        for (size_t i = 0; i < s->site.n_ponds; i++)
            if (strcmp(s->site.ponds[i].name, name) == 0)
                r.pond = (int)i;
        if (r.pond < 0)
            return -1;
    }
    char *end;
    r.mm = strtod(colon + 1, &end);
    if (end != at || !(r.mm >= 0 && r.mm <= 1000))
        return -1;
    r.at_h = strtod(at + 1, &end);
    if (*end || !(r.at_h >= 0 && r.at_h <= 1e6))
        return -1;
    s->rains[s->n_rains++] = r;
    return 0;
}

static int parse_fault(sim *s, const char *text)
{
    char buf[128], *eq, *colon;
    snprintf(buf, sizeof buf, "%s", text);
    eq = strchr(buf, '=');
    if (!eq || s->n_faults >= SIM_FAULTS_MAX)
        return -1;
    *eq = '\0';
    sim_fault f = {.unit = 0};
    colon = strchr(buf, ':');
    if (colon) {
        *colon = '\0';
        char *end;
        long u = strtol(colon + 1, &end, 10);
        if (*end || u < 1 || u > 255)
            return -1;
        f.unit = (int)u;
    }
    f.bus = strcmp(buf, "*") == 0 ? -1 : hs_site_bus(&s->site, buf);
    if (f.bus < 0 && strcmp(buf, "*") != 0)
        return -1;
    const char *kind = eq + 1;
    if (strcmp(kind, "timeout") == 0) f.kind = SIM_FAULT_TIMEOUT;
    else if (strcmp(kind, "exception") == 0) f.kind = SIM_FAULT_EXCEPTION;
    else if (strcmp(kind, "drop") == 0) f.kind = SIM_FAULT_DROP;
    else if (strcmp(kind, "nan") == 0) f.kind = SIM_FAULT_NAN;
    else if (strcmp(kind, "sentinel") == 0) f.kind = SIM_FAULT_SENTINEL;
    else if (strcmp(kind, "stuck") == 0) f.kind = SIM_FAULT_STUCK;
    else if (strncmp(kind, "latency:", 8) == 0) {
        char *end;
        long ms = strtol(kind + 8, &end, 10);
        if (*end || ms < 0 || ms > 60000)
            return -1;
        f.kind = SIM_FAULT_LATENCY;
        f.latency_ms = (int)ms;
    } else
        return -1;
    s->faults[s->n_faults++] = f;
    return 0;
}

/* One fault a line (BUS[:UNIT]=KIND), blank lines and # comments allowed.
 * 0, or -1 after printing FILE:LINE: reason. */
static int read_fault_file(sim *s, const char *path)
{
    FILE *f = fopen(path, "r");
    char line[256];
    int n = 0, rc = 0;
    if (!f) {
        fprintf(stderr, "halostage-sim: %s: cannot open\n", path);
        return -1;
    }
    while (fgets(line, sizeof line, f)) {
        n++;
        char *p = line, *end;
        while (*p == ' ' || *p == '\t')
            p++;
        end = p + strcspn(p, "#\r\n");
        while (end > p && (end[-1] == ' ' || end[-1] == '\t'))
            end--;
        *end = '\0';
        if (*p && parse_fault(s, p) != 0) {
            fprintf(stderr, "halostage-sim: %s:%d: '%s' is not BUS[:UNIT]=KIND (KIND timeout, "
                    "exception, drop, nan, sentinel, stuck or latency:MS), or too many faults\n",
                    path, n, p);
            rc = -1;
        }
    }
    fclose(f);
    return rc;
}

int main(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'}, {"speed", required_argument, NULL, 's'},
        {"rtu", required_argument, NULL, 'r'},    {"fault", required_argument, NULL, 'f'},
        {"truth", required_argument, NULL, 't'},
        {"faults", required_argument, NULL, 'F'},
        {"noise", required_argument, NULL, 'n'},  {"seed", required_argument, NULL, 'S'},
        {"rain", required_argument, NULL, 'R'},
        {"conductivity-noise", required_argument, NULL, 'C'},
        {"speed-after", required_argument, NULL, 'A'},
        {"help", no_argument, NULL, 'h'},         {NULL, 0, NULL, 0},
    };
    static sim s;
    const char *config = NULL, *truth = NULL, *fault_file = NULL;
    const char *rtu[16], *faults[SIM_FAULTS_MAX], *rains[SIM_RAINS_MAX];
    int n_rtu = 0, n_faults = 0, n_rains = 0, c;
    bool seeded = false;
    double later_h = -1.0, later_speed = 1.0;
    s.speed = 1.0;
    s.noise_scale = 1.0;
    while ((c = getopt_long(argc, argv, "c:s:r:f:h", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 's': {
            char *end;
            s.speed = strtod(optarg, &end);
            if (*end || !(s.speed > 0 && s.speed <= 1e6)) {
                fprintf(stderr, "halostage-sim: --speed: '%s' is not a number in (0, 1e6]\n", optarg);
                return 2;
            }
            break;
        }
        case 'r': if (n_rtu < 16) rtu[n_rtu++] = optarg; break;
        case 'f': if (n_faults < SIM_FAULTS_MAX) faults[n_faults++] = optarg; break;
        case 't': truth = optarg; break;
        case 'F': fault_file = optarg; break;
        case 'n': {
            char *end;
            s.noise_scale = strtod(optarg, &end);
            if (*end || !(s.noise_scale >= 0 && s.noise_scale <= 100)) {
                fprintf(stderr, "halostage-sim: --noise: '%s' is not a number in [0, 100]\n", optarg);
                return 2;
            }
            break;
        }
        case 'A': {
            char *end;
            later_h = strtod(optarg, &end);
            if (*end == ':')
                later_speed = strtod(end + 1, &end);
            if (*end || !(later_h >= 0 && later_h <= 1e6) ||
                !(later_speed > 0 && later_speed <= 1e6)) {
                fprintf(stderr, "halostage-sim: --speed-after: '%s' is not HOURS:N with HOURS "
                        ">= 0 and N in (0, 1e6]\n", optarg);
                return 2;
            }
            break;
        }
        case 'C': {
            char *end;
            s.cond_noise_pct = strtod(optarg, &end);
            if (*end || !(s.cond_noise_pct >= 0 && s.cond_noise_pct <= 20)) {
                fprintf(stderr, "halostage-sim: --conductivity-noise: '%s' is not a percentage "
                        "in [0, 20]\n", optarg);
                return 2;
            }
            break;
        }
        case 'S': {
            char *end;
            unsigned long v = strtoul(optarg, &end, 10);
            if (*end || *optarg == '-' || !*optarg || v > 0xffffffffUL) {
                fprintf(stderr, "halostage-sim: --seed: '%s' is not a whole number\n", optarg);
                return 2;
            }
            s.seed = (unsigned)v;
            seeded = true;
            break;
        }
        case 'R':
            if (n_rains >= SIM_RAINS_MAX) {
                fprintf(stderr, "halostage-sim: --rain: at most %d showers\n", SIM_RAINS_MAX);
                return 2;
            }
            rains[n_rains++] = optarg;
            break;
        case 'h': usage(stdout); return 0;
        default: usage(stderr); return 2;
        }
    }
    if (!config || optind < argc) {
        usage(stderr);
        return 2;
    }
    hs_diag diag;
    if (hs_site_load(config, &s.site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            fprintf(stderr, "%s\n", diag.msg[i]);
        return 78;
    }
    int rc = 1;
    pthread_mutex_init(&s.lock, NULL);
    s.stop = &stop_flag;
    if (!seeded)
        s.seed = (unsigned)time(NULL);
    s.sim_time_s = (double)time(NULL);
    s.start_time_s = s.sim_time_s;
    for (int i = 0; i < n_rains; i++)
        if (parse_rain(&s, rains[i]) != 0) {
            fprintf(stderr, "halostage-sim: --rain %s: expected POND:MM@HOURS with a pond of the "
                    "config (or *), MM in [0, 1000] and HOURS >= 0\n", rains[i]);
            goto out;
        }
    for (int i = 0; i < n_rtu; i++) {
        const char *eq = strchr(rtu[i], '=');
        char name[HS_NAME_MAX];
        int b = -1;
        if (eq && (size_t)(eq - rtu[i]) < sizeof name) {
            snprintf(name, sizeof name, "%.*s", (int)(eq - rtu[i]), rtu[i]);
            b = hs_site_bus(&s.site, name);
        }
        if (b < 0 || b >= 16) {
            fprintf(stderr, "halostage-sim: --rtu %s: expected BUS=PTY with a bus of the config\n", rtu[i]);
            goto out;
        }
        s.rtu_path[b] = eq + 1;
    }
    for (int i = 0; i < n_faults; i++)
        if (parse_fault(&s, faults[i]) != 0) {
            fprintf(stderr, "halostage-sim: --fault %s: expected BUS[:UNIT]=KIND with KIND "
                    "timeout, exception, drop, nan, sentinel, stuck or latency:MS\n", faults[i]);
            goto out;
        }
    if (fault_file && read_fault_file(&s, fault_file) != 0)
        goto out;
    if (sim_model_init(&s) != 0)
        goto out;
    struct sigaction sa = {0};
    sa.sa_handler = on_signal;
    sigaction(SIGTERM, &sa, NULL);
    sigaction(SIGINT, &sa, NULL);
    sigaction(SIGHUP, &sa, NULL);
    signal(SIGPIPE, SIG_IGN);
    if (sim_servers_start(&s) != 0) {
        stop_flag = 1;
        sim_servers_join(&s);
        goto out;
    }
    if (truth && sim_truth_write(&s, truth) != 0)
        fprintf(stderr, "halostage-sim: cannot write %s\n", truth);
    while (!stop_flag) {
        struct timespec ts = {0, 100000000L};
        nanosleep(&ts, NULL);
        if (reload_flag) {
            reload_flag = 0;
            pthread_mutex_lock(&s.lock);
            s.n_faults = 0;
            int bad = 0;
            for (int i = 0; i < n_faults; i++)
                bad |= parse_fault(&s, faults[i]) != 0;
            if (fault_file)
                bad |= read_fault_file(&s, fault_file) != 0;
            size_t now_faults = s.n_faults;
            pthread_mutex_unlock(&s.lock);
            printf("halostage-sim: faults read again: %zu%s\n", now_faults,
                   bad ? " (some refused, see above)" : "");
            fflush(stdout);
        }
        if (later_h >= 0 && s.sim_time_s - s.start_time_s >= later_h * 3600.0)
            s.speed = later_speed;
        sim_model_step(&s, 0.1 * s.speed);
        if (truth && sim_truth_write(&s, truth) != 0)
            fprintf(stderr, "halostage-sim: cannot write %s\n", truth);
    }
    sim_servers_join(&s);
    rc = 0;
out:
    sim_model_free(&s);
    hs_site_free(&s.site);
    pthread_mutex_destroy(&s.lock);
    return rc;
}
