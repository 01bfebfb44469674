/* `halostage path`: the evaporation path of a feed water, from the feed to
 * bischofite: stage, density, Baume, water activity and the minerals
 * deposited at each step, and the onset of every mineral. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "cli/ion_args.h"
#include "hc_baume.h"
#include "hc_minerals.h"
#include "hc_path.h"
#include "hp_state_json.h"

#define CMD "path"

struct path_request {
    double feed_sp;
    int have_analysis;
    hc_feed_analysis analysis;
    double t_c;
    hc_path_mode mode;
    double t_ref_c;
    double modulus;
    unsigned mineral_flags;
    double log_p_co2;
    int json;
    int all_steps;
};

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage path [OPTIONS]\n"
            "\n"
            "The evaporation path of a feed water (Pitzer model, Harvie, Moller & Weare\n"
            "1984): what deposits, in which order, at what density and degree Baume.\n"
            "CF is the concentration factor: initial over remaining mass of water.\n"
            "\n"
            "  --feed seawater             reference seawater (Millero et al. 2008), default\n"
            "  --feed-salinity SP          seawater of this practical salinity, default 35\n"
            "  --feed-analysis LIST        a site's own feed, e.g. Na=10.8,Cl=19.4,Mg=1.3,...\n"
            "  --feed-unit g/kg|mg/L       unit of --feed-analysis, default g/kg\n"
            "  --feed-density KG_M3        density of the feed, for mg/L (default: computed)\n"
            "  --temperature DEGC          pond temperature [degC], default 25 (model: 0..50)\n"
            "  --mode fractional|equilibrium\n"
            "                              fractional (default): solids stay behind, as in a\n"
            "                              pond chain; equilibrium: solids stay in contact\n"
            "  --with-anhydrite            let anhydrite form (ponds make gypsum instead)\n"
            "  --calcite                   CaCO3 forms as calcite; default aragonite (what\n"
            "                              ponds make: Mg2+ in the brine inhibits calcite)\n"
            "  --no-carbonate              drop HCO3/CO3: no CaCO3, no CO2 exchange\n"
            "  --pco2-log LOG10_ATM        CO2 pressure the ponds see, log10 atm, default -3.4\n"
            "                              (air, about 400 uatm); -8..-0.1\n"
            "  --reference-temperature T   for specific gravity and Baume: 15 (default), 20, 60F\n"
            "  --modulus M                 Baume modulus, default 145\n"
            "  --all-steps                 every step in the table, not a selection\n"
            "  --json                      one JSON object instead of the tables\n");
}

/* 0 ok, 2 usage error (message printed), 3 --help shown. */
static int parse(int argc, char **argv, struct path_request *rq)
{
    memset(rq, 0, sizeof *rq);
    rq->feed_sp = 35.0;
    rq->t_c = 25.0;
    rq->mode = HC_PATH_FRACTIONAL;
    rq->t_ref_c = 15.0;
    rq->modulus = 145.0;
    rq->analysis.unit = HC_FEED_G_PER_KG;
    rq->analysis.density_kg_m3 = NAN;
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
        if (strcmp(a, "--all-steps") == 0) {
            rq->all_steps = 1;
            continue;
        }
        if (strcmp(a, "--with-anhydrite") == 0) {
            rq->mineral_flags |= HC_MINERALS_WITH_ANHYDRITE;
            continue;
        }
        if (strcmp(a, "--calcite") == 0) {
            rq->mineral_flags |= HC_MINERALS_CALCITE;
            continue;
        }
        if (strcmp(a, "--no-carbonate") == 0) {
            rq->mineral_flags |= HC_MINERALS_NO_CARBONATE;
            continue;
        }
        const char *v = hs_cli_value(CMD, argc, argv, &i);
        if (v == NULL)
            return 2;
        int rc = 0;
        if (strcmp(a, "--feed") == 0) {
            if (strcmp(v, "seawater") != 0) {
                fprintf(stderr, "halostage " CMD ": --feed %s: unknown feed (known: seawater; "
                                "--feed-analysis for a site's own water)\n", v);
                return 2;
            }
        } else if (strcmp(a, "--feed-salinity") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->feed_sp);
            if (rc == 0 && (rq->feed_sp < 2.0 || rq->feed_sp > 42.0)) {
                fprintf(stderr, "halostage " CMD ": --feed-salinity %s: outside 2..42\n", v);
                rc = HS_CLI_RANGE;
            }
        } else if (strcmp(a, "--feed-analysis") == 0) {
            rc = hs_cli_parse_feed_ions(CMD, a, v, rq->analysis.conc, &rq->analysis.br,
                                        &rq->analysis.sr);
            rq->have_analysis = 1;
        } else if (strcmp(a, "--feed-unit") == 0) {
            if (strcmp(v, "g/kg") == 0)
                rq->analysis.unit = HC_FEED_G_PER_KG;
            else if (strcmp(v, "mg/L") == 0 || strcmp(v, "mg/l") == 0)
                rq->analysis.unit = HC_FEED_MG_PER_L;
            else {
                fprintf(stderr, "halostage " CMD ": --feed-unit %s: use g/kg or mg/L\n", v);
                rc = -1;
            }
        } else if (strcmp(a, "--feed-density") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->analysis.density_kg_m3);
            if (rc == 0 && (rq->analysis.density_kg_m3 < 990.0 ||
                            rq->analysis.density_kg_m3 > 1400.0)) {
                fprintf(stderr, "halostage " CMD ": --feed-density %s: outside 990..1400 "
                                "kg/m3\n", v);
                rc = HS_CLI_RANGE;
            }
        } else if (strcmp(a, "--temperature") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->t_c);
        } else if (strcmp(a, "--pco2-log") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->log_p_co2);
            if (rc == 0 && !(rq->log_p_co2 >= -8.0 && rq->log_p_co2 <= -0.1)) {
                fprintf(stderr, "halostage " CMD ": --pco2-log %s: outside -8..-0.1 (log10 "
                                "atm; air is -3.4)\n", v);
                rc = HS_CLI_RANGE;
            }
        } else if (strcmp(a, "--mode") == 0) {
            if (strcmp(v, "fractional") == 0)
                rq->mode = HC_PATH_FRACTIONAL;
            else if (strcmp(v, "equilibrium") == 0)
                rq->mode = HC_PATH_EQUILIBRIUM;
            else {
                fprintf(stderr, "halostage " CMD ": --mode %s: use fractional or "
                                "equilibrium\n", v);
                rc = -1;
            }
        } else if (strcmp(a, "--reference-temperature") == 0) {
            rc = hs_cli_tref(CMD, v, 0.0, 40.0, &rq->t_ref_c);
        } else if (strcmp(a, "--modulus") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->modulus);
            if (rc == 0 && !hc_baume_modulus_valid(rq->modulus)) {
                fprintf(stderr, "halostage " CMD ": --modulus %s: must be a positive number\n",
                        v);
                rc = HS_CLI_RANGE;
            }
        } else {
            fprintf(stderr, "halostage " CMD ": unknown option '%s' (see --help)\n", a);
            return 2;
        }
        if (rc != 0)
            return HS_CLI_EXIT(rc);
    }
    if (rq->analysis.unit == HC_FEED_MG_PER_L && !rq->have_analysis) {
        fprintf(stderr, "halostage " CMD ": --feed-unit needs --feed-analysis\n");
        return 2;
    }
    return 0;
}

