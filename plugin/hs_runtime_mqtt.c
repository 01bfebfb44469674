/* MQTT for the runtime. */
#include "hs_log.h"
#include "hs_runtime_private.h"

int hs_rt_mqtt_open(hs_runtime *rt)
{
    rt->link = NULL;
    rt->publisher = NULL;
    hs_log(HSP_LOG_NOTICE, "no [mqtt] section: publishing is off");
    return 0;
}

void hs_rt_mqtt_pump(hs_runtime *rt, int wait_ms)
{
    (void)rt;
    (void)wait_ms;
}

void hs_rt_mqtt_close(hs_runtime *rt, int wait_ms)
{
    (void)rt;
    (void)wait_ms;
}
