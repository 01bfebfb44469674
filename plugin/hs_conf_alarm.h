/* [alarm NAME]: an alarm rule from the configuration, applied to the ponds
 * it names or to every pond of a role (plugin/hs_conf_alarm.c reads it).
 * Every pond also gets built-in rules from its own limits (the runtime adds
 * them); an [alarm NAME] with the same name as a built-in one replaces it
 * for the ponds it applies to. */
#ifndef HS_CONF_ALARM_H
#define HS_CONF_ALARM_H

#include <stddef.h>
#include <stdint.h>

#include "hs_alarm.h"
#include "hs_site.h"

typedef struct hs_alarm_conf {
    char name[HS_NAME_MAX];
    int line;
    int kind;                 /* hs_rule_kind */
    char ponds[512];          /* comma-separated pond names; "" = by role */
    char role[32];            /* a pond role name; "" = by ponds */
    int quantity;             /* hs_alarm_quantity, when set */
    double high, low, deadband;
    int64_t on_delay_ms, off_delay_ms, window_ms, max_shelve_ms;
    unsigned filter_samples;  /* density-fall median length */
    int priority;             /* index into hs_alarm_priority_names, when set */
    hs_alarm_rule rule;       /* the complete rule, built when the file is read */
} hs_alarm_conf;

/* 1 when [alarm] a applies to pond p of site. */
int hs_conf_alarm_applies(const hs_site *site, const hs_alarm_conf *a, size_t pond);

/* Adds every [alarm NAME] rule to the ponds it applies to. Call it before
 * adding built-in rules, so that a configured rule of the same name wins.
 * Returns the number of alarms added. */
size_t hs_conf_alarms_apply(const hs_site *site, hs_alarm_engine *eng);

#endif
