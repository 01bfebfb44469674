/* `halostage plan`: how much brine to move from one pond into another so
 * that the receiving pond lands on the density the brine master wants,
 * the levels that result, and every interlock the move would break.
 *
 * Mixing conserves water and each ion (hc_mixing); each pond's composition
 * is its feed's evaporation-path brine at its measured density, and the
 * density after mixing comes from the mixed composition (hc_brine_density,
 * Laliberte 2009), not from averaging densities. The target and the density
 * band are at the reference temperature; volumes and levels are at the
 * brine temperature. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "cli/cli_number.h"
#include "cli/commands.h"
#include "cli/hydro_cli.h"
#include "cli/hydro_opts.h"
#include "hc_brine_density.h"
#include "hc_mixing.h"
#include "hs_hydro_brine.h"

#define CMD "plan"

static void usage(FILE *out)
{
    fprintf(out,
            "usage: halostage plan --from A --to B --target-density KG_M3 --config FILE\n"
            "       halostage plan --target-density KG_M3 --temperature DEGC\n"
            "                      --from-level M --from-density KG_M3 --from-area M2 ...\n"
            "                      --to-level M --to-density KG_M3 --to-area M2 ...\n"
            "\n"
            "The volume of brine to move from pond A into pond B so that B reaches the\n"
            "target density, B's density from the mixed composition, both levels after,\n"
            "and the interlocks (levels, density band) the move would violate.\n"
            "Exit status 0: a plan within every limit; 1: a limit would be broken or the\n"
            "target cannot be reached by mixing (the plan is still shown).\n"
            "\n"
            "  --from NAME, --to NAME   ponds of the configuration\n"
            "  --target-density KG_M3   wanted density of B at the reference temperature\n"
            "  --config FILE            site configuration (geometry, limits, store)\n"
            "  --temperature DEGC       brine temperature (default: the store's latest)\n"
            "  --reference-temperature DEGC   of the target (default: the site's, else 15)\n"
            "  --feed-salinity SP       feed of reference seawater at S_P (default 35)\n"
            "  --from-X / --to-X        pond values that replace the config's or the store's,\n"
            "                           X one of: level, density, area, side-slope, crest,\n"
            "                           stage-storage, min-level, max-level, band LOW,HIGH\n"
            "  --json                   one JSON object\n"
            "\n"
            "CAUTION: advice only. Check levels and dikes on site before pumping; local\n"
            "procedures and the PLC's own interlocks come first.\n");
}

struct request {
    struct hs_hcli_common common;
    struct hs_cli_pond from, to;
    const char *from_name, *to_name;
    double target_kg_m3;
};

static int parse(int argc, char **argv, struct request *rq)
{
    hs_hcli_common_init(&rq->common);
    hs_hopt_pond_init(&rq->from, "");
    hs_hopt_pond_init(&rq->to, "");
    rq->from_name = rq->to_name = NULL;
    rq->target_kg_m3 = NAN;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            usage(stdout);
            return 3;
        }
        if (strcmp(a, "--json") == 0) {
            rq->common.json = 1;
            continue;
        }
        if (strncmp(a, "--", 2) != 0) {
            fprintf(stderr, "halostage " CMD ": unexpected argument '%s' (see --help)\n", a);
            return 2;
        }
        const char *v = hs_cli_value(CMD, argc, argv, &i);
        if (v == NULL)
            return 2;
        int rc = hs_hcli_common_option(CMD, &rq->common, a, v);
        if (rc == 0 && strncmp(a, "--from-", 7) == 0)
            rc = hs_hopt_pond_option(CMD, a, &rq->from, a + 7, v);
        else if (rc == 0 && strncmp(a, "--to-", 5) == 0)
            rc = hs_hopt_pond_option(CMD, a, &rq->to, a + 5, v);
        if (rc < 0)
            return 2;
        if (rc > 0)
            continue;
        if (strcmp(a, "--from") == 0)
            rq->from_name = v;
        else if (strcmp(a, "--to") == 0)
            rq->to_name = v;
        else if (strcmp(a, "--target-density") == 0) {
            int nrc = hs_cli_number(CMD, a, v, &rq->target_kg_m3);
            if (nrc != 0)
                return HS_CLI_EXIT(nrc);
        } else {
            fprintf(stderr, "halostage " CMD ": unknown option '%s' (see --help)\n", a);
            return 2;
        }
    }
    if (!isfinite(rq->target_kg_m3)) {
        fprintf(stderr, "halostage " CMD ": --target-density is required (see --help)\n");
        return 2;
    }
    if (rq->target_kg_m3 < 990 || rq->target_kg_m3 > 1450) {
        fprintf(stderr, "halostage " CMD ": --target-density %g: outside 990..1450 kg/m3\n",
                rq->target_kg_m3);
        return 2;
    }
    if (rq->common.config_path != NULL && (rq->from_name == NULL || rq->to_name == NULL)) {
        fprintf(stderr, "halostage " CMD ": with --config, name both ponds: --from A --to B\n");
        return 2;
    }
    if (rq->common.config_path == NULL && (rq->from_name != NULL || rq->to_name != NULL)) {
        fprintf(stderr, "halostage " CMD ": --from/--to name ponds of a configuration; "
                        "give --config, or describe the ponds with --from-X/--to-X\n");
        return 2;
    }
    if (rq->from_name != NULL && rq->to_name != NULL && strcmp(rq->from_name, rq->to_name) == 0) {
        fprintf(stderr, "halostage " CMD ": --from and --to are the same pond\n");
        return 2;
    }
    return 0;
}

static const struct {
    unsigned bit;
    const char *name, *text;
} interlock_names[] = {
    {HC_PLAN_SOURCE_BELOW_MIN, "source-below-minimum-level",
     "the source would fall below its minimum level"},
    {HC_PLAN_DEST_ABOVE_MAX, "destination-above-maximum-level",
     "the destination would rise above its maximum level"},
    {HC_PLAN_DEST_OUT_OF_BAND, "destination-outside-density-band",
     "the destination would leave its density band"},
    {HC_PLAN_SOURCE_SHORT, "source-too-small", "the source holds less brine than needed"},
    {HC_PLAN_UNREACHABLE, "target-unreachable",
     "no volume of the source brings the destination to the target"},
};

struct outcome {
    hc_plan_result r;
    double mix_rho_at_t;   /* mix density at the brine temperature */
    double dest_level_m;   /* at the brine temperature */
    double dest_volume_m3;
    hc_status status;
};

