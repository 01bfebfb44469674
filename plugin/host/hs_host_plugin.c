/* Loading the halostage plugin (or any plugin speaking its ABI): dlopen,
 * version negotiation, operation table. Every refusal says what was
 * expected and what was found, so an operator can fix the install. */
#include <dlfcn.h>
#include <limits.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "hs_host.h"

/* The ABI versions this host speaks, newest first. */
static const int host_versions[] = {HSP_ABI_V1};
#define HOST_VERSION_COUNT (sizeof host_versions / sizeof host_versions[0])

static int file_exists(const char *path)
{
    return access(path, R_OK) == 0;
}

void hs_host_default_plugin_path(char *buf, size_t len)
{
    char exe[PATH_MAX];
    ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
    if (n > 0) {
        exe[n] = '\0';
        char *slash = strrchr(exe, '/');
        if (slash != NULL) {
            *slash = '\0';
            snprintf(buf, len, "%s/halostage.so", exe);
            if (file_exists(buf))
                return;
            snprintf(buf, len, "%s/../lib/halostage/halostage.so", exe);
            if (file_exists(buf))
                return;
        }
    }
    /* Where `make install` or the package put it (PLUGINDIR at build time). */
    snprintf(buf, len, "%s/halostage.so", HS_PLUGIN_DIR);
}

static int offered(int version)
{
    for (size_t i = 0; i < HOST_VERSION_COUNT; i++)
        if (host_versions[i] == version)
            return 1;
    return 0;
}

int hs_host_plugin_load(struct hs_host_plugin *plugin, const char *path)
{
    memset(plugin, 0, sizeof *plugin);
    /* RTLD_LOCAL keeps the plugin's symbols to itself; RTLD_NOW finds a
     * missing symbol at load, not in the middle of the night. */
    plugin->dl = dlopen(path, RTLD_NOW | RTLD_LOCAL);
    if (plugin->dl == NULL) {
        hs_host_log(HSP_LOG_ERR, "cannot load plugin %s: %s", path, dlerror());
        return -1;
    }
    hsp_version_fn version_fn;
    /* POSIX sanctions this conversion from dlsym's void *. */
    *(void **)&version_fn = dlsym(plugin->dl, HALOSTAGE_PLUGIN_VERSION_SYMBOL);
    if (version_fn == NULL) {
        hs_host_log(HSP_LOG_ERR, "plugin %s refused: no %s entry point (not a halostage plugin?)",
                    path, HALOSTAGE_PLUGIN_VERSION_SYMBOL);
        goto fail;
    }
    char why[256] = "";
    int picked = version_fn(HOST_VERSION_COUNT, host_versions, why, sizeof why);
    why[sizeof why - 1] = '\0';
    if (picked == HSP_REFUSED) {
        hs_host_log(HSP_LOG_ERR, "plugin %s refused: it speaks none of this host's ABI versions "
                    "(host offers %d): %s", path, host_versions[0], why[0] ? why : "no reason given");
        goto fail;
    }
    if (!offered(picked)) {
        hs_host_log(HSP_LOG_ERR, "plugin %s refused: it picked ABI version %d, which this host "
                    "did not offer (host offers %d)", path, picked, host_versions[0]);
        goto fail;
    }
    hsp_v1_fn v1_fn;
    *(void **)&v1_fn = dlsym(plugin->dl, HALOSTAGE_PLUGIN_V1_SYMBOL);
    const struct hsp_plugin_v1 *ops = v1_fn != NULL ? v1_fn() : NULL;
    if (ops == NULL || ops->struct_size < offsetof(struct hsp_plugin_v1, spare) ||
        ops->open == NULL || ops->tick == NULL || ops->reload == NULL || ops->close == NULL) {
        hs_host_log(HSP_LOG_ERR, "plugin %s refused: its ABI %d operation table is missing or "
                    "incomplete", path, picked);
        goto fail;
    }
    plugin->abi_version = picked;
    plugin->ops = ops;
    hs_host_log(HSP_LOG_INFO, "loaded plugin %s %s from %s (ABI %d)", ops->name ? ops->name : "?",
                ops->version ? ops->version : "?", path, picked);
    return 0;
fail:
    dlclose(plugin->dl);
    plugin->dl = NULL;
    return -1;
}

void hs_host_plugin_unload(struct hs_host_plugin *plugin)
{
    if (plugin->dl != NULL)
        dlclose(plugin->dl);
    memset(plugin, 0, sizeof *plugin);
}
