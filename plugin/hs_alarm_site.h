/* The built-in alarm rules every pond gets from its own limits (level,
 * dike crest, density band, stale sensors, bus, density fall, saturation
 * by role), shared by the daemon and the chain schedule's prediction of
 * the alarms a day would raise. Call after hs_conf_alarms_apply, so that a
 * configured rule of the same name wins. */
#ifndef HS_ALARM_SITE_H
#define HS_ALARM_SITE_H

#include "hs_alarm.h"
#include "hs_site.h"

void hs_alarm_site_rules(const hs_site *site, hs_alarm_engine *eng);

/* One built-in rule of `kind` named `name` for `pond`, with the limits
 * given (NaN: the kind's default); skipped when the rule is incomplete
 * (a limit the pond does not have). */
void hs_alarm_site_add_rule(hs_alarm_engine *eng, const char *pond, hs_rule_kind kind,
                            const char *name, double low, double high);

#endif
