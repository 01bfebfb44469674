/* A minimal, well-behaved plugin for testing the host alone: it emits a
 * counter every tick under a label read from its config file. The config is
 * lines "label = WORD" and "interval_ms = N"; anything else is invalid, so
 * the host's reload path can be exercised with a broken file. close()
 * emits "counter/<label>/closed" and logs the count, like a flush would. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "halostage_plugin.h"

struct counter {
    const struct hsp_host *host;
    char label[32];
    unsigned interval_ms;
    unsigned long count;
};

static int read_config(const struct hsp_host *host, const char *path, char *label,
                       unsigned *interval)
{
    FILE *f = fopen(path, "r");
    if (f == NULL) {
        host->log(host->host_data, HSP_LOG_ERR, "%s: %s", path, strerror(errno));
        return HSP_ERR_CONFIG;
    }
    char line[128];
    int lineno = 0, rc = HSP_OK;
    char lab[32] = "";
    unsigned ms = 100;
    while (fgets(line, sizeof line, f) != NULL) {
        lineno++;
        char word[32];
        unsigned n;
        if (sscanf(line, " label = %31s", word) == 1) {
            snprintf(lab, sizeof lab, "%s", word);
        } else if (sscanf(line, " interval_ms = %u", &n) == 1 && n > 0) {
            ms = n;
        } else {
            host->log(host->host_data, HSP_LOG_ERR, "%s:%d: not understood", path, lineno);
            rc = HSP_ERR_CONFIG;
        }
    }
    fclose(f);
    if (rc == HSP_OK && lab[0] == '\0') {
        host->log(host->host_data, HSP_LOG_ERR, "%s: no label", path);
        rc = HSP_ERR_CONFIG;
    }
    if (rc == HSP_OK) {
        memcpy(label, lab, sizeof lab);
        *interval = ms;
    }
    return rc;
}

static int counter_open(const struct hsp_host *host, const char *config_path, void **instance)
{
    struct counter *c = calloc(1, sizeof *c);
    if (c == NULL)
        return HSP_ERR_RUNTIME;
    c->host = host;
    int rc = read_config(host, config_path, c->label, &c->interval_ms);
    if (rc != HSP_OK) {
        free(c);
        return rc;
    }
    *instance = c;
    return HSP_OK;
}

static int counter_tick(void *instance, uint32_t *next_ms)
{
    struct counter *c = instance;
    char tag[64];
    snprintf(tag, sizeof tag, "counter/%s", c->label);
    struct hsp_value v = {.struct_size = sizeof v, .type = HSP_VALUE_NUMBER, .tag = tag,
                          .unit = "", .number = (double)++c->count};
    c->host->emit(c->host->host_data, &v);
    *next_ms = c->interval_ms;
    return HSP_OK;
}

static int counter_reload(void *instance, const char *config_path)
{
    struct counter *c = instance;
    return read_config(c->host, config_path, c->label, &c->interval_ms);
}

static void counter_status(void *instance, char *buf, size_t len)
{
    struct counter *c = instance;
    snprintf(buf, len, "counting %s: %lu", c->label, c->count);
}

static void counter_close(void *instance)
{
    struct counter *c = instance;
    char tag[64];
    snprintf(tag, sizeof tag, "counter/%s/closed", c->label);
    struct hsp_value v = {.struct_size = sizeof v, .type = HSP_VALUE_NUMBER, .tag = tag,
                          .unit = "", .number = (double)c->count};
    c->host->emit(c->host->host_data, &v);
    c->host->log(c->host->host_data, HSP_LOG_INFO, "counter closed after %lu ticks", c->count);
    free(c);
}

static const struct hsp_plugin_v1 ops = {
    .struct_size = sizeof ops,
    .name = "counter",
    .version = "test",
    .open = counter_open,
    .tick = counter_tick,
    .reload = counter_reload,
    .status = counter_status,
    .close = counter_close,
};

int halostage_plugin_version(size_t offered_count, const int *offered, char *why, size_t why_len)
{
    for (size_t i = 0; i < offered_count; i++)
        if (offered[i] == HSP_ABI_V1)
            return HSP_ABI_V1;
    snprintf(why, why_len, "this plugin speaks ABI version 1 only");
    return HSP_REFUSED;
}

const struct hsp_plugin_v1 *halostage_plugin_v1(void)
{
    return &ops;
}
