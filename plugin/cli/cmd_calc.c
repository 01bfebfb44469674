/* `halostage calc`: the brine state of one sample, from conductivity and
 * temperature or from density and temperature, as a table or as JSON.
 *
 * parse_request() reads the options into a calc_request, compute_state()
 * turns it into an hc_brine_state and print_table()/JSON print it. In the
 * seawater range the numbers come from PSS-78 and EOS-80; the stage, the
 * next stage and its density, the saturation indices and the water activity
 * come from the evaporation path of the feed (hc_path) at the sample
 * temperature. Beyond S_P 42 the path gives everything: from density, or
 * from conductivity through the built-in brine conductivity model. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "hs_accuracy.h"
#include "hc_baume.h"
#include "hc_eos80.h"
#include "hc_path.h"
#include "hc_pss78.h"
#include "hc_seawater.h"
#include "hc_state.h"
#include "hc_uncertainty.h"
#include "hp_state_json.h"

struct calc_request {
    int have_conductivity;
    double conductivity_ms_cm;
    int have_density;
    double density_kg_m3;
    int have_temperature;
    double temperature_c;
    double pressure_dbar;
    const char *feed_name;
    hc_seawater_options opt;
    const char *tref_text; /* as typed, for messages */
    int json;
    int have_accuracy;     /* --accuracy: of the conductivity or density */
    double accuracy_abs;   /* +- in the input's unit */
    double accuracy_rel;   /* +- fraction of the reading */
    int have_t_accuracy;
    double t_accuracy;     /* +- [degC] */
};

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage calc --conductivity MS_CM --temperature DEGC [OPTIONS]\n"
            "       halostage calc --density KG_M3 --temperature DEGC [OPTIONS]\n"
            "\n"
            "The brine state of one sample: practical salinity (PSS-78), density\n"
            "(EOS-80), specific gravity and degree Baume at a reference temperature,\n"
            "concentration factor against the feed, and from the feed's evaporation\n"
            "path (Pitzer model): stage, next stage and its density, saturation\n"
            "indices, water activity. Beyond seawater (S_P 42) the path gives the\n"
            "state from density, or from conductivity through the built-in brine\n"
            "model (flagged; near halite a density reading is preferred).\n"
            "\n"
            "  --conductivity MS_CM     conductivity of the sample [mS/cm]\n"
            "  --density KG_M3          density measured at the sample temperature [kg/m3]\n"
            "  --temperature DEGC       sample temperature, ITS-90 [degC], -2..45\n"
            "  --pressure DBAR          sea pressure at the sensor [dbar], default 0\n"
            "  --feed NAME              feed water; `seawater` (S_P 35, the default)\n"
            "  --feed-salinity SP       feed of reference composition with this S_P\n"
            "  --reference-temperature DEGC|60F\n"
            "                           for specific gravity and Baume: 15 (default), 20, 60F\n"
            "  --modulus M              Baume modulus: 145 (default), 144.3, 146.78, ...\n"
            "  --accuracy N|N%%          the instrument's +-limit on --conductivity or\n"
            "                           --density (default 0.5%% of a conductivity,\n"
            "                           0.5 kg/m3 of a density: usual instrument classes)\n"
            "  --temperature-accuracy N +-limit of the temperature [degC]\n"
            "                           (default Pt100 class A: 0.15 + 0.002 |t|)\n"
            "  --json                   one JSON object instead of the table\n"
            "\n"
            "Each density, SG, Baume and CF carries its standard uncertainty (k = 1),\n"
            "propagated through the method used (GUM, JCGM 100:2008). A density given\n"
            "is reported as given; past the end of the evaporation path the stage is\n"
            "the path's last and the concentration factor is unknown (beyond-path).\n");
}