/* Minerals deposited between step i-1 and step i, as "gypsum+halite". */
static void depositing(const hc_path *p, size_t i, char *buf, size_t len)
{
    buf[0] = '\0';
    if (i == 0)
        return;
    const hc_path_point *a = hc_path_step(p, i - 1), *b = hc_path_step(p, i);
    size_t used = 0;
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        double d = b->precipitated[m] - a->precipitated[m];
        if (!(fabs(d) > 1e-12))
            continue;
        int n = snprintf(buf + used, len - used, "%s%s%s", used ? " " : "", d < 0 ? "-" : "",
                         hc_mineral_name((hc_mineral)m));
        if (n < 0 || (size_t)n >= len - used)
            break;
        used += (size_t)n;
    }
}

static json_t *feed_json(const hc_feed *f)
{
    json_t *o = json_object(), *mol = json_object();
    if (o == NULL || mol == NULL) {
        json_decref(o);
        json_decref(mol);
        return NULL;
    }
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (f->molality[i] > 0.0)
            json_object_set_new(mol, hc_ion_name((hc_ion)i), json_real(f->molality[i]));
    json_object_set_new(o, "name", json_string(f->name));
    json_object_set_new(o, "molality", mol);
    json_object_set_new(o, "water_mass_fraction", json_real(f->water_mass_fraction));
    json_object_set_new(o, "practical_salinity", isfinite(f->practical_salinity)
                                                     ? json_real(f->practical_salinity)
                                                     : json_null());
    json_object_set_new(o, "charge_imbalance_percent", json_real(f->imbalance_percent));
    json_object_set_new(o, "chloride_adjustment_mol_kg", json_real(f->chloride_adjustment));
    json_object_set_new(o, "carbonate_alkalinity_eq_kg", json_real(f->carbonate_alkalinity));
    return o;
}

