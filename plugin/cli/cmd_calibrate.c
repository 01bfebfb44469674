/* halostage calibrate --config FILE --pond P --sg X
 *                    [--sg-reference-temperature C|60F]
 *                    [--conductivity MS_CM --temperature C] [--time ISO]
 *                    [--operator NAME] [--note TEXT]
 * halostage calibrate --config FILE --list [--pond P] [--json]
 * Records an operator's hydrometer reading in the site's store, or lists
 * them. A reading with the inline conductivity and temperature of its time
 * joins the pond's site calibration; every reading can stand in for the
 * pond's density for [pond] manual_reading_max_age where conductivity says
 * little. The running daemon picks new readings up within seconds.
 * Exit 0 done, 1 store failure, 2 usage or a value out of range, 78 bad
 * config. */
#include <getopt.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "commands.h"
#include "store_opts.h"

/* 60 degF on the Celsius scale: (60 - 32) / 1.8 (60 degF, the US Baume scale reference). */
#define SIXTY_F_IN_C (28.0 / 1.8)

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage calibrate --config FILE --pond POND --sg SG\n"
            "                           [--sg-reference-temperature DEGC|60F]\n"
            "                           [--conductivity MS_CM --temperature DEGC]\n"
            "                           [--time ISO|now] [--operator NAME] [--note TEXT]\n"
            "       halostage calibrate --config FILE --list [--pond POND] [--json]\n"
            "  Records a hydrometer reading: SG at the reference temperature against water at\n"
            "  the same temperature (default: the site's reference temperature). With the\n"
            "  inline conductivity and temperature of that moment it also calibrates the\n"
            "  pond's conductivity beyond PSS-78.\n");
}

static int number(const char *opt, const char *text, double lo, double hi, double *out)
{
    char msg[160];
    if (hs_parse_double(text, out, msg, sizeof msg) != 0) {
        fprintf(stderr, "halostage calibrate: %s %s: %s\n", opt, text, msg);
        return -1;
    }
    if (!(*out >= lo && *out <= hi)) {
        fprintf(stderr, "halostage calibrate: %s %s: outside %g to %g\n", opt, text, lo, hi);
        return -1;
    }
    return 0;
}

static int reference_temperature(const char *text, double *out)
{
    if (strcmp(text, "60F") == 0 || strcmp(text, "60f") == 0) {
        *out = SIXTY_F_IN_C;
        return 0;
    }
    return number("--sg-reference-temperature", text, 0.0, 40.0, out);
}

struct lister {
    json_t *rows; /* NULL: text */
    size_t n;
};