/* 0 ok, 2 usage error (message printed), 3 --help shown. */
static int parse_request(int argc, char **argv, struct calc_request *rq)
{
    memset(rq, 0, sizeof *rq);
    hc_seawater_options_default(&rq->opt);
    rq->feed_name = "seawater";
    rq->tref_text = "15";
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            usage(stdout);
            return 3;
        }
        if (strcmp(a, "--json") == 0) {
            rq->json = 1;
            continue;
        }
        const char *v = hs_cli_value("calc", argc, argv, &i);
        if (v == NULL)
            return 2;
        int rc = 0;
        if (strcmp(a, "--conductivity") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->conductivity_ms_cm);
            rq->have_conductivity = 1;
        } else if (strcmp(a, "--density") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->density_kg_m3);
            rq->have_density = 1;
        } else if (strcmp(a, "--temperature") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->temperature_c);
            rq->have_temperature = 1;
        } else if (strcmp(a, "--pressure") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->pressure_dbar);
        } else if (strcmp(a, "--feed") == 0) {
            if (strcmp(v, "seawater") != 0) {
                fprintf(stderr,
                        "halostage calc: --feed %s: unknown feed (known: seawater; "
                        "--feed-salinity SP for seawater of another salinity)\n", v);
                return 2;
            }
            rq->feed_name = v;
            rq->opt.feed_sp = HC_SW_FEED_SP_DEFAULT;
        } else if (strcmp(a, "--feed-salinity") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->opt.feed_sp);
            if (rc == 0 && (rq->opt.feed_sp <= 0.0 || rq->opt.feed_sp > HC_PSS78_SP_MAX)) {
                fprintf(stderr, "halostage calc: --feed-salinity %s: must be above 0 and at "
                                "most %.0f\n", v, HC_PSS78_SP_MAX);
                return 1;
            }
            rq->feed_name = "seawater (given salinity)";
        } else if (strcmp(a, "--reference-temperature") == 0) {
            rc = hs_cli_tref("calc", v, HC_EOS80_T_MIN_C, HC_EOS80_T_VALID_MAX_C,
                             &rq->opt.reference_temperature_c);
            rq->tref_text = v;
        } else if (strcmp(a, "--accuracy") == 0) {
            char why[160];
            int bad = hs_accuracy_parse(v, 1.0, &rq->accuracy_abs, &rq->accuracy_rel, why,
                                        sizeof why);
            if (bad < 0) {
                fprintf(stderr, "halostage calc: --accuracy: %s\n", why);
                return bad == -2 ? 1 : 2; /* out of range: 1, not an accuracy: 2 */
            }
            rq->have_accuracy = 1;
        } else if (strcmp(a, "--temperature-accuracy") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->t_accuracy);
            if (rc == 0 && !(rq->t_accuracy >= 0.0 && rq->t_accuracy < 50.0)) {
                fprintf(stderr, "halostage calc: --temperature-accuracy %s: must be 0 or more "
                                "and below 50 degC\n", v);
                return 1;
            }
            rq->have_t_accuracy = 1;
        } else if (strcmp(a, "--modulus") == 0) {
            rc = hs_cli_number("calc", a, v, &rq->opt.baume_modulus);
            if (rc == 0 && !hc_baume_modulus_valid(rq->opt.baume_modulus)) {
                fprintf(stderr, "halostage calc: --modulus %s: must be a positive number "
                                "(145, 144.3 or 146.78 are usual)\n", v);
                return 1;
            }
        } else {
            fprintf(stderr, "halostage calc: unknown option '%s' (see --help)\n", a);
            return 2;
        }
        if (rc != 0)
            return HS_CLI_EXIT(rc);
    }
    if (rq->have_conductivity == rq->have_density) {
        fprintf(stderr, "halostage calc: give exactly one of --conductivity or --density\n");
        return 2;
    }
    if (!rq->have_temperature) {
        fprintf(stderr, "halostage calc: --temperature is required\n");
        return 2;
    }
    /* Values no brine can have are typing mistakes: refuse them rather than
     * print the state at the end of the evaporation path. Bounds are
     * generous (common practice, no source: saturated NaCl brine is near
     * 250 mS/cm at 25 degC and the densest bitterns near 1400 kg/m3). */
    if (rq->have_conductivity && rq->conductivity_ms_cm > 1000.0) {
        fprintf(stderr, "halostage calc: --conductivity %g: above 1000 mS/cm, beyond any brine\n",
                rq->conductivity_ms_cm);
        return 1;
    }
    if (rq->have_density && rq->density_kg_m3 > 2000.0) {
        fprintf(stderr, "halostage calc: --density %g: above 2000 kg/m3, beyond any brine\n",
                rq->density_kg_m3);
        return 1;
    }
    return 0;
}

