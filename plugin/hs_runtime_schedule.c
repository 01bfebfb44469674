/* The daemon's chain schedule: once a day (UTC), and after a start or a
 * reload, as soon as every pond has a state, the week's schedule
 * (hs_chain_plan.h) is published retained on <prefix>/<site>/schedule.
 * Advice only: the daemon never acts on it. A schedule that cannot be made
 * (no achieved evaporation yet, a pond without a state) is retried every
 * SCHEDULE_RETRY_MS (every SCHEDULE_EARLY_RETRY_MS in the first
 * SCHEDULE_EARLY_MS after a start, while the first states settle) and the
 * reason logged: at warning when it is new, at debug when it repeats. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hs_chain_plan.h"
#include "hs_log.h"
#include "hs_runtime_private.h"

#define SCHEDULE_DAYS 7
#define SCHEDULE_RETRY_MS (10 * 60000LL)  /* after a failure */
#define SCHEDULE_EARLY_RETRY_MS 30000LL   /* ... in the first minutes, while states settle */
#define SCHEDULE_EARLY_MS (15 * 60000LL)
#define SCHEDULE_LOOK_MS 60000LL          /* for the next UTC day */
#define DAY_MS 86400000LL

void hs_rt_schedule_tick(hs_runtime *rt, int64_t mono_ms, int64_t now_ms)
{
    if (rt->link == NULL || !rt->warm || mono_ms < rt->next_schedule_ms)
        return;
    int64_t day = now_ms / DAY_MS;
    if (day == rt->schedule_day) {
        rt->next_schedule_ms = mono_ms + SCHEDULE_LOOK_MS;
        return;
    }
    for (size_t i = 0; i < rt->site.n_ponds; i++)
        if (!rt->ponds[i].view.have_state) {
            rt->next_schedule_ms = mono_ms + SCHEDULE_LOOK_MS / 12;
            return;
        }
    struct hs_chain_options o;
    double t_ref = rt->site.site.reference_temperature_c;
    hs_chain_options_default(&o, isfinite(t_ref) ? t_ref : 15.0);
    o.days = SCHEDULE_DAYS;
    struct hs_chain_plan plan;
    char err[256], topic[HS_TOPIC_MAX];
    int64_t retry = now_ms - rt->started_ms < SCHEDULE_EARLY_MS ? SCHEDULE_EARLY_RETRY_MS
                                                                : SCHEDULE_RETRY_MS;
    if (hs_chain_plan_make(&rt->site, rt->models, rt->store, now_ms, &o, &plan, err,
                           sizeof err) != 0) {
        /* the same reason again is not news: a warning once, then debug */
        int same = strcmp(err, rt->schedule_told) == 0;
        hs_log(same ? HSP_LOG_DEBUG : HSP_LOG_WARNING, "schedule: %s; trying again in %lld s",
               err, (long long)(retry / 1000));
        snprintf(rt->schedule_told, sizeof rt->schedule_told, "%s", err);
        rt->next_schedule_ms = mono_ms + retry;
        return;
    }
    json_t *doc = hs_chain_plan_json(&plan, rt->site.site.name, now_ms);
    int ok = doc != NULL && hs_topic(topic, sizeof topic, &rt->topics, "schedule", NULL, NULL) == 0 &&
             hs_enqueue_json(rt->store, HS_MSG_STATE, topic, doc, 1) == 0;
    json_decref(doc);
    if (ok) {
        hs_log(HSP_LOG_INFO, "schedule: %d days published on %s (evaporation: %s)",
               SCHEDULE_DAYS, topic, plan.evaporation.source);
        rt->schedule_day = day;
        rt->schedule_told[0] = '\0';
        rt->next_schedule_ms = mono_ms + SCHEDULE_LOOK_MS;
    } else {
        hs_log(HSP_LOG_WARNING, "schedule: could not queue it; trying again in %lld s",
               (long long)(retry / 1000));
        rt->next_schedule_ms = mono_ms + retry;
    }
    hs_chain_plan_free(&plan);
}
