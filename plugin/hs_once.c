/* halostaged --once [--json]: one poll cycle against the configured devices,
 * for commissioning. Every bus is read once, in parallel (one worker each);
 * then every signal's registers, raw and decoded value and quality are shown,
 * and each pond's state where calc can give it. Exit status: 0 when every
 * signal read good, 1 when any did not, 78 for a bad configuration. */
#include <errno.h>
#include <jansson.h>
#include <math.h>
#include <modbus.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "hp_bus.h"
#include "hp_queue.h"
#include "hs_commission.h"
#include "hs_config.h"
#include "hc_level.h"
#include "hs_brine_eval.h"
#include "hs_pond_doc.h"
#include "hs_pond_shape.h"

typedef struct {
    bool seen;
    hp_sample sample;
} latest;

/* Reads every bus once; fills got[signal]. Returns 0, or -1 when a worker
 * could not start. */
static int poll_once(const hs_site *site, latest *got)
{
    size_t n = site->n_signals;
    hp_queue *q = hp_queue_new(4 * n + 16);
    hp_point *points = calloc(n ? n : 1, sizeof *points);
    uint32_t *global = calloc(n ? n : 1, sizeof *global);    /* bus-local -> signal */
    uint32_t *offset = calloc(site->n_buses + 1, sizeof *offset);
    hp_bus **buses = calloc(site->n_buses ? site->n_buses : 1, sizeof *buses);
    int rc = -1;
    if (!q || !points || !global || !offset || !buses)
        goto out;
    size_t k = 0;
    for (size_t b = 0; b < site->n_buses; b++) {
        offset[b] = (uint32_t)k;
        size_t first = k;
        for (size_t s = 0; s < n; s++)
            if (site->signals[s].bus_index == (int)b) {
                points[k] = site->signals[s].point;
                global[k++] = (uint32_t)s;
            }
        buses[b] = hp_bus_start(&site->buses[b].conf, points + first, k - first,
                                (uint32_t)b, q, true);
        if (!buses[b]) {
            fprintf(stderr, "halostaged: bus %s: cannot start its worker: %s\n",
                    site->buses[b].name, strerror(errno));
            goto out;
        }
    }
    offset[site->n_buses] = (uint32_t)k;
    rc = 0;
out:
    for (size_t b = 0; buses && b < site->n_buses; b++)
        hp_bus_join(buses[b]); /* a once-worker ends by itself */
    hp_sample batch[64];
    size_t got_n;
    while (q && (got_n = hp_queue_pop(q, batch, 64, 0)) > 0)
        for (size_t i = 0; i < got_n; i++) {
            uint32_t s = global[offset[batch[i].bus] + batch[i].point];
            got[s].seen = true;
            got[s].sample = batch[i];
        }
    hp_queue_free(q);
    free(points);
    free(global);
    free(offset);
    free(buses);
    return rc;
}

static const char *failure_text(const hp_sample *s, char *buf, size_t len)
{
    if (s->exception)
        snprintf(buf, len, "exception %d (%s)", s->exception,
                 modbus_strerror(MODBUS_ENOBASE + s->exception));
    else if (s->sys_errno == EHOSTDOWN)
        snprintf(buf, len, "not asked: its device (unit id) did not answer");
    else if (s->sys_errno)
        snprintf(buf, len, "%s", modbus_strerror(s->sys_errno));
    else
        buf[0] = '\0';
    return buf;
}

static void print_text(const hs_site *site, const latest *got)
{
    char why[128];
    printf("%-26s %-10s %4s %-7s %5s  %-19s %12s %12s %-6s %s\n", "signal", "bus", "unit",
           "table", "addr", "registers", "raw", "value", "unit", "quality");
    for (size_t s = 0; s < site->n_signals; s++) {
        const hs_signal *g = &site->signals[s];
        const hp_sample *smp = &got[s].sample;
        char regs[32] = "";
        size_t used = 0;
        for (unsigned i = 0; got[s].seen && i < smp->n_regs && i < 4; i++)
            used += (size_t)snprintf(regs + used, sizeof regs - used, "%s%04x", i ? " " : "",
                                     smp->regs[i]);
        printf("%-26s %-10s %4u %-7s %5u  %-19s %12.6g %12.6g %-6s %s %s\n", g->name, g->bus,
               g->point.unit_id, hp_table_name(g->point.table), g->point.address, regs,
               got[s].seen ? smp->raw : NAN, got[s].seen ? smp->value : NAN, g->unit,
               got[s].seen ? hp_quality_name(smp->quality) : "not-read",
               got[s].seen ? failure_text(smp, why, sizeof why) : "");
    }
}

