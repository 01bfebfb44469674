/* `halostage brine`: the thermodynamic state of a brine analysis: activity
 * coefficients (HMW84 Pitzer model), osmotic coefficient, water activity,
 * saturation index of every mineral, density, specific gravity and degree
 * Baume. For a lab technician checking a sample against saturation. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "cli/ion_args.h"
#include "hc_baume.h"
#include "hc_brine_density.h"
#include "hc_carbonate.h"
#include "hc_minerals.h"
#include "hc_pitzer.h"
#include "hc_state.h"
#include "hp_state_json.h"

#define CMD "brine"

struct brine_request {
    double molality[HC_ION_COUNT];
    double t_c;
    double t_ref_c;
    double modulus;
    double log_p_co2;       /* NaN: take HCO3/CO3 as given, no speciation */
    int json;
    double given_charge_eq_kg;  /* sum z m of the input [eq/kg] */
    int balanced_ion;           /* -1, or the ion added to balance the charge */
    double balance_added_mol_kg;
};

/* An analysis is rarely exactly electroneutral; up to this share of the
 * ions' charge the rule of the feed analyses applies: the missing charge is
 * made up with Cl (excess cations) or Na (excess anions), and said. Beyond
 * it the input is refused: the model is for electroneutral solutions
 * (HMW84) and gives nonsense (phi < 0, a_w > 1) far from it. The 5 % is
 * common practice for a major-ion analysis, no source. */
#define BALANCE_TOLERANCE 0.05

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage brine --molality ION=MOL_KG[,ION=MOL_KG...] [OPTIONS]\n"
            "\n"
            "Activities and saturation of a brine of known composition (Pitzer model,\n"
            "Harvie, Moller & Weare 1984; 0..50 degC), with its density (Laliberte 2009).\n"
            "\n"
            "  --molality LIST              mol per kg of water; ions Na K Mg Ca Cl SO4 HCO3 CO3,\n"
            "                               e.g. Na=6.0,Cl=6.0\n"
            "  --temperature DEGC           brine temperature [degC], default 25\n"
            "  --reference-temperature T    for specific gravity and Baume: 15 (default), 20, 60F\n"
            "  --modulus M                  Baume modulus, default 145\n"
            "  --pco2-log LOG10_ATM         speciate the carbonate at this CO2 pressure (air:\n"
            "                               -3.4): HCO3 + 2 CO3 is kept as alkalinity, pH and\n"
            "                               the CaCO3/MgCO3 ion pairs are computed; without it\n"
            "                               HCO3 and CO3 are taken as given, free, without pH\n"
            "  --json                       one JSON object instead of the table\n");
}

/* Charge balance of the input (BALANCE_TOLERANCE); 0, or 1 after a message
 * (refused: out of the model's range). */
static int balance(struct brine_request *rq)
{
    double cb = hc_charge_balance(rq->molality), eq = 0.0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        eq += fabs((double)hc_ion_charge((hc_ion)i)) * rq->molality[i];
    rq->given_charge_eq_kg = cb;
    rq->balanced_ion = -1;
    rq->balance_added_mol_kg = 0.0;
    if (!(eq > 0.0) || fabs(cb) <= 1e-12 * eq)
        return 0;
    /* conservation of charge: sum z m = 0 [eq/kg]; the imbalance as the
     * usual (cations - anions) / (cations + anions) */
    if (fabs(cb) > BALANCE_TOLERANCE * eq) {
        fprintf(stderr, "halostage " CMD ": --molality: the charges do not balance (%+.4g eq/kg, "
                "%.1f %% of the ions' charge, cations - anions over cations + anions; at most %.0f %% is made up with Cl or Na): give "
                "the counter-ions too, e.g. Mg=4,Cl=8\n", cb, 100.0 * fabs(cb) / eq,
                100.0 * BALANCE_TOLERANCE);
        return 1;
    }
    rq->balanced_ion = cb > 0.0 ? HC_ION_CL : HC_ION_NA;
    rq->balance_added_mol_kg = fabs(cb);
    rq->molality[rq->balanced_ion] += fabs(cb);
    return 0;
}

