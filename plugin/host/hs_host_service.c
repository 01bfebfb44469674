/* halostaged's service mode: load the plugin, run it, answer signals and
 * speak sd_notify. The loop is the only place that acts on signals; the
 * handlers only set flags (async-signal-safe). Signals stay blocked except
 * inside ppoll(), so a signal can never slip in between the flag check and
 * the sleep. */
#include <errno.h>
#include <inttypes.h>
#include <poll.h>
#include <signal.h>
#include <stdio.h>
#include <string.h>
#include <systemd/sd-daemon.h>
#include <time.h>

#include "hs_host.h"

#define EXIT_CONFIG 78      /* sysexits EX_CONFIG */
#define EXIT_UNAVAILABLE 69 /* sysexits EX_UNAVAILABLE: plugin refused */
#define STATUS_EVERY_MS 10000
#define TICK_FLOOR_MS 10    /* never spin, whatever the plugin asks */
#define TICK_CEILING_MS 5000

static volatile sig_atomic_t stop_requested;
static volatile sig_atomic_t reload_requested;

static void on_stop(int sig)
{
    (void)sig;
    stop_requested = 1;
}

static void on_reload(int sig)
{
    (void)sig;
    reload_requested = 1;
}

static uint64_t now_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (uint64_t)ts.tv_sec * 1000u + (uint64_t)ts.tv_nsec / 1000000u;
}

/* ---- what the host offers the plugin ---- */

struct host_state {
    uint64_t values_emitted;
    int emit_stdout;
};

static void host_log(void *data, int level, const char *fmt, ...)
{
    (void)data;
    va_list ap;
    va_start(ap, fmt);
    hs_host_vlog(level, fmt, ap);
    va_end(ap);
}

static int host_emit(void *data, const struct hsp_value *value)
{
    struct host_state *hs = data;
    if (value == NULL || value->struct_size < offsetof(struct hsp_value, spare) ||
        value->tag == NULL)
        return -1;
    hs->values_emitted++;
    if (!hs->emit_stdout)
        return 0;
    /* One line per value: "TAG QUALITY VALUE", for tests and for piping
     * into another logger. */
    static const char *const quality_names[] = {"good", "uncertain", "bad"};
    const char *q = value->quality <= HSP_QUALITY_BAD ? quality_names[value->quality] : "bad";
    if (value->type == HSP_VALUE_NUMBER || value->type == HSP_VALUE_BOOL)
        printf("%s %s %.10g\n", value->tag, q, value->number);
    else
        printf("%s %s %s\n", value->tag, q, value->text ? value->text : "");
    fflush(stdout);
    return 0;
}

static int install_signals(sigset_t *run_mask)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sigemptyset(&sa.sa_mask);
    sa.sa_handler = on_stop;
    if (sigaction(SIGTERM, &sa, NULL) != 0 || sigaction(SIGINT, &sa, NULL) != 0)
        return -1;
    sa.sa_handler = on_reload;
    if (sigaction(SIGHUP, &sa, NULL) != 0)
        return -1;
    sa.sa_handler = SIG_IGN; /* a broker socket closing must not kill us */
    if (sigaction(SIGPIPE, &sa, NULL) != 0)
        return -1;
    sigset_t block;
    sigemptyset(&block);
    sigaddset(&block, SIGTERM);
    sigaddset(&block, SIGINT);
    sigaddset(&block, SIGHUP);
    /* Threads the plugin starts inherit this mask, so only the main
     * thread ever takes these signals, inside ppoll(). */
    return sigprocmask(SIG_BLOCK, &block, run_mask) == 0 ? 0 : -1;
}

static void notify_status(const struct hs_host_plugin *plugin)
{
    char line[200] = "";
    if (plugin->ops->status != NULL)
        plugin->ops->status(plugin->instance, line, sizeof line);
    line[sizeof line - 1] = '\0';
    sd_notifyf(0, "STATUS=%s", line);
}

static void do_reload(struct hs_host_plugin *plugin, const char *config_path)
{
    sd_notifyf(0, "RELOADING=1\nSTATUS=reloading %s", config_path);
    hs_host_log(HSP_LOG_NOTICE, "reloading %s", config_path);
    int rc = plugin->ops->reload(plugin->instance, config_path);
    if (rc == HSP_OK)
        hs_host_log(HSP_LOG_NOTICE, "reload done: the new configuration is in force");
    else
        hs_host_log(HSP_LOG_ERR, "reload refused (%s): still running on the previous "
                    "configuration", rc == HSP_ERR_CONFIG ? "invalid configuration, see above"
                                                          : "runtime failure, see above");
    sd_notify(0, "READY=1");
    notify_status(plugin);
}