/* The step's state object; NULL when out of memory or the state fails. */
static json_t *step_json(const struct path_request *rq, const hc_path *p, size_t i)
{
    const hc_path_point *pt = hc_path_step(p, i);
    hc_brine_state s;
    if (hc_path_state_from_cf(p, pt->concentration_factor, rq->t_c, rq->t_ref_c, rq->modulus,
                              &s) != HC_OK)
        return NULL;
    json_t *o = hp_state_to_json(&s), *pre = json_object();
    if (o == NULL || pre == NULL) {
        json_decref(o);
        json_decref(pre);
        return NULL;
    }
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        if (pt->precipitated[m] > 0.0)
            json_object_set_new(pre, hc_mineral_name((hc_mineral)m),
                                json_real(pt->precipitated[m]));
    json_object_set_new(o, "water_removed_fraction", json_real(pt->water_removed_fraction));
    json_object_set_new(o, "precipitated_mol_per_kg_feed", pre);
    json_object_set_new(o, "ionic_strength", json_real(pt->ionic_strength));
    json_object_set_new(o, "ph", isfinite(pt->ph) ? json_real(pt->ph) : json_null());
    json_object_set_new(o, "alkalinity_eq_kg", json_real(pt->alkalinity));
    return o;
}

static int print_json(const struct path_request *rq, const hc_path *p)
{
    json_t *root = json_object(), *steps = json_array(), *onsets = json_array();
    int ok = root != NULL && steps != NULL && onsets != NULL;
    for (size_t i = 0; ok && i < hc_path_step_count(p); i++) {
        json_t *s = step_json(rq, p, i);
        ok = s != NULL && json_array_append_new(steps, s) == 0;
    }
    hc_path_onset on[HC_MINERAL_COUNT];
    size_t n = hc_path_onsets(p, on, HC_MINERAL_COUNT);
    for (size_t i = 0; ok && i < n && i < HC_MINERAL_COUNT; i++) {
        json_t *o = json_object();
        double be = NAN;
        hc_path_point pt;
        hc_brine_state s;
        if (hc_path_point_at_cf(p, on[i].concentration_factor, &pt, NULL) == HC_OK &&
            hc_path_state_from_cf(p, on[i].concentration_factor, rq->t_c, rq->t_ref_c,
                                  rq->modulus, &s) == HC_OK)
            be = s.baume;
        ok = o != NULL &&
             json_object_set_new(o, "mineral", json_string(hc_mineral_name(on[i].mineral))) == 0 &&
             json_object_set_new(o, "concentration_factor",
                                 json_real(on[i].concentration_factor)) == 0 &&
             json_object_set_new(o, "water_removed_fraction",
                                 json_real(on[i].water_removed_fraction)) == 0 &&
             json_object_set_new(o, "density_kg_m3", json_real(on[i].density_kg_m3)) == 0 &&
             json_object_set_new(o, "baume", isfinite(be) ? json_real(be) : json_null()) == 0 &&
             json_object_set_new(o, "water_activity", json_real(on[i].water_activity)) == 0 &&
             json_array_append_new(onsets, o) == 0;
    }
    if (ok) {
        json_object_set_new(root, "feed", feed_json(hc_path_feed(p)));
        json_object_set_new(root, "temperature_c", json_real(rq->t_c));
        json_object_set_new(root, "mode", json_string(rq->mode == HC_PATH_FRACTIONAL
                                                          ? "fractional" : "equilibrium"));
        json_object_set_new(root, "reference_temperature_c", json_real(rq->t_ref_c));
        json_object_set_new(root, "baume_modulus", json_real(rq->modulus));
        int carb = !(rq->mineral_flags & HC_MINERALS_NO_CARBONATE);
        json_object_set_new(root, "log_pco2_atm",
                            carb ? json_real(rq->log_p_co2 != 0.0 ? rq->log_p_co2
                                                                  : HC_LOG_PCO2_AIR)
                                 : json_null());
        json_object_set_new(root, "caco3_phase",
                            carb ? json_string((rq->mineral_flags & HC_MINERALS_CALCITE)
                                                   ? "calcite" : "aragonite")
                                 : json_null());
        json_object_set_new(root, "complete", json_boolean(hc_path_complete(p)));
        json_object_set_new(root, "steps", steps);
        json_object_set_new(root, "onsets", onsets);
    } else {
        json_decref(steps);
        json_decref(onsets);
    }
    char *text = ok ? json_dumps(root, JSON_REAL_PRECISION(8)) : NULL;
    json_decref(root);
    if (text == NULL) {
        fprintf(stderr, "halostage " CMD ": out of memory formatting JSON\n");
        return 1;
    }
    printf("%s\n", text);
    free(text);
    return 0;
}