/* 0 ok, 2 usage error (message printed), 3 --help shown. */
static int parse(int argc, char **argv, struct brine_request *rq)
{
    memset(rq, 0, sizeof *rq);
    rq->t_c = 25.0;
    rq->t_ref_c = 15.0;
    rq->modulus = 145.0;
    rq->log_p_co2 = NAN;
    int have = 0;
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
        const char *v = hs_cli_value(CMD, argc, argv, &i);
        if (v == NULL)
            return 2;
        int rc;
        if (strcmp(a, "--molality") == 0) {
            rc = hs_cli_parse_ions(CMD, a, v, rq->molality);
            have = 1;
        } else if (strcmp(a, "--temperature") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->t_c);
        } else if (strcmp(a, "--reference-temperature") == 0) {
            rc = hs_cli_tref(CMD, v, 0.0, 40.0, &rq->t_ref_c);
        } else if (strcmp(a, "--pco2-log") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->log_p_co2);
            if (rc == 0 && !(rq->log_p_co2 >= -8.0 && rq->log_p_co2 <= 0.0)) {
                fprintf(stderr, "halostage " CMD ": --pco2-log %s: outside -8..0 (log10 atm; "
                                "air is -3.4)\n", v);
                rc = HS_CLI_RANGE;
            }
        } else if (strcmp(a, "--modulus") == 0) {
            rc = hs_cli_number(CMD, a, v, &rq->modulus);
            if (rc == 0 && !hc_baume_modulus_valid(rq->modulus)) {
                fprintf(stderr, "halostage " CMD ": --modulus %s: must be a positive number "
                                "(145, 144.3 or 146.78 are usual)\n", v);
                rc = HS_CLI_RANGE;
            }
        } else {
            fprintf(stderr, "halostage " CMD ": unknown option '%s' (see --help)\n", a);
            return 2;
        }
        if (rc != 0)
            return HS_CLI_EXIT(rc);
    }
    if (!have) {
        fprintf(stderr, "halostage " CMD ": --molality is required, e.g. --molality Na=6,Cl=6\n");
        return 2;
    }
    return balance(rq);
}

struct brine_result {
    hc_brine_state state;
    double molality[HC_ION_COUNT]; /* free ions: as given unless speciated [mol/kg] */
    int speciated;
    hc_carbonate_result carbonate;
    hc_pitzer_result pitzer;
    double charge_balance;  /* sum m z [eq/kg] */
    double mean_gamma;      /* NaN unless one cation and one anion */
    int salt_cation, salt_anion;
};

/* The latest stage whose mineral is at or above saturation (SI >= -0.005,
 * about the model's own uncertainty in log K: common practice, no source);
 * HC_STAGE_NONE when no mineral is. */
static hc_stage saturation_stage(const double si[HC_MINERAL_COUNT])
{
    hc_stage s = HC_STAGE_NONE;
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        if (si[m] >= -0.005 && m != HC_MIN_ANHYDRITE && hc_mineral_stage((hc_mineral)m) > s)
            s = hc_mineral_stage((hc_mineral)m);
    return s;
}

/* Returns HC_OK or the failing calc status; *what names the failing step. */
static hc_status compute(const struct brine_request *rq, struct brine_result *r,
                         const char **what)
{
    hc_pitzer_params pp;
    hc_mineral_set set;
    hc_brine_state *s = &r->state;
    hc_state_clear(s);
    *what = "--temperature";
    hc_status st = hc_pitzer_params_at(rq->t_c, &pp);
    if (st == HC_OK)
        st = hc_mineral_set_at_pco2(rq->t_c, HC_MINERALS_DEFAULT,
                                    isfinite(rq->log_p_co2) ? rq->log_p_co2 : HC_LOG_PCO2_AIR,
                                    &set);
    if (st != HC_OK)
        return st;
    *what = "--molality";
    memcpy(r->molality, rq->molality, sizeof r->molality);
    r->speciated = isfinite(rq->log_p_co2) &&
                   rq->molality[HC_ION_HCO3] + rq->molality[HC_ION_CO3] > 0.0;
    if (r->speciated)
        st = hc_carbonate_speciate(&pp, &set.carbonate, rq->molality, r->molality, &r->pitzer,
                                   &r->carbonate);
    else
        st = hc_pitzer_eval(&pp, rq->molality, &r->pitzer);
    if (st != HC_OK)
        return st;
    /* never print what no solution has: phi < 0 or a_w > 1 (outside the
     * model, e.g. far from electroneutral) */
    if (!(r->pitzer.osmotic_coefficient >= 0.0) || !(r->pitzer.water_activity <= 1.0))
        return HC_ERR_DOMAIN;
    hc_saturation_indices(&set, r->molality, &r->pitzer, s->saturation_index);
    for (int m = 0; m < HC_MINERAL_COUNT; m++)
        if (!isfinite(s->saturation_index[m]))
            s->saturation_index[m] = NAN;
    st = hc_brine_density(rq->molality, rq->t_c, &s->density_kg_m3);
    if (st == HC_OK)
        st = hc_brine_density(rq->molality, rq->t_ref_c, &s->density_ref_kg_m3);
    if (st == HC_OK)
        st = hc_brine_specific_gravity(rq->molality, rq->t_ref_c, &s->specific_gravity);
    /* the pure-water limit: SG 1 within rounding (the heavy-liquid scale
     * starts at water) */
    if (st == HC_OK && s->specific_gravity < 1.0 && s->specific_gravity > 1.0 - 1e-12)
        s->specific_gravity = 1.0;
    if (st == HC_OK)
        st = hc_baume_from_sg(s->specific_gravity, rq->modulus, &s->baume);
    if (st != HC_OK)
        return st;
    double g = hc_solute_g_per_kg_water(rq->molality);
    s->salinity_g_kg = 1000.0 * g / (1000.0 + g);
    s->temperature_c = rq->t_c;
    s->reference_temperature_c = rq->t_ref_c;
    s->baume_modulus = rq->modulus;
    s->water_activity = r->pitzer.water_activity;
    s->stage = saturation_stage(s->saturation_index);
    s->method = HC_METHOD_COMPOSITION;
    s->warnings = pp.warnings | set.warnings;
    r->charge_balance = hc_charge_balance(rq->molality);
    int nc = 0, na = 0;
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (rq->molality[i] > 0.0) {
            if (hc_ion_charge((hc_ion)i) > 0) {
                nc++;
                r->salt_cation = i;
            } else {
                na++;
                r->salt_anion = i;
            }
        }
    r->mean_gamma = nc == 1 && na == 1 ? hc_pitzer_mean_gamma(&r->pitzer,
                                                             (hc_ion)r->salt_cation,
                                                             (hc_ion)r->salt_anion)
                                       : NAN;
    return HC_OK;
}