/* Volumes and levels at the brine temperature from the mixed composition. */
static void at_brine_temperature(const struct hs_hcli_pond_view *to, double t_c,
                                 struct outcome *o)
{
    o->mix_rho_at_t = NAN;
    o->dest_level_m = o->r.dest_level_after_m;
    o->dest_volume_m3 = o->r.dest_volume_after_m3;
    if (o->status != HC_OK || hc_brine_density(o->r.mix_molality, t_c, &o->mix_rho_at_t) != HC_OK)
        return;
    o->dest_volume_m3 = o->r.mix_mass_kg / o->mix_rho_at_t;
    o->r.interlocks &= ~(unsigned)HC_PLAN_DEST_ABOVE_MAX;
    if (hc_shape_level_of_volume(&to->pond->shape, o->dest_volume_m3, &o->dest_level_m) != HC_OK) {
        o->dest_level_m = INFINITY;
        o->r.interlocks |= HC_PLAN_DEST_ABOVE_MAX;
    } else if (isfinite(to->pond->max_level_m) && o->dest_level_m > to->pond->max_level_m) {
        o->r.interlocks |= HC_PLAN_DEST_ABOVE_MAX;
    }
}

static json_t *num(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static int print_json(const struct request *rq, const struct hs_hcli_pond_view *from,
                      const struct hs_hcli_pond_view *to, double t_ref, const struct outcome *o)
{
    json_t *root = json_object(), *list = json_array();
    if (root == NULL || list == NULL) {
        json_decref(root);
        json_decref(list);
        return 1;
    }
    for (size_t i = 0; i < sizeof interlock_names / sizeof interlock_names[0]; i++)
        if (o->r.interlocks & interlock_names[i].bit)
            json_array_append_new(list, json_string(interlock_names[i].name));
    json_object_set_new(root, "from", from->name[0] ? json_string(from->name) : json_null());
    json_object_set_new(root, "to", to->name[0] ? json_string(to->name) : json_null());
    json_object_set_new(root, "target_density_kg_m3", json_real(rq->target_kg_m3));
    json_object_set_new(root, "reference_temperature_c", json_real(t_ref));
    json_object_set_new(root, "temperature_c", num(from->state.temperature_c));
    json_object_set_new(root, "volume_m3", num(o->r.volume_m3));
    json_object_set_new(root, "mix_density_kg_m3", num(o->r.mix_density_kg_m3));
    json_object_set_new(root, "mix_density_at_temperature_kg_m3", num(o->mix_rho_at_t));
    json_object_set_new(root, "source_level_m", json_real(from->pond->level_m));
    json_object_set_new(root, "source_level_after_m", num(o->r.source_level_after_m));
    json_object_set_new(root, "destination_level_m", json_real(to->pond->level_m));
    json_object_set_new(root, "destination_level_after_m", num(o->dest_level_m));
    json_object_set_new(root, "destination_volume_after_m3", num(o->dest_volume_m3));
    json_object_set_new(root, "interlocks", list);
    json_object_set_new(root, "ok", json_boolean(o->status == HC_OK && o->r.interlocks == 0));
    char *text = json_dumps(root, JSON_COMPACT | JSON_REAL_PRECISION(10));
    json_decref(root);
    if (text == NULL)
        return 1;
    puts(text);
    free(text);
    return 0;
}

static void print_text(const struct request *rq, const struct hs_hcli_pond_view *from,
                       const struct hs_hcli_pond_view *to, double t_ref, const struct outcome *o)
{
    const char *a = from->name[0] ? from->name : "the source";
    const char *b = to->name[0] ? to->name : "the destination";
    printf("%s: %.1f kg/m3, level %.3f m\n", a, from->pond->density_kg_m3, from->pond->level_m);
    printf("%s: %.1f kg/m3, level %.3f m\n", b, to->pond->density_kg_m3, to->pond->level_m);
    if (o->status == HC_OK) {
        printf("move %.0f m3 from %s to %s\n", o->r.volume_m3, a, b);
        printf("%s after: %.1f kg/m3 at %.1f degC (%.1f at %.1f degC), level %.3f m, %.0f m3\n",
               b, o->r.mix_density_kg_m3, t_ref, o->mix_rho_at_t, from->state.temperature_c,
               o->dest_level_m, o->dest_volume_m3);
        if (isfinite(o->r.source_level_after_m))
            printf("%s after: level %.3f m\n", a, o->r.source_level_after_m);
    } else {
        printf("%.1f kg/m3 at %.1f degC cannot be reached by moving %s into %s\n",
               rq->target_kg_m3, t_ref, a, b);
    }
    if (o->r.interlocks == 0) {
        printf("interlocks: none violated\n");
        return;
    }
    for (size_t i = 0; i < sizeof interlock_names / sizeof interlock_names[0]; i++) {
        if (!(o->r.interlocks & interlock_names[i].bit))
            continue;
        printf("interlock: %s", interlock_names[i].text);
        if (interlock_names[i].bit == HC_PLAN_SOURCE_BELOW_MIN)
            printf(" (%.3f m)", from->pond->min_level_m);
        else if (interlock_names[i].bit == HC_PLAN_DEST_ABOVE_MAX)
            printf(isfinite(to->pond->max_level_m) ? " (%.3f m)" : " (its geometry)",
                   to->pond->max_level_m);
        else if (interlock_names[i].bit == HC_PLAN_DEST_OUT_OF_BAND)
            printf(" (%.1f to %.1f kg/m3)", to->pond->band_low_kg_m3, to->pond->band_high_kg_m3);
        printf("\n");
    }
}

static int plan(const struct request *rq, struct hs_hcli_context *ctx,
                struct hs_hcli_pond_view *from, struct hs_hcli_pond_view *to)
{
    double m_from[HC_ION_COUNT], m_to[HC_ION_COUNT], cf;
    double t_c = from->state.temperature_c;
    if (hs_brine_at_density(from->model.path, from->pond->density_kg_m3, t_c, m_from, &cf,
                            NULL) != HC_OK ||
        hs_brine_at_density(to->model.path, to->pond->density_kg_m3, to->state.temperature_c,
                            m_to, &cf, NULL) != HC_OK) {
        fprintf(stderr, "halostage " CMD ": a density is not on the feed's evaporation path\n");
        return 1;
    }
    double mm[HC_ION_COUNT];
    hs_ion_molar_masses(mm);
    hc_plan_pond src = {&from->pond->shape,        from->pond->level_m, m_from,
                        from->pond->density_kg_m3, from->pond->min_level_m, NAN, NAN, NAN};
    hc_plan_pond dst = {&to->pond->shape,        to->pond->level_m,
                        m_to,                    to->pond->density_kg_m3,
                        NAN,                     to->pond->max_level_m,
                        to->pond->band_low_kg_m3, to->pond->band_high_kg_m3};
    /* The density model runs at the reference temperature, where the
     * target and the band are stated. */
    hc_plan_input in = {&src, &dst, HC_ION_COUNT, mm, ctx->t_ref_c, hs_brine_density_cb, NULL,
                        rq->target_kg_m3, 0.01};
    struct outcome o;
    memset(&o, 0, sizeof o);
    o.status = hc_plan_transfer(&in, &o.r);
    if (o.status != HC_OK && o.status != HC_ERR_DOMAIN) {
        fprintf(stderr, "halostage " CMD ": %s\n", hc_status_text(o.status));
        return 1;
    }
    at_brine_temperature(to, to->state.temperature_c, &o);
    int rc = 0;
    if (rq->common.json)
        rc = print_json(rq, from, to, ctx->t_ref_c, &o);
    else
        print_text(rq, from, to, ctx->t_ref_c, &o);
    if (rc != 0)
        return rc;
    return o.status == HC_OK && o.r.interlocks == 0 ? 0 : 1;
}

int hs_cmd_plan(int argc, char **argv)
{
    struct request rq;
    int rc = parse(argc, argv, &rq);
    if (rc != 0) {
        hs_hopt_pond_free(&rq.from);
        hs_hopt_pond_free(&rq.to);
        return rc == 3 ? 0 : rc;
    }
    struct hs_hcli_context ctx;
    rc = hs_hcli_open(CMD, &rq.common, &ctx);
    if (rc == 0) {
        struct hs_hcli_pond_view from, to;
        rc = hs_hcli_pond_view(CMD, &ctx, rq.from_name ? rq.from_name : "", &rq.from, 0, NAN,
                               NAN, NAN, &from);
        /* Without --temperature, the destination's brine is taken at the
         * source's temperature when the store has none of its own. */
        struct hs_hcli_common to_common = rq.common;
        if (rc == 0)
            to_common.fallback_temperature_c = from.state.temperature_c;
        ctx.common = &to_common;
        if (rc == 0)
            rc = hs_hcli_pond_view(CMD, &ctx, rq.to_name ? rq.to_name : "", &rq.to, 0, NAN,
                                   NAN, NAN, &to);
        else
            memset(&to, 0, sizeof to);
        ctx.common = &rq.common;
        if (rc == 0)
            rc = plan(&rq, &ctx, &from, &to);
        hs_hcli_pond_view_free(&from);
        hs_hcli_pond_view_free(&to);
        hs_hcli_close(&ctx);
    }
    hs_hopt_pond_free(&rq.from);
    hs_hopt_pond_free(&rq.to);
    return rc;
}