static void print_tables(const struct path_request *rq, const hc_path *p)
{
    const hc_feed *f = hc_path_feed(p);
    printf("Evaporation path of %s at %.1f degC, %s mode\n", f->name, rq->t_c,
           rq->mode == HC_PATH_FRACTIONAL ? "fractional" : "equilibrium");
    printf("Feed (mol/kg water):");
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (f->molality[i] > 0.0)
            printf(" %s %.5g", hc_ion_name((hc_ion)i), f->molality[i]);
    printf("\n  charge imbalance as given %+.3f %%, balanced with Cl %+.3g mol/kg; carbonate "
           "alkalinity %.3g eq/kg\n", f->imbalance_percent, f->chloride_adjustment,
           f->carbonate_alkalinity);
    const hc_path_point *p0 = hc_path_step(p, 0);
    if (rq->mineral_flags & HC_MINERALS_NO_CARBONATE)
        printf("  carbonate left out (--no-carbonate)\n");
    else if (!isfinite(p0->ph)) /* an analysis without HCO3/CO3: no carbonate system */
        printf("  no carbonate in the analysis: CaCO3 and pH not modelled\n");
    else
        printf("  open to CO2 at 10^%.2f atm; feed pH %.2f; CaCO3 as %s\n",
               rq->log_p_co2 != 0.0 ? rq->log_p_co2 : HC_LOG_PCO2_AIR, p0->ph,
               (rq->mineral_flags & HC_MINERALS_CALCITE) ? "calcite" : "aragonite");
    printf("  SG and Baume at %g/%g degC, modulus %g\n\n", rq->t_ref_c, rq->t_ref_c,
           rq->modulus);

    printf("Onsets\n  %-12s %8s %9s %11s %8s %7s\n", "mineral", "CF", "water %", "kg/m3",
           "deg Be", "a_w");
    hc_path_onset on[HC_MINERAL_COUNT];
    size_t n = hc_path_onsets(p, on, HC_MINERAL_COUNT);
    for (size_t i = 0; i < n && i < HC_MINERAL_COUNT; i++) {
        hc_brine_state s;
        double be = hc_path_state_from_cf(p, on[i].concentration_factor, rq->t_c, rq->t_ref_c,
                                          rq->modulus, &s) == HC_OK ? s.baume : NAN;
        printf("  %-12s %8.2f %9.2f %11.1f %8.2f %7.3f\n", hc_mineral_name(on[i].mineral),
               on[i].concentration_factor, 100.0 * on[i].water_removed_fraction,
               on[i].density_kg_m3, be, on[i].water_activity);
    }
    printf("\nSteps\n  %8s %9s %9s %8s %7s %-18s %s\n", "CF", "water %", "kg/m3", "deg Be",
           "a_w", "stage", "depositing");
    double last_shown = -1.0;
    size_t count = hc_path_step_count(p);
    for (size_t i = 0; i < count; i++) {
        const hc_path_point *pt = hc_path_step(p, i);
        double lcf = log(pt->concentration_factor);
        if (!rq->all_steps && i != 0 && i + 1 != count && lcf - last_shown < 0.2)
            continue;
        last_shown = lcf;
        hc_brine_state s;
        if (hc_path_state_from_cf(p, pt->concentration_factor, rq->t_c, rq->t_ref_c,
                                  rq->modulus, &s) != HC_OK)
            continue;
        char dep[256];
        depositing(p, i, dep, sizeof dep);
        printf("  %8.2f %9.2f %9.1f %8.2f %7.3f %-18s %s\n", pt->concentration_factor,
               100.0 * pt->water_removed_fraction, s.density_kg_m3, s.baume, s.water_activity,
               hc_stage_name(s.stage), dep);
    }
    if (!hc_path_complete(p))
        printf("\nwarning: the path ends at CF %.0f without bischofite: the feed has too little "
               "magnesium, or its brine leaves what the model covers (ionic strength above 40 "
               "mol/kg, or minerals it lacks such as the calcium chlorides)\n",
               hc_path_step(p, count - 1)->concentration_factor);
    if (rq->t_c < 0.0 || rq->t_c > 50.0)
        printf("\nwarning: %s\n", hc_warning_text(HC_WARN_TEMPERATURE_EXTRAPOLATED));
}

