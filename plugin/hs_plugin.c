/* The plugin side of the ABI (halostage_plugin.h): version negotiation and
 * the operation table, each operation handing over to hs_runtime. Only the
 * two entry points are exported from halostage.so (mk/plugin.map). */
#include <stdio.h>
#include <stdlib.h>

#include "halostage_plugin.h"
#include "hs_log.h"
#include "hs_runtime.h"

#define HS_PLUGIN_RELEASE "1.0"

struct instance {
    struct hsp_host host;   /* copied: the host's struct is borrowed */
    hs_runtime *runtime;
};

static int emit_to_host(void *data, const struct hsp_value *value)
{
    const struct hsp_host *host = data;
    return host->emit != NULL ? host->emit(host->host_data, value) : -1;
}

static int plugin_open(const struct hsp_host *host, const char *config_path, void **out)
{
    if (host == NULL || config_path == NULL || out == NULL || host->log == NULL ||
        host->struct_size < offsetof(struct hsp_host, spare))
        return HSP_ERR_USAGE;
    struct instance *inst = calloc(1, sizeof *inst);
    if (inst == NULL)
        return HSP_ERR_RUNTIME;
    inst->host = *host;
    hs_log_set_sink(inst->host.log, inst->host.host_data);
    struct hs_emit_sink sink = {.emit = emit_to_host, .data = &inst->host};
    int rc = hs_runtime_open(config_path, &sink, &inst->runtime);
    if (rc != HSP_OK) {
        hs_log_set_sink(NULL, NULL);
        free(inst);
        return rc;
    }
    *out = inst;
    return HSP_OK;
}

static int plugin_tick(void *instance, uint32_t *next_ms)
{
    struct instance *inst = instance;
    if (inst == NULL || next_ms == NULL)
        return HSP_ERR_USAGE;
    return hs_runtime_tick(inst->runtime, next_ms);
}

static int plugin_reload(void *instance, const char *config_path)
{
    struct instance *inst = instance;
    if (inst == NULL || config_path == NULL)
        return HSP_ERR_USAGE;
    return hs_runtime_reload(inst->runtime, config_path);
}

static void plugin_status(void *instance, char *buf, size_t len)
{
    struct instance *inst = instance;
    if (inst == NULL || buf == NULL || len == 0)
        return;
    hs_runtime_status(inst->runtime, buf, len);
}

static void plugin_close(void *instance)
{
    struct instance *inst = instance;
    if (inst == NULL)
        return;
    hs_runtime_close(inst->runtime);
    hs_log_set_sink(NULL, NULL);
    free(inst);
}

static const struct hsp_plugin_v1 plugin_ops = {
    .struct_size = sizeof plugin_ops,
    .name = "halostage",
    .version = HS_PLUGIN_RELEASE,
    .open = plugin_open,
    .tick = plugin_tick,
    .reload = plugin_reload,
    .status = plugin_status,
    .close = plugin_close,
};

int halostage_plugin_version(size_t offered_count, const int *offered, char *why, size_t why_len)
{
    for (size_t i = 0; offered != NULL && i < offered_count; i++)
        if (offered[i] == HSP_ABI_V1)
            return HSP_ABI_V1;
    if (why != NULL && why_len > 0)
        snprintf(why, why_len, "the halostage plugin %s speaks ABI version %d only",
                 HS_PLUGIN_RELEASE, HSP_ABI_V1);
    return HSP_REFUSED;
}

const struct hsp_plugin_v1 *halostage_plugin_v1(void)
{
    return &plugin_ops;
}