static json_t *signal_json(const hs_signal *g, const latest *l)
{
    char why[128];
    json_t *o = json_object();
    json_t *regs = json_array();
    const hp_sample *s = &l->sample;
    for (unsigned i = 0; l->seen && i < s->n_regs && i < 4; i++)
        json_array_append_new(regs, json_integer(s->regs[i]));
    json_object_set_new(o, "bus", json_string(g->bus));
    json_object_set_new(o, "unit_id", json_integer(g->point.unit_id));
    json_object_set_new(o, "table", json_string(hp_table_name(g->point.table)));
    json_object_set_new(o, "address", json_integer(g->point.address));
    json_object_set_new(o, "registers", regs);
    json_object_set_new(o, "raw", l->seen && isfinite(s->raw) ? json_real(s->raw) : json_null());
    json_object_set_new(o, "value", l->seen && isfinite(s->value) ? json_real(s->value) : json_null());
    json_object_set_new(o, "unit", json_string(g->unit));
    json_object_set_new(o, "quality", json_string(l->seen ? hp_quality_name(s->quality) : "not-read"));
    if (l->seen && (s->exception || s->sys_errno))
        json_object_set_new(o, "error", json_string(failure_text(s, why, sizeof why)));
    if (l->seen && s->quality != HP_Q_GOOD)
        json_object_set_new(o, "reason", json_string(hp_sample_reason(s)));
    if (l->seen && s->exception)
        json_object_set_new(o, "exception", json_integer(s->exception));
    json_object_set_new(o, "time_ms", json_integer(l->seen ? s->time_ms : 0));
    return o;
}

static hs_quality reading_quality(hp_quality q)
{
    switch (q) {
    case HP_Q_GOOD: return HS_QUALITY_GOOD;
    case HP_Q_STALE: return HS_QUALITY_STALE;
    default: return HS_QUALITY_BAD;
    }
}

/* The samples of this one cycle as the runtime's readings (SI units), so
 * that --once computes pond states exactly as the service does. */
static void readings_of(const hs_site *site, const latest *got, hs_reading *r)
{
    for (size_t s = 0; s < site->n_signals; s++) {
        const hs_signal *g = &site->signals[s];
        const hp_sample *smp = &got[s].sample;
        r[s] = (hs_reading){.value = NAN, .quality = HS_QUALITY_BAD};
        if (!got[s].seen)
            continue;
        double v = smp->value * g->si_factor + g->si_offset;
        r[s].quality = reading_quality(smp->quality);
        r[s].t_ms = smp->time_ms;
        if (r[s].quality == HS_QUALITY_GOOD && isfinite(v)) {
            r[s].value = v;
            r[s].have = 1;
        }
    }
}

/* Why a pond with a level sensor has no depth (NULL when it has one). */
static const char *level_problem(const hs_site *site, size_t p, const hs_pond_view *v)
{
    if (isfinite(v->depth_m))
        return NULL;
    if (hs_site_signal(site, (int)p, HS_Q_LEVEL_PRESSURE) == NULL &&
        hs_site_signal(site, (int)p, HS_Q_LEVEL_DISTANCE) == NULL)
        return NULL;
    return "no usable level reading, or the sensor is out of the brine";
}

/* Volume and surface area at the level read, from the pond's geometry
 * (the same as the daemon's); left unknown without one. */
static void level_volume(const hs_pond *pd, double depth_m, struct hs_hydro_report *r)
{
    struct hs_stage_table table;
    int loaded = 0;
    hc_pond_shape shape;
    char err[600];
    memset(&table, 0, sizeof table);
    if (isfinite(depth_m) && hs_pond_shape_of(pd, &table, &loaded, &shape, err, sizeof err) == 0 &&
        hc_shape_at_level(&shape, depth_m, &r->volume_m3, &r->area_m2) != HC_OK)
        r->volume_m3 = r->area_m2 = NAN;
    if (loaded)
        hs_stage_table_free(&table);
}

/* On stderr, one line per device (bus, unit id) that did not answer at all:
 * every one of its signals timed out or was not asked (hp_bus.h). */
