/* halostage plugin ABI: the one contract between the halostage plugin
 * (build/halostage.so) and whatever hosts it: our own daemon halostaged, or
 * any data logger that can load a shared object.
 *
 * Loading, in this order:
 *   1. dlopen() the plugin; dlsym() HALOSTAGE_PLUGIN_VERSION_SYMBOL.
 *   2. Call it with every ABI version the host speaks. The plugin returns the
 *      one it picks, or HSP_REFUSED with a readable reason in `why`. A host
 *      must refuse a returned version it did not offer.
 *   3. dlsym() the ops getter of the picked version (for version 1,
 *      HALOSTAGE_PLUGIN_V1_SYMBOL) and call it for the operation table.
 *   4. open(), then tick() whenever the plugin asks, reload() on request,
 *      and close() once at the end.
 *
 * Growth rules: structs begin with `struct_size` (the writer's sizeof) and
 * end with spare room. A new field takes a spare slot or goes after the
 * last field and bumps nothing; a change in meaning bumps the ABI version.
 * A reader never reads past the struct_size the writer gave.
 *
 * Threads: the host calls every plugin operation from one thread. The
 * plugin calls emit() only from inside an operation, on that same thread.
 * log() may come from any thread the plugin runs (its field-bus threads),
 * so a host's log function must be thread-safe (one stdio call per line is).
 *
 * Memory: every pointer passed in either direction is borrowed for the
 * duration of the call only; copy what you keep. */
#ifndef HALOSTAGE_PLUGIN_H
#define HALOSTAGE_PLUGIN_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* ABI versions this header describes. */
#define HSP_ABI_V1 1
#define HSP_ABI_CURRENT HSP_ABI_V1
#define HSP_REFUSED (-1)

/* Symbol names a host looks up with dlsym(). */
#define HALOSTAGE_PLUGIN_VERSION_SYMBOL "halostage_plugin_version"
#define HALOSTAGE_PLUGIN_V1_SYMBOL "halostage_plugin_v1"

/* Log levels are syslog's numbers, so a host can hand them straight to
 * journald (`<N>` prefixes) or syslog(3). */
typedef enum {
    HSP_LOG_ERR = 3,
    HSP_LOG_WARNING = 4,
    HSP_LOG_NOTICE = 5,
    HSP_LOG_INFO = 6,
    HSP_LOG_DEBUG = 7
} hsp_log_level;

typedef enum {
    HSP_VALUE_NUMBER = 1, /* `number` holds it; NaN means unknown */
    HSP_VALUE_TEXT = 2,   /* `text` holds it (UTF-8, NUL-terminated) */
    HSP_VALUE_BOOL = 3,   /* `number` is 0 or 1 */
    HSP_VALUE_JSON = 4    /* `text` is one JSON document (a pond's whole state) */
} hsp_value_type;

/* Quality of an emitted value, coarse on purpose so any logger maps it. */
typedef enum {
    HSP_QUALITY_GOOD = 0,
    HSP_QUALITY_UNCERTAIN = 1, /* computed from partly stale inputs or flagged by a warning */
    HSP_QUALITY_BAD = 2        /* inputs bad or missing; do not act on it */
} hsp_quality;

/* One tagged value handed from the plugin to the host. Tags are
 * slash-separated, lower case: "pond/<pond>/density_kg_m3",
 * "pond/<pond>/state" (JSON), "alarm/<pond>/<rule>" (text: ISA-18.2 state),
 * "transfer/<transfer>/advice" (text), "gateway/online" (bool). */
struct hsp_value {
    uint32_t struct_size;  /* sizeof(struct hsp_value) as the plugin knows it */
    uint32_t type;         /* hsp_value_type */
    const char *tag;
    const char *unit;      /* SI symbol ("kg/m3", "degC", "m", "m3", "d") or "" */
    double number;
    const char *text;
    uint32_t quality;      /* hsp_quality */
    uint32_t reserved32;
    int64_t time_unix_ms;  /* when the underlying samples were taken */
    void *spare[8];        /* room to grow; zero */
};

/* What the host offers the plugin. */
struct hsp_host {
    uint32_t struct_size;
    uint32_t abi_version;  /* the version the plugin picked */
    const char *host_name; /* e.g. "halostaged 1.0" */
    void *host_data;       /* passed back on every call below */
    /* Leveled log line, without a trailing newline. Never given secrets. */
    void (*log)(void *host_data, int level, const char *fmt, ...)
        __attribute__((format(printf, 3, 4)));
    /* Returns 0 when accepted, nonzero when the host drops it. */
    int (*emit)(void *host_data, const struct hsp_value *value);
    /* Allocation the host prefers the plugin to use for long-lived data;
     * NULL means the C library's malloc/free. */
    void *(*alloc)(void *host_data, size_t size);
    void (*release)(void *host_data, void *ptr);
    void *spare[8];
};

/* Results of open, reload and tick. */
typedef enum {
    HSP_OK = 0,
    HSP_ERR_CONFIG = 1,  /* the configuration is invalid; reasons were logged */
    HSP_ERR_RUNTIME = 2, /* a resource failed (file, database, memory) */
    HSP_ERR_USAGE = 3    /* the host broke the contract (NULL, wrong order) */
} hsp_result;

/* What the plugin offers, version 1. */
struct hsp_plugin_v1 {
    uint32_t struct_size;
    uint32_t reserved32;
    const char *name;    /* "halostage" */
    const char *version; /* the plugin's own release */
    /* Reads and validates the configuration, opens what it needs and starts
     * acquisition. On success *instance is the plugin's handle. */
    int (*open)(const struct hsp_host *host, const char *config_path, void **instance);
    /* Does all work that is due. Returns HSP_OK and sets *next_ms to the
     * milliseconds until the plugin wants the next tick (a host may call
     * sooner). */
    int (*tick)(void *instance, uint32_t *next_ms);
    /* Re-reads the configuration. It validates first: on any error the
     * old configuration stays in force, the reasons are logged, and the
     * result is HSP_ERR_CONFIG. */
    int (*reload)(void *instance, const char *config_path);
    /* One line for a status display (sd_notify STATUS=), at most len-1 bytes. */
    void (*status)(void *instance, char *buf, size_t len);
    /* Stops acquisition, leaves every pump in its safe state, flushes the
     * store and the outbox, publishes gateway offline, frees everything. */
    void (*close)(void *instance);
    void *spare[8];
};

/* Exported by the plugin under HALOSTAGE_PLUGIN_VERSION_SYMBOL.
 * offered: the versions the host speaks. Returns the picked version or
 * HSP_REFUSED, and then writes a reason into why (why_len bytes). */
typedef int (*hsp_version_fn)(size_t offered_count, const int *offered,
                              char *why, size_t why_len);
/* Exported under HALOSTAGE_PLUGIN_V1_SYMBOL. */
typedef const struct hsp_plugin_v1 *(*hsp_v1_fn)(void);

/* The two entry points as the halostage plugin defines them. */
int halostage_plugin_version(size_t offered_count, const int *offered,
                             char *why, size_t why_len);
const struct hsp_plugin_v1 *halostage_plugin_v1(void);

#ifdef __cplusplus
}
#endif

#endif
