/* [alarm NAME]: configured alarm rules (see hs_conf_alarm.h). Keys left out
 * take the kind's defaults (hs_alarm_rule_default). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hs_conf_alarm.h"
#include "hs_conf_keys.h"

typedef hs_alarm_conf A;

static const hs_key alarm_keys[] = {
    KEY_ENUM("kind", A, kind, hs_rule_kind_names, HS_NO_DEFAULT, HS_KEY_REQUIRED,
             "near-saturation, gypsum-in-feed, bittern-limit, density-band, level-high, "
             "level-high-high, level-low, density-fall, sensor-stale or bus-down"),
    KEY_STR("ponds", A, ponds, HS_NO_DEFAULT, 0, "comma-separated pond names it applies to"),
    KEY_STR("role", A, role, HS_NO_DEFAULT, 0,
            "or every pond of this role: intake, concentrator, brine-store, crystalliser, "
            "bittern"),
    KEY_ENUM("quantity", A, quantity, hs_alarm_quantity_names, HS_NO_DEFAULT, 0,
             "what is compared (the kind's own by default); its unit is in its name"),
    KEY_DBL("high", A, high, NULL, -1e9, 1e9, HS_NO_DEFAULT, 0,
            "alarm above this value, in the quantity's unit"),
    KEY_DBL("low", A, low, NULL, -1e9, 1e9, HS_NO_DEFAULT, 0,
            "alarm below this value, in the quantity's unit"),
    KEY_DBL("deadband", A, deadband, NULL, 0, 1e9, HS_NO_DEFAULT, 0,
            "an alarm clears only this far back inside its limit"),
    KEY_DUR("on_delay", A, on_delay_ms, 0, 24 * 3600 * SEC_MS, HS_NO_DEFAULT, 0,
            "the condition must hold this long before the alarm raises"),
    KEY_DUR("off_delay", A, off_delay_ms, 0, 24 * 3600 * SEC_MS, HS_NO_DEFAULT, 0,
            "and be gone this long before it clears"),
    KEY_ENUM("priority", A, priority, hs_alarm_priority_names, HS_NO_DEFAULT, 0,
             "urgent, high, medium or low"),
    KEY_DUR("window", A, window_ms, 16 * SEC_MS, 7 * 24 * 3600 * SEC_MS, HS_NO_DEFAULT, 0,
            "density-fall: how far back the highest density is taken"),
    KEY_UINT("filter_samples", A, filter_samples, 1, HS_FALL_FILTER_MAX, HS_NO_DEFAULT, 0,
             "density-fall: median of the last N samples (63 unless set)"),
    KEY_DUR("max_shelve", A, max_shelve_ms, 60 * SEC_MS, 30 * 24 * 3600 * SEC_MS,
            HS_NO_DEFAULT, 0, "longest an operator may shelve this alarm"),
    {NULL},
};

const hs_section_type hs_section_alarm;

static int alarm_add(hs_site *site, hs_cfg *cfg, const char *name)
{
    int i = hs_cfg_grow((void **)&site->alarms, &site->n_alarms, sizeof site->alarms[0]);
    if (i < 0) {
        hs_cfg_error(cfg, hs_cfg_line(cfg), "out of memory");
        return -1;
    }
    A *a = &site->alarms[i];
    a->line = hs_cfg_line(cfg);
    if (strlen(name) >= sizeof a->name || strlen(name) >= HS_ALARM_NAME_MAX) {
        hs_cfg_error(cfg, a->line, "alarm name '%s' is too long", name);
        site->n_alarms--;
        return -1;
    }
    snprintf(a->name, sizeof a->name, "%s", name);
    a->high = a->low = a->deadband = NAN;
    return i;
}

static void *alarm_at(hs_site *site, size_t index) { return &site->alarms[index]; }

static int is_set(hs_cfg *cfg, size_t index, const char *key)
{
    return hs_cfg_key_line(cfg, &hs_section_alarm, index, key) != 0;
}

static int role_index(const char *name)
{
    for (int r = 0; r < HS_ROLE_COUNT; r++)
        if (strcmp(hs_role_name((hs_role)r), name) == 0)
            return r;
    return -1;
}

static void alarm_finish(hs_site *site, hs_cfg *cfg, size_t index)
{
    A *a = &site->alarms[index];
    hs_alarm_rule *r = &a->rule;
    hs_alarm_rule_default(r, (hs_rule_kind)a->kind);
    snprintf(r->name, sizeof r->name, "%s", a->name);
    if (is_set(cfg, index, "quantity"))
        r->quantity = (hs_alarm_quantity)a->quantity;
    if (is_set(cfg, index, "high"))
        r->high = a->high;
    if (is_set(cfg, index, "low"))
        r->low = a->low;
    if (is_set(cfg, index, "deadband"))
        r->deadband = a->deadband;
    if (is_set(cfg, index, "on_delay"))
        r->on_delay_ms = a->on_delay_ms;
    if (is_set(cfg, index, "off_delay"))
        r->off_delay_ms = a->off_delay_ms;
    if (is_set(cfg, index, "priority"))
        r->priority = (hs_alarm_priority)(a->priority + 1);
    if (is_set(cfg, index, "window"))
        r->window_ms = a->window_ms;
    if (is_set(cfg, index, "filter_samples"))
        r->filter_samples = a->filter_samples;
    if (is_set(cfg, index, "max_shelve"))
        r->max_shelve_ms = a->max_shelve_ms;
    const char *why = hs_alarm_rule_check(r);
    if (why != NULL)
        hs_cfg_error(cfg, a->line, "[alarm %s]: %s", a->name, why);
    if ((a->ponds[0] == '\0') == (a->role[0] == '\0'))
        hs_cfg_error(cfg, a->line, "[alarm %s]: give either ponds or role", a->name);
    if (a->role[0] && role_index(a->role) < 0)
        hs_cfg_error(cfg, hs_cfg_where(cfg, &hs_section_alarm, index, "role"),
                     "role: '%s' is not a pond role", a->role);
}

/* Calls fn for each name of the comma-separated list (blanks trimmed). */
static int each_name(const char *list, int (*fn)(void *ctx, const char *name), void *ctx)
{
    char name[HS_NAME_MAX];
    const char *p = list;
    while (*p) {
        const char *end = strchr(p, ',');
        size_t n = end ? (size_t)(end - p) : strlen(p);
        while (n > 0 && (*p == ' ' || *p == '\t')) {
            p++;
            n--;
        }
        while (n > 0 && (p[n - 1] == ' ' || p[n - 1] == '\t'))
            n--;
        if (n >= sizeof name)
            n = sizeof name - 1;
        memcpy(name, p, n);
        name[n] = '\0';
        int rc = fn(ctx, name);
        if (rc != 0)
            return rc;
        if (end == NULL)
            break;
        p = end + 1;
    }
    return 0;
}