/* One line naming the input that a calc error refers to. */
static void explain(const struct calc_request *rq, hc_status st)
{
    const char *what = rq->have_conductivity ? "--conductivity" : "--density";
    double value = rq->have_conductivity ? rq->conductivity_ms_cm : rq->density_kg_m3;
    switch (st) {
    case HC_ERR_TEMPERATURE_RANGE:
        fprintf(stderr, "halostage calc: --temperature %g: outside %.0f..%.0f degC\n",
                rq->temperature_c, HC_PSS78_T_MIN_C, HC_PSS78_T_MAX_C);
        return;
    case HC_ERR_PRESSURE_RANGE:
        fprintf(stderr, "halostage calc: --pressure %g: outside 0..%.0f dbar\n",
                rq->pressure_dbar, HC_PSS78_P_MAX_DBAR);
        return;
    case HC_ERR_NEGATIVE:
        fprintf(stderr, "halostage calc: %s %g: cannot be negative\n", what, value);
        return;
    case HC_ERR_SALINITY_RANGE:
        fprintf(stderr, "halostage calc: %s %g at %g degC is beyond the brine models\n", what,
                value, rq->temperature_c);
        return;
    case HC_ERR_NO_CONVERGENCE:
        fprintf(stderr, "halostage calc: the evaporation path of the feed could not be "
                        "computed at %g degC\n", rq->temperature_c);
        return;
    case HC_ERR_DOMAIN:
        fprintf(stderr, "halostage calc: --density %g kg/m3 is below pure water at %g degC\n",
                value, rq->temperature_c);
        return;
    default:
        fprintf(stderr, "halostage calc: %s %g: %s\n", what, value, hc_status_text(st));
        return;
    }
}

/* The stage and saturation of a seawater-range state, from the path at its
 * concentration factor; the PSS-78/EOS-80 numbers stay as they are. */
static void add_path_view(const hc_path *path, hc_brine_state *st)
{
    hc_brine_state v;
    double cf = fmax(1.0, st->concentration_factor);
    if (hc_path_state_from_cf(path, cf, st->temperature_c, st->reference_temperature_c,
                              st->baume_modulus, &v) != HC_OK)
        return;
    st->stage = v.stage;
    st->next_stage = v.next_stage;
    st->next_stage_density_kg_m3 = v.next_stage_density_kg_m3;
    st->next_stage_density_ref_kg_m3 = v.next_stage_density_ref_kg_m3;
    memcpy(st->saturation_index, v.saturation_index, sizeof st->saturation_index);
    st->water_activity = v.water_activity;
}

/* The state of (value, t): conductivity or density as the request says,
 * through PSS-78/EOS-80 in the seawater range, else the path (NULL: none). */
static hc_status state_at(const struct calc_request *rq, const hc_path *path, double value,
                          double t_c, hc_brine_state *st)
{
    hc_status s;
    if (rq->have_conductivity)
        s = hc_seawater_state_from_conductivity(value, t_c, rq->pressure_dbar, &rq->opt, st);
    else
        s = hc_seawater_state_from_density(value, t_c, rq->pressure_dbar, &rq->opt, st);
    if (s != HC_OK && s != HC_ERR_SALINITY_RANGE)
        return s;
    if (s == HC_OK) {
        if (path != NULL)
            add_path_view(path, st);
        return HC_OK;
    }
    if (path == NULL)
        return s;
    double t_ref = rq->opt.reference_temperature_c, m = rq->opt.baume_modulus;
    if (rq->have_conductivity)
        return hc_path_state_from_conductivity(path, value, t_c, t_ref, m, NULL, st);
    return hc_path_state_from_density(path, value, t_c, t_ref, m, st);
}