static int print_json(const struct brine_request *rq, const struct brine_result *r)
{
    json_t *o = hp_state_to_json(&r->state);
    json_t *gam = json_object(), *mol = json_object();
    int ok = o != NULL && gam != NULL && mol != NULL;
    for (int i = 0; ok && i < HC_ION_COUNT; i++) {
        if (r->molality[i] <= 0.0)
            continue;
        ok = json_object_set_new(gam, hc_ion_name((hc_ion)i), json_real(r->pitzer.gamma[i])) == 0 &&
             json_object_set_new(mol, hc_ion_name((hc_ion)i), json_real(r->molality[i])) == 0;
    }
    if (ok && r->speciated) {
        const hc_carbonate_result *c = &r->carbonate;
        ok = json_object_set_new(o, "ph", json_real(c->ph)) == 0 &&
             json_object_set_new(o, "log_pco2_atm", json_real(rq->log_p_co2)) == 0 &&
             json_object_set_new(o, "alkalinity_eq_kg", json_real(c->alkalinity)) == 0 &&
             json_object_set_new(o, "dic_mol_kg", json_real(c->dic)) == 0 &&
             json_object_set_new(o, "co2_mol_kg", json_real(c->co2)) == 0 &&
             json_object_set_new(o, "caco3_pair_mol_kg", json_real(c->caco3_pair)) == 0 &&
             json_object_set_new(o, "mgco3_pair_mol_kg", json_real(c->mgco3_pair)) == 0;
    }
    if (ok)
        ok = json_object_set_new(o, "molality", mol) == 0 &&
             json_object_set_new(o, "activity_coefficient", gam) == 0 &&
             json_object_set_new(o, "ionic_strength", json_real(r->pitzer.ionic_strength)) == 0 &&
             json_object_set_new(o, "osmotic_coefficient",
                                 json_real(r->pitzer.osmotic_coefficient)) == 0 &&
             json_object_set_new(o, "charge_balance_eq_kg", json_real(r->charge_balance)) == 0;
    else {
        json_decref(gam);
        json_decref(mol);
    }
    if (ok && rq->balanced_ion >= 0) {
        /* the balancing is stated twice: a warning and what was added */
        char text[200];
        snprintf(text, sizeof text, "charge-balanced: %.4g mol/kg %s added (the input was "
                 "%+.4g eq/kg out of balance)", rq->balance_added_mol_kg,
                 hc_ion_name((hc_ion)rq->balanced_ion), rq->given_charge_eq_kg);
        ok = json_array_append_new(json_object_get(o, "warnings"), json_string(text)) == 0 &&
             json_object_set_new(o, "charge_balanced_with",
                                 json_pack("{s:s, s:f, s:f}", "ion",
                                           hc_ion_name((hc_ion)rq->balanced_ion), "added_mol_kg",
                                           rq->balance_added_mol_kg, "input_charge_eq_kg",
                                           rq->given_charge_eq_kg)) == 0;
    }
    if (ok && isfinite(r->mean_gamma))
        ok = json_object_set_new(o, "mean_activity_coefficient", json_real(r->mean_gamma)) == 0;
    char *text = ok ? json_dumps(o, JSON_REAL_PRECISION(10)) : NULL;
    json_decref(o);
    if (text == NULL) {
        fprintf(stderr, "halostage " CMD ": out of memory formatting JSON\n");
        return 1;
    }
    printf("%s\n", text);
    free(text);
    return 0;
}