struct link_ctx {
    hs_site *site;
    hs_cfg *cfg;
    size_t index;
};

static int check_pond(void *ctx, const char *name)
{
    struct link_ctx *l = ctx;
    char hint[160];
    if (name[0] == '\0' || hs_site_pond(l->site, name) < 0)
        hs_cfg_error(l->cfg, hs_cfg_where(l->cfg, &hs_section_alarm, l->index, "ponds"),
                     "ponds: no [pond %s] in this file%s", name,
                     hs_site_pond_hint(l->site, name, hint, sizeof hint));
    return 0;
}

static void alarm_link(hs_site *site, hs_cfg *cfg)
{
    for (size_t i = 0; i < site->n_alarms; i++) {
        struct link_ctx l = {site, cfg, i};
        each_name(site->alarms[i].ponds, check_pond, &l);
    }
}

static void alarm_release(hs_site *site)
{
    free(site->alarms);
    site->alarms = NULL;
    site->n_alarms = 0;
}

struct match_ctx {
    const char *pond;
};

static int match_pond(void *ctx, const char *name)
{
    return strcmp(((struct match_ctx *)ctx)->pond, name) == 0;
}

int hs_conf_alarm_applies(const hs_site *site, const hs_alarm_conf *a, size_t pond)
{
    if (pond >= site->n_ponds)
        return 0;
    if (a->role[0])
        return role_index(a->role) == (int)site->ponds[pond].role;
    struct match_ctx m = {site->ponds[pond].name};
    return each_name(a->ponds, match_pond, &m) == 1;
}

size_t hs_conf_alarms_apply(const hs_site *site, hs_alarm_engine *eng)
{
    size_t added = 0;
    for (size_t a = 0; a < site->n_alarms; a++)
        for (size_t p = 0; p < site->n_ponds; p++)
            if (hs_conf_alarm_applies(site, &site->alarms[a], p) &&
                hs_alarm_add(eng, &site->alarms[a].rule, site->ponds[p].name) == HS_ALARM_DONE)
                added++;
    return added;
}

const hs_section_type hs_section_alarm = {
    .kind = "alarm", .named = true, .required = false, .keys = alarm_keys,
    .add = alarm_add, .at = alarm_at, .finish = alarm_finish, .link = alarm_link,
    .release = alarm_release,
};