int hs_cmd_path(int argc, char **argv)
{
    struct path_request rq;
    int rc = parse(argc, argv, &rq);
    if (rc == 3)
        return 0;
    if (rc != 0)
        return rc == 1 ? 1 : 2; /* 1: a value out of range, 2: usage */
    hc_feed feed;
    hc_status st = rq.have_analysis ? hc_feed_from_analysis("site analysis", &rq.analysis, &feed)
                                    : hc_feed_seawater(rq.feed_sp, &feed);
    if (st != HC_OK) {
        fprintf(stderr, "halostage " CMD ": %s: %s%s\n",
                rq.have_analysis ? "--feed-analysis" : "--feed-salinity", hc_status_text(st),
                st == HC_ERR_DOMAIN ? " (balancing needs more chloride than is given, or the "
                                      "solids exceed 60 %)" : "");
        return 1;
    }
    hc_path *p = NULL;
    hc_path_options opt = {.mineral_flags = rq.mineral_flags, .log_p_co2 = rq.log_p_co2};
    st = hc_path_build_ex(&feed, rq.t_c, rq.mode, &opt, &p);
    if (st != HC_OK) {
        if (st == HC_ERR_TEMPERATURE_RANGE)
            fprintf(stderr, "halostage " CMD ": --temperature %g: outside -5..80 degC (the "
                            "model is fitted for 0..50)\n", rq.t_c);
        else
            fprintf(stderr, "halostage " CMD ": cannot build the path: %s\n",
                    hc_status_text(st));
        return 1;
    }
    rc = 0;
    if (rq.json)
        rc = print_json(&rq, p);
    else
        print_tables(&rq, p);
    hc_path_free(p);
    return rc;
}