static void print_table(const struct brine_request *rq, const struct brine_result *r)
{
    const hc_brine_state *s = &r->state;
    printf("Brine at %.2f degC (Pitzer model, HMW84)\n", rq->t_c);
    printf("  %-8s %12s %10s %10s\n", "ion", "mol/kg", "gamma", "activity");
    for (int i = 0; i < HC_ION_COUNT; i++)
        if (r->molality[i] > 0.0)
            printf("  %-8s %12.6g %10.4f %10.4g\n", hc_ion_name((hc_ion)i), r->molality[i],
                   r->pitzer.gamma[i], r->molality[i] * r->pitzer.gamma[i]);
    if (r->speciated) {
        const hc_carbonate_result *c = &r->carbonate;
        printf("  (free ions, speciated at pCO2 10^%.2f atm; ion pairs CaCO3 %.3g, MgCO3 %.3g "
               "mol/kg)\n", rq->log_p_co2, c->caco3_pair, c->mgco3_pair);
        printf("\n  %-26s %.3f (activity scale)\n", "pH", c->ph);
        printf("  %-26s %.4g eq/kg\n", "carbonate alkalinity", c->alkalinity);
        printf("  %-26s %.4g mol/kg (CO2(aq) %.3g)\n", "dissolved inorganic C", c->dic,
               c->co2);
    }
    printf("\n  %-26s %.4f mol/kg\n", "ionic strength", r->pitzer.ionic_strength);
    printf("  %-26s %.4f\n", "osmotic coefficient", r->pitzer.osmotic_coefficient);
    printf("  %-26s %.4f\n", "water activity", r->pitzer.water_activity);
    if (isfinite(r->mean_gamma))
        printf("  %-26s %.4f (%s%s)\n", "mean activity coefficient", r->mean_gamma,
               hc_ion_name((hc_ion)r->salt_cation), hc_ion_name((hc_ion)r->salt_anion));
    printf("  %-26s %.2f kg/m3 at %.2f degC\n", "density", s->density_kg_m3, rq->t_c);
    printf("  %-26s %.5f (%g/%g degC)\n", "specific gravity", s->specific_gravity, rq->t_ref_c,
           rq->t_ref_c);
    printf("  %-26s %.2f deg Be (modulus %g)\n", "degree Baume", s->baume, rq->modulus);
    printf("  %-26s %.2f g/kg of brine\n", "dissolved salts", s->salinity_g_kg);
    printf("  %-26s %s\n", "saturated up to stage",
           s->stage == HC_STAGE_NONE ? "none (no mineral saturated)" : hc_stage_name(s->stage));
    if (fabs(r->charge_balance) > 1e-3 * r->pitzer.ionic_strength)
        printf("  %-26s %+.4g eq/kg: the analysis is not electroneutral\n", "charge balance",
               r->charge_balance);
    printf("\n  %-12s %8s  %s\n", "mineral", "SI", "");
    for (int m = 0; m < HC_MINERAL_COUNT; m++) {
        double si = s->saturation_index[m];
        if (!isfinite(si))
            continue;
        const char *note = si > 0.005 ? "supersaturated" : si >= -0.005 ? "saturated" : "";
        printf("  %-12s %8.3f  %s\n", hc_mineral_name((hc_mineral)m), si, note);
    }
    for (unsigned b = 0; b < HC_WARN_COUNT_BITS; b++)
        if ((s->warnings & (1u << b)) && hc_warning_text(1u << b) != NULL)
            printf("  warning: %s\n", hc_warning_text(1u << b));
    if (rq->balanced_ion >= 0)
        printf("  warning: the input was %+.4g eq/kg out of charge balance; %.4g mol/kg %s "
               "added\n", rq->given_charge_eq_kg, rq->balance_added_mol_kg,
               hc_ion_name((hc_ion)rq->balanced_ion));
}

int hs_cmd_brine(int argc, char **argv)
{
    struct brine_request rq;
    int rc = parse(argc, argv, &rq);
    if (rc == 3)
        return 0;
    if (rc != 0)
        return rc == 1 ? 1 : 2; /* 1: a value out of range, 2: usage */
    struct brine_result r;
    const char *what = "";
    hc_status st = compute(&rq, &r, &what);
    if (st != HC_OK) {
        if (st == HC_ERR_TEMPERATURE_RANGE)
            fprintf(stderr, "halostage " CMD ": --temperature %g: outside -5..80 degC (the "
                            "model is fitted for 0..50)\n", rq.t_c);
        else if (st == HC_ERR_SALINITY_RANGE)
            fprintf(stderr, "halostage " CMD ": --molality: ionic strength above what the "
                            "model can take (brine denser than any natural brine?)\n");
        else
            fprintf(stderr, "halostage " CMD ": %s: %s\n", what, hc_status_text(st));
        return 1;
    }
    if (rq.json)
        return print_json(&rq, &r);
    print_table(&rq, &r);
    return 0;
}
