/* Shared options of the hydrology commands (see hydro_opts.h). */
#include "cli/hydro_opts.h"
#include "cli/cli_number.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void hs_hopt_pond_init(struct hs_cli_pond *p, const char *name)
{
    memset(p, 0, sizeof *p);
    snprintf(p->name, sizeof p->name, "%s", name != NULL ? name : "");
    p->area_m2 = p->side_slope = p->crest_m = NAN;
    p->level_m = p->density_kg_m3 = NAN;
    p->min_level_m = p->max_level_m = NAN;
    p->band_low_kg_m3 = p->band_high_kg_m3 = NAN;
}

void hs_hopt_pond_free(struct hs_cli_pond *p)
{
    if (p != NULL)
        hs_stage_table_free(&p->table);
}

static int nonneg(const char *cmd, const char *opt, const char *text, double *out)
{
    if (hs_cli_number(cmd, opt, text, out) != 0)
        return -1;
    if (*out < 0) {
        fprintf(stderr, "halostage %s: %s: '%s' must not be negative\n", cmd, opt, text);
        return -1;
    }
    return 0;
}

static int parse_band(const char *cmd, const char *opt, const char *text, double *lo, double *hi)
{
    const char *comma = strchr(text, ',');
    if (comma == NULL) {
        fprintf(stderr, "halostage %s: %s: '%s' is not LOW,HIGH\n", cmd, opt, text);
        return -1;
    }
    char low[64];
    size_t n = (size_t)(comma - text);
    if (n >= sizeof low) {
        fprintf(stderr, "halostage %s: %s: '%s' is too long\n", cmd, opt, text);
        return -1;
    }
    memcpy(low, text, n);
    low[n] = '\0';
    if (nonneg(cmd, opt, low, lo) != 0 || nonneg(cmd, opt, comma + 1, hi) != 0)
        return -1;
    if (!(*lo < *hi)) {
        fprintf(stderr, "halostage %s: %s: LOW must be below HIGH\n", cmd, opt);
        return -1;
    }
    return 0;
}

int hs_hopt_pond_option(const char *cmd, const char *opt, struct hs_cli_pond *p, const char *key,
                        const char *value)
{
    struct {
        const char *key;
        double *dst;
    } nums[] = {
        {"area", &p->area_m2},         {"side-slope", &p->side_slope},
        {"crest", &p->crest_m},        {"level", &p->level_m},
        {"density", &p->density_kg_m3}, {"min-level", &p->min_level_m},
        {"max-level", &p->max_level_m},
    };
    for (size_t i = 0; i < sizeof nums / sizeof nums[0]; i++)
        if (strcmp(key, nums[i].key) == 0)
            return nonneg(cmd, opt, value, nums[i].dst) == 0 ? 1 : -1;
    if (strcmp(key, "band") == 0)
        return parse_band(cmd, opt, value, &p->band_low_kg_m3, &p->band_high_kg_m3) == 0 ? 1 : -1;
    if (strcmp(key, "stage-storage") == 0) {
        if (strlen(value) >= sizeof p->stage_storage) {
            fprintf(stderr, "halostage %s: %s: path too long\n", cmd, opt);
            return -1;
        }
        snprintf(p->stage_storage, sizeof p->stage_storage, "%s", value);
        return 1;
    }
    return 0;
}

int hs_hopt_pond_finish(const char *cmd, const char *what, struct hs_cli_pond *p)
{
    char err[600];
    if (p->stage_storage[0] != '\0' && isfinite(p->area_m2)) {
        fprintf(stderr, "halostage %s: %s: give either a stage-storage table or an area, "
                        "not both\n", cmd, what);
        return -1;
    }
    if (p->stage_storage[0] != '\0') {
        if (p->table.level_m == NULL &&
            hs_stage_table_load(p->stage_storage, &p->table, err, sizeof err) != 0) {
            fprintf(stderr, "halostage %s: %s\n", cmd, err);
            return -1;
        }
        p->shape.is_table = 1;
        p->shape.table = p->table.view;
    } else if (isfinite(p->area_m2)) {
        p->shape.is_table = 0;
        p->shape.prism = (hc_prism){p->area_m2, 0, isfinite(p->side_slope) ? p->side_slope : 0,
                                    isfinite(p->crest_m) ? p->crest_m : HS_HOPT_DEFAULT_CREST_M};
        hc_status st = hc_prism_check(&p->shape.prism);
        if (st != HC_OK) {
            fprintf(stderr, "halostage %s: %s: area %g m2, side slope %g: %s\n", cmd, what,
                    p->area_m2, p->shape.prism.side_slope, hc_status_text(st));
            return -1;
        }
    } else {
        fprintf(stderr, "halostage %s: %s: no geometry (give an area or a stage-storage table)\n",
                cmd, what);
        return -1;
    }
    if (!isfinite(p->level_m)) {
        fprintf(stderr, "halostage %s: %s: the current level is missing\n", cmd, what);
        return -1;
    }
    double v;
    if (hc_shape_at_level(&p->shape, p->level_m, &v, NULL) != HC_OK) {
        fprintf(stderr, "halostage %s: %s: level %g m is outside its geometry (0 to %g m)\n", cmd,
                what, p->level_m, hc_shape_max_level(&p->shape));
        return -1;
    }
    if (!isfinite(p->density_kg_m3)) {
        fprintf(stderr, "halostage %s: %s: the current density is missing\n", cmd, what);
        return -1;
    }
    return 0;
}