struct calc_method {
    const struct calc_request *rq;
    const hc_path *path;
};

/* x: the measured value, t [degC], brine model offset [1] (hc_uncertainty.h). */
static hc_status calc_method_fn(const double *x, const void *ctx, double *y)
{
    const struct calc_method *cm = ctx;
    hc_brine_state st;
    hc_status s = state_at(cm->rq, cm->path, x[0] * (1.0 + x[2]), x[1], &st);
    if (s == HC_OK)
        hc_unc_outputs(&st, y);
    return s;
}

static hc_status compute_state(const struct calc_request *rq, hc_brine_state *st)
{
    /* The feed's evaporation path at the sample temperature (built once here;
     * the daemon builds it once per site). A feed below S_P 2 has none. */
    hc_feed feed;
    hc_path *path = NULL;
    hc_status ps = hc_feed_seawater(rq->opt.feed_sp, &feed);
    if (ps == HC_OK)
        ps = hc_path_build(&feed, rq->temperature_c, HC_PATH_FRACTIONAL, &path);
    double value = rq->have_conductivity ? rq->conductivity_ms_cm : rq->density_kg_m3;
    hc_status s = state_at(rq, ps == HC_OK ? path : NULL, value, rq->temperature_c, st);
    if (s == HC_ERR_SALINITY_RANGE && ps == HC_ERR_NO_CONVERGENCE)
        s = ps;
    if (s == HC_OK) {
        /* the instrument classes a daemon assumes (plugin/hs_accuracy.h);
         * the daemon's units for these three are calc's: mS/cm, kg/m3, degC */
        double a_value = rq->have_accuracy ? rq->accuracy_abs + rq->accuracy_rel * fabs(value)
                         : hs_accuracy_default(rq->have_conductivity ? HS_Q_CONDUCTIVITY
                                                                     : HS_Q_DENSITY,
                                               value);
        double a_t = rq->have_t_accuracy ? rq->t_accuracy
                                         : hs_accuracy_default(HS_Q_TEMPERATURE,
                                                               rq->temperature_c);
        double x[3] = {value, rq->temperature_c, 0.0};
        double u[3] = {hc_unc_from_accuracy(a_value), hc_unc_from_accuracy(a_t),
                       st->method == HC_METHOD_BRINE_CONDUCTIVITY ? HC_UNC_BRINE_MODEL_REL : 0.0};
        struct calc_method cm = {rq, ps == HC_OK ? path : NULL};
        double u_y[HC_UNC_OUTPUTS];
        if (hc_unc_propagate(calc_method_fn, &cm, x, u, 3, u_y) == HC_OK)
            hc_unc_store(u_y, st);
    }
    hc_path_free(path);
    return s;
}

static void print_value(const char *label, double v, const char *fmt, const char *unit)
{
    printf("  %-24s ", label);
    if (isfinite(v))
        printf(fmt, v);
    else
        printf("-");
    printf("%s\n", unit);
}