static json_t *num(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static void time_text(int64_t t_ms, char *buf, size_t len)
{
    time_t t = (time_t)(t_ms / 1000);
    struct tm tm;
    if (gmtime_r(&t, &tm) == NULL || strftime(buf, len, "%Y-%m-%dT%H:%M:%SZ", &tm) == 0)
        snprintf(buf, len, "%lld", (long long)t_ms);
}

static void list_row(void *ctx, const hs_calibration_row *r)
{
    struct lister *l = ctx;
    char when[40];
    time_text(r->t_ms, when, sizeof when);
    l->n++;
    if (l->rows != NULL) {
        json_t *o = json_object();
        json_object_set_new(o, "time", json_string(when));
        json_object_set_new(o, "pond", json_string(r->pond ? r->pond : ""));
        json_object_set_new(o, "specific_gravity", num(r->specific_gravity));
        json_object_set_new(o, "reference_temperature_c", num(r->reference_temperature_c));
        json_object_set_new(o, "conductivity_ms_cm", num(r->conductivity_ms_cm));
        json_object_set_new(o, "temperature_c", num(r->temperature_c));
        json_object_set_new(o, "operator", r->operator_name ? json_string(r->operator_name)
                                                            : json_null());
        json_object_set_new(o, "note", r->note ? json_string(r->note) : json_null());
        json_array_append_new(l->rows, o);
        return;
    }
    if (l->n == 1)
        printf("%-20s %-12s %8s %7s %10s %7s  %s\n", "time", "pond", "SG", "ref_C", "mS/cm",
               "temp_C", "operator");
    char cond[16] = "-", temp[16] = "-";
    if (isfinite(r->conductivity_ms_cm))
        snprintf(cond, sizeof cond, "%.2f", r->conductivity_ms_cm);
    if (isfinite(r->temperature_c))
        snprintf(temp, sizeof temp, "%.2f", r->temperature_c);
    printf("%-20s %-12s %8.4f %7.2f %10s %7s  %s\n", when, r->pond ? r->pond : "",
           r->specific_gravity, r->reference_temperature_c, cond, temp,
           r->operator_name ? r->operator_name : "");
}

static int list(hs_store *st, const char *pond, int json)
{
    struct lister l = {json ? json_array() : NULL, 0};
    if (hs_store_calibrations(st, pond, list_row, &l) != 0) {
        fprintf(stderr, "halostage calibrate: %s\n", hs_store_error(st));
        json_decref(l.rows);
        return 1;
    }
    if (json) {
        char *text = json_dumps(l.rows, JSON_COMPACT | JSON_PRESERVE_ORDER);
        if (text != NULL)
            printf("%s\n", text);
        free(text);
        json_decref(l.rows);
    } else if (l.n == 0) {
        printf("no hydrometer readings%s%s\n", pond ? " for pond " : "", pond ? pond : "");
    }
    return 0;
}

/* Opens the store for writing a reading: the daemon's file when it exists
 * (WAL lets the daemon keep writing), else a new one. */
static hs_store *open_for_reading(const hs_site *site)
{
    char err[600];
    struct stat sb;
    hs_store_mode mode = stat(site->site.database, &sb) == 0 ? HS_STORE_READ : HS_STORE_WRITE;
    hs_store *st = hs_store_open(site->site.database, mode, NULL, err, sizeof err);
    if (st == NULL)
        fprintf(stderr, "halostage calibrate: %s\n", err);
    return st;
}

int hs_cmd_calibrate(int argc, char **argv)
{
    static const struct option opts[] = {
        {"config", required_argument, NULL, 'c'},
        {"pond", required_argument, NULL, 'p'},
        {"sg", required_argument, NULL, 's'},
        {"sg-reference-temperature", required_argument, NULL, 'r'},
        {"conductivity", required_argument, NULL, 'k'},
        {"temperature", required_argument, NULL, 't'},
        {"time", required_argument, NULL, 'T'},
        {"operator", required_argument, NULL, 'o'},
        {"note", required_argument, NULL, 'n'},
        {"list", no_argument, NULL, 'l'},
        {"json", no_argument, NULL, 'j'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *config = NULL, *pond = NULL, *when = "now", *oper = NULL, *note = NULL;
    const char *sg_text = NULL, *ref_text = NULL, *cond_text = NULL, *temp_text = NULL;
    int listing = 0, json = 0, c;
    optind = 1;
    while ((c = getopt_long(argc, argv, "c:p:s:r:k:t:T:o:n:ljh", opts, NULL)) != -1) {
        switch (c) {
        case 'c': config = optarg; break;
        case 'p': pond = optarg; break;
        case 's': sg_text = optarg; break;
        case 'r': ref_text = optarg; break;
        case 'k': cond_text = optarg; break;
        case 't': temp_text = optarg; break;
        case 'T': when = optarg; break;
        case 'o': oper = optarg; break;
        case 'n': note = optarg; break;
        case 'l': listing = 1; break;
        case 'j': json = 1; break;
        case 'h': usage(stdout); return 0;
        default: usage(stderr); return 2;
        }
    }
    if (config == NULL || optind < argc) {
        fprintf(stderr, "halostage calibrate: need --config FILE\n");
        usage(stderr);
        return 2;
    }
    if (listing && (sg_text || ref_text || cond_text || temp_text)) {
        fprintf(stderr, "halostage calibrate: --list takes only --pond and --json\n");
        return 2;
    }
    if (!listing && (pond == NULL || sg_text == NULL)) {
        fprintf(stderr, "halostage calibrate: a reading needs --pond and --sg (or use --list)\n");
        usage(stderr);
        return 2;
    }
    if ((cond_text == NULL) != (temp_text == NULL)) {
        fprintf(stderr, "halostage calibrate: --conductivity and --temperature go together "
                        "(the inline signals at the moment of the reading)\n");
        return 2;
    }
    hs_site site;
    if (hs_cli_load_site(config, &site) != 0)
        return HS_EXIT_CONFIG;
    int rc = 2;
    hs_store *st = NULL;
    if (hs_cli_known_pond("calibrate", "--pond", &site, pond) != 0)
        goto done;
    hs_calibration_row row = {
        .pond = pond,
        .hydrometer_temperature_c = NAN,
        .reference_temperature_c = site.site.reference_temperature_c,
        .conductivity_ms_cm = NAN,
        .temperature_c = NAN,
        .operator_name = oper ? oper : getenv("USER"),
        .note = note,
    };
    if (!listing) {
        char msg[200];
        /* SG 0.99 to 1.40: water to past bischofite (Usiglio 1849: 1.30 is
         * 33.5 Be; late bittern stays below 1.40), common practice, no source */
        if (number("--sg", sg_text, 0.99, 1.40, &row.specific_gravity) != 0 ||
            (ref_text && reference_temperature(ref_text, &row.reference_temperature_c) != 0) ||
            (cond_text && number("--conductivity", cond_text, 0.0, 1000.0,
                                 &row.conductivity_ms_cm) != 0) ||
            (temp_text && number("--temperature", temp_text, -5.0, 60.0, &row.temperature_c) != 0))
            goto done;
        int64_t now_ms = hs_cli_now_ms();
        if (hs_cli_time(when, now_ms, &row.t_ms, msg, sizeof msg) != 0) {
            fprintf(stderr, "halostage calibrate: --time %s: %s\n", when, msg);
            goto done;
        }
        if (row.t_ms > now_ms + 60000) {
            fprintf(stderr, "halostage calibrate: --time %s is in the future\n", when);
            goto done;
        }
    }
    st = open_for_reading(&site);
    if (st == NULL) {
        rc = 1;
        goto done;
    }
    if (listing) {
        rc = list(st, pond, json);
        goto done;
    }
    if (hs_store_add_calibration(st, &row) != 0 || hs_store_flush(st) != 0) {
        fprintf(stderr, "halostage calibrate: %s\n", hs_store_error(st));
        rc = 1;
        goto done;
    }
    char at[40];
    time_text(row.t_ms, at, sizeof at);
    printf("recorded: pond %s, SG %.4f at %.2f/%.2f degC, %s", pond, row.specific_gravity,
           row.reference_temperature_c, row.reference_temperature_c, at);
    if (isfinite(row.conductivity_ms_cm))
        printf(", %.2f mS/cm at %.2f degC (joins the site calibration)", row.conductivity_ms_cm,
               row.temperature_c);
    printf("\n");
    rc = 0;
done:
    hs_store_close(st);
    hs_site_free(&site);
    return rc;
}