int hs_host_service_run(const struct hs_host_options *options)
{
    char path_buf[4096];
    const char *plugin_path = options->plugin_path;
    if (plugin_path == NULL) {
        hs_host_default_plugin_path(path_buf, sizeof path_buf);
        plugin_path = path_buf;
    }
    sigset_t run_mask;
    if (install_signals(&run_mask) != 0) {
        hs_host_log(HSP_LOG_ERR, "cannot install signal handlers: %s", strerror(errno));
        return 1;
    }
    struct hs_host_plugin plugin;
    if (hs_host_plugin_load(&plugin, plugin_path) != 0)
        return EXIT_UNAVAILABLE;

    struct host_state state = {.emit_stdout = options->emit_stdout};
    struct hsp_host host = {
        .struct_size = sizeof host,
        .abi_version = (uint32_t)plugin.abi_version,
        .host_name = "halostaged",
        .host_data = &state,
        .log = host_log,
        .emit = host_emit,
    };
    int rc = plugin.ops->open(&host, options->config_path, &plugin.instance);
    if (rc != HSP_OK) {
        hs_host_log(HSP_LOG_ERR, "cannot start on %s (%s)", options->config_path,
                    rc == HSP_ERR_CONFIG ? "invalid configuration" : "runtime failure");
        hs_host_plugin_unload(&plugin);
        return rc == HSP_ERR_CONFIG ? EXIT_CONFIG : 1;
    }

    uint64_t watchdog_us = 0;
    uint64_t watchdog_every = 0;
    if (sd_watchdog_enabled(0, &watchdog_us) > 0 && watchdog_us > 0)
        watchdog_every = watchdog_us / 2000u; /* ping at half the interval, in ms */
    if (watchdog_every == 0 && watchdog_us > 0)
        watchdog_every = 1;

    sd_notify(0, "READY=1");
    notify_status(&plugin);
    hs_host_log(HSP_LOG_NOTICE, "running on %s%s", options->config_path,
                watchdog_every ? " with the systemd watchdog" : "");

    uint64_t start = now_ms();
    uint64_t next_tick = start;
    uint64_t next_watchdog = start;
    uint64_t next_status = start + STATUS_EVERY_MS;
    int exit_status = 0;
    while (!stop_requested) {
        uint64_t now = now_ms();
        if (options->max_runtime_s && now - start >= (uint64_t)options->max_runtime_s * 1000u) {
            hs_host_log(HSP_LOG_NOTICE, "run time of %us reached", options->max_runtime_s);
            break;
        }
        if (reload_requested) {
            reload_requested = 0;
            do_reload(&plugin, options->config_path);
        }
        if (now >= next_tick) {
            uint32_t next_ms = 1000;
            if (plugin.ops->tick(plugin.instance, &next_ms) != HSP_OK)
                next_ms = 1000; /* the plugin logged why; try again shortly */
            if (next_ms < TICK_FLOOR_MS)
                next_ms = TICK_FLOOR_MS;
            if (next_ms > TICK_CEILING_MS)
                next_ms = TICK_CEILING_MS;
            next_tick = now_ms() + next_ms;
        }
        now = now_ms();
        if (watchdog_every && now >= next_watchdog) {
            sd_notify(0, "WATCHDOG=1");
            next_watchdog = now + watchdog_every;
        }
        if (now >= next_status) {
            notify_status(&plugin);
            next_status = now + STATUS_EVERY_MS;
        }
        uint64_t wake = next_tick;
        if (watchdog_every && next_watchdog < wake)
            wake = next_watchdog;
        if (next_status < wake)
            wake = next_status;
        now = now_ms();
        uint64_t wait = wake > now ? wake - now : 0;
        struct timespec ts = {.tv_sec = (time_t)(wait / 1000u),
                              .tv_nsec = (long)(wait % 1000u) * 1000000L};
        /* Signals are delivered only here (EINTR), then acted on above. */
        if (ppoll(NULL, 0, &ts, &run_mask) < 0 && errno != EINTR) {
            hs_host_log(HSP_LOG_ERR, "ppoll: %s", strerror(errno));
            exit_status = 1;
            break;
        }
    }
    sd_notify(0, "STOPPING=1\nSTATUS=stopping: flushing the store and the outbox");
    hs_host_log(HSP_LOG_NOTICE, "stopping: pumps to their safe state, flushing");
    plugin.ops->close(plugin.instance);
    plugin.instance = NULL;
    hs_host_plugin_unload(&plugin);
    hs_host_log(HSP_LOG_NOTICE, "stopped cleanly after %" PRIu64 " values emitted",
                state.values_emitted);
    return exit_status;
}