static void say_silent_devices(const hs_site *site, const latest *got)
{
    for (size_t i = 0; i < site->n_signals; i++) {
        const hs_signal *g = &site->signals[i];
        int first = 1, silent = 1;
        for (size_t j = 0; j < site->n_signals; j++) {
            const hs_signal *h = &site->signals[j];
            if (h->bus_index != g->bus_index || h->point.unit_id != g->point.unit_id)
                continue;
            if (j < i)
                first = 0; /* said from its first signal */
            const char *why = got[j].seen ? hp_sample_reason(&got[j].sample) : "";
            silent &= strcmp(why, "timeout") == 0 || strcmp(why, "device-down") == 0;
        }
        if (first && silent && g->bus_index >= 0)
            fprintf(stderr, "halostaged: [bus %s] device (unit id) %u did not answer; its "
                    "signals are comm-fail, the other devices were read\n", g->bus,
                    g->point.unit_id);
    }
}

static void print_ponds(const hs_site *site, const latest *got, const hs_brine_models *models,
                        bool json)
{
    hs_reading *readings = calloc(site->n_signals ? site->n_signals : 1, sizeof *readings);
    double g;
    if (readings == NULL) {
        fprintf(stderr, "halostaged: out of memory\n");
        return;
    }
    if (hc_gravity(site->site.latitude_deg, site->site.elevation_m, &g) != HC_OK)
        g = HC_STANDARD_GRAVITY;
    readings_of(site, got, readings);
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    int64_t now_ms = (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
    for (size_t p = 0; p < site->n_ponds; p++) {
        hs_pond_view res;
        hs_pond_evaluate(site, p, readings, models, NULL, g, now_ms, &res);
        const char *problem = res.have_state ? NULL : res.note;
        const char *lproblem = level_problem(site, p, &res);
        const hs_pond *pd = &site->ponds[p];
        if (!json) {
            printf("pond %-10s %-13s", pd->name, hs_role_name(pd->role));
            if (isfinite(res.state.density_kg_m3))
                printf(" density %.1f kg/m3 at %.1f C", res.state.density_kg_m3,
                       res.state.temperature_c);
            if (isfinite(res.state.baume))
                printf(", SG %.4f, %.2f Be (%g C)", res.state.specific_gravity,
                       res.state.baume, res.state.reference_temperature_c);
            if (isfinite(res.depth_m))
                printf(", depth %.3f m", res.depth_m);
            printf(" [%s]", hc_method_name(res.state.method));
            if (problem)
                printf("; %s", problem);
            if (lproblem)
                printf("; %s", lproblem);
            printf("\n");
            continue;
        }
        struct hs_pond_doc d;
        hs_pond_doc_init(&d);
        d.pond = pd->name;
        d.role = hs_role_name(pd->role);
        d.t_ms = res.t_ms;
        d.now_ms = now_ms;
        d.stale_after_ms = site->site.stale_after_ms;
        d.quality = res.quality;
        d.level_quality = isfinite(res.depth_m) ? (int)res.depth_quality : -1;
        d.state = res.state;
        d.hydro.depth_m = res.depth_m;
        level_volume(pd, res.depth_m, &d.hydro);
        d.note = problem;
        d.level_note = lproblem;
        json_t *o = hs_pond_doc_json(&d);
        if (!o) {
            fprintf(stderr, "halostaged: out of memory\n");
            break;
        }
        json_t *sigs = json_object();
        for (size_t s = 0; s < site->n_signals; s++)
            if (site->signals[s].pond_index == (int)p)
                json_object_set_new(sigs, hs_quantity_name(site->signals[s].quantity),
                                    signal_json(&site->signals[s], &got[s]));
        json_object_set_new(o, "signals", sigs);
        char *line = hs_doc_dumps(o);
        if (line) {
            printf("%s\n", line);
            free(line);
        }
        json_decref(o);
    }
    free(readings);
}

int hs_once_run(const char *config_path, bool json)
{
    hs_site site;
    hs_diag diag;
    if (hs_site_load(config_path, &site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            fprintf(stderr, "%s\n", diag.msg[i]);
        return HS_EXIT_CONFIG;
    }
    int rc = 1;
    hs_brine_models *models = NULL;
    latest *got = calloc(site.n_signals ? site.n_signals : 1, sizeof *got);
    if (hs_brine_models_build(&site, &models) != 0) {
        fprintf(stderr, "halostaged: %s: cannot build the evaporation path of the feeds\n",
                config_path);
        free(got);
        hs_site_free(&site);
        return 1;
    }
    if (got && poll_once(&site, got) == 0) {
        say_silent_devices(&site, got);
        if (!json)
            print_text(&site, got);
        print_ponds(&site, got, models, json);
        rc = 0;
        for (size_t s = 0; s < site.n_signals; s++)
            if (!got[s].seen || got[s].sample.quality != HP_Q_GOOD)
                rc = 1;
    }
    fflush(stdout);
    free(got);
    hs_brine_models_free(models);
    hs_site_free(&site);
    return rc;
}