static void print_table(const struct calc_request *rq, const hc_brine_state *st)
{
    char tref[48];
    char unit[96];
    if (fabs(st->reference_temperature_c - HC_TREF_60F) < 1e-9)
        snprintf(tref, sizeof tref, "60/60 degF");
    else
        snprintf(tref, sizeof tref, "%g/%g degC", st->reference_temperature_c,
                 st->reference_temperature_c);

    printf("Brine state (%s, method %s)\n",
           rq->have_conductivity ? "from conductivity" : "from density",
           hc_method_name(st->method));
    if (rq->have_conductivity)
        print_value("conductivity", rq->conductivity_ms_cm, "%.3f", " mS/cm");
    print_value("temperature", st->temperature_c, "%.2f", " degC (ITS-90)");
    if (rq->pressure_dbar != 0.0)
        print_value("pressure", rq->pressure_dbar, "%.1f", " dbar");
    print_value("practical salinity", st->practical_salinity, "%.4f", " (PSS-78)");
    print_value("salinity", st->salinity_g_kg, "%.3f", " g/kg of brine");
    print_value("density", st->density_kg_m3, "%.3f", " kg/m3 at sample temperature");
    print_value("  uncertainty", st->density_uncertainty_kg_m3, "+-%.3f", " kg/m3 (k = 1)");
    snprintf(unit, sizeof unit, " kg/m3 at the reference temperature (what bands compare)");
    print_value("density (reference)", st->density_ref_kg_m3, "%.3f", unit);
    snprintf(unit, sizeof unit, " (%s)", tref);
    print_value("specific gravity", st->specific_gravity, "%.5f", unit);
    print_value("  uncertainty", st->sg_uncertainty, "+-%.5f", "");
    snprintf(unit, sizeof unit, " deg Be (modulus %g)", st->baume_modulus);
    print_value("degree Baume", st->baume, "%.2f", unit);
    print_value("  uncertainty", st->baume_uncertainty, "+-%.2f", " deg Be");
    snprintf(unit, sizeof unit, " (feed: %s, S_P %g)", rq->feed_name, rq->opt.feed_sp);
    print_value("concentration factor", st->concentration_factor, "%.3f", unit);
    print_value("  uncertainty", st->cf_uncertainty, "+-%.3f", "");
    printf("  %-24s %s\n", "stage", hc_stage_name(st->stage));
    if (st->next_stage != HC_STAGE_NONE) {
        printf("  %-24s %s", "next stage", hc_stage_name(st->next_stage));
        if (isfinite(st->next_stage_density_kg_m3))
            printf(" at %.1f kg/m3 (at sample temperature)", st->next_stage_density_kg_m3);
        if (isfinite(st->next_stage_density_ref_kg_m3))
            printf(", %.1f kg/m3 at the reference temperature",
                   st->next_stage_density_ref_kg_m3);
        printf("\n");
    }
    print_value("water activity", st->water_activity, "%.4f", "");
    print_value("SI gypsum", st->saturation_index[HC_MIN_GYPSUM], "%+.3f",
                " (log10 IAP/K; 0 = saturated)");
    print_value("SI halite", st->saturation_index[HC_MIN_HALITE], "%+.3f", "");
    if (st->warnings == 0)
        printf("  %-24s none\n", "warnings");
    for (unsigned i = 0; i < HC_WARN_COUNT_BITS; i++) {
        unsigned bit = 1u << i;
        if ((st->warnings & bit) && hc_warning_text(bit) != NULL)
            printf("  %-24s %s\n", "warning", hc_warning_text(bit));
    }
}

static int print_json(const hc_brine_state *st)
{
    json_t *obj = hp_state_to_json(st);
    char *text = obj != NULL ? json_dumps(obj, JSON_REAL_PRECISION(12)) : NULL;
    json_decref(obj);
    if (text == NULL) {
        fprintf(stderr, "halostage calc: out of memory formatting JSON\n");
        return 1;
    }
    printf("%s\n", text);
    free(text);
    return 0;
}

int hs_cmd_calc(int argc, char **argv)
{
    struct calc_request rq;
    int rc = parse_request(argc, argv, &rq);
    if (rc == 3)
        return 0;
    if (rc != 0)
        return rc == 1 ? 1 : 2; /* 1: a value out of range, 2: usage */

    hc_brine_state st;
    hc_status s = compute_state(&rq, &st);
    if (s != HC_OK) {
        explain(&rq, s);
        return 1;
    }
    if (rq.json)
        return print_json(&st);
    print_table(&rq, &st);
    return 0;
}
