/* The runtime's insides, shared by hs_runtime*.c only. One runtime belongs
 * to the host's thread; the bus threads touch nothing here but the queue
 * and their own write requests. Every pointer below is owned by the
 * runtime unless marked borrowed. */
#ifndef HS_RUNTIME_PRIVATE_H
#define HS_RUNTIME_PRIVATE_H

#include <stdint.h>

#include "hp_bus.h"
#include "hp_mbserver.h"
#include "hp_mqtt.h"
#include "hp_queue.h"
#include "hs_alarm.h"
#include "hs_brine_eval.h"
#include "hs_command.h"
#include "hs_conf_transfer.h"
#include "hs_hydro.h"
#include "hs_lock.h"
#include "hs_mb_image.h"
#include "hs_output.h"
#include "hs_publish.h"
#include "hs_runtime.h"
#include "hs_site.h"
#include "hs_sparkplug.h"
#include "hs_stage_table.h"
#include "hs_store.h"
#include "hs_transfer.h"
#include "hs_web.h"

#define HS_RT_QUEUE_CAPACITY 4096
#define HS_RT_TICK_MS 100          /* how often the main loop looks at the queue */
#define HS_RT_MAINTAIN_MS 900000   /* store rollups, retention: a pass writes every
                                    * series' last page once, so fewer passes write less */
#define HS_RT_RETENTION_EVERY_MS (6 * 3600000) /* rows past retention go at most this often */
#define HS_RT_HOUR_FOLD_EVERY_MS (24 * 3600000) /* minutes folded into hours once a day */
#define HS_RT_CALIB_EVERY_MS 10000 /* re-read the hydrometer readings */
#define HS_RT_RAIN_SLOTS 64        /* gauge readings kept per transfer for its window */
#define HS_RT_TREND_SLOTS 120      /* 1/CF points kept per pond for the short-term trend */
#define HS_RT_TREND_EVERY_S 5.0    /* at most one trend point per this many seconds */

/* Per-transfer memory between cycles. */
struct hs_rt_transfer {
    struct hs_transfer_rule rule;
    struct hs_transfer_state state;
    struct hs_transfer_decision last;
    int have_last;
    /* the pump output as a command/feedback pair (hs_output.h); only for
     * actuated transfers */
    struct hs_output out;
    int want;                     /* the decision for the output: -1 none, 0 STOP, 1 RUN */
    int hands_off;                /* manual or manual unknown: never written */
    int out_failed;               /* the output's command is not confirmed (alarm) */
    int out_dropped;              /* a confirmed RUN was undone outside us: tell the engine */
    /* the PLC heartbeat; the first transfer naming a (bus, unit, register)
     * owns it, the others point at it */
    int hb_owner;                 /* index of the owning transfer, -1 no heartbeat */
    uint16_t hb_confirmed;        /* last value the device acknowledged (0 none) */
    uint16_t hb_value;            /* value in flight */
    uint32_t hb_seq;              /* its request, 0 none */
    int64_t hb_asked_ms, hb_next_ms;
    int hb_stopped;               /* counting stopped: the PLC watchdog takes over */
    int lockout_checked;          /* the journal's lockout state was looked at */
    int64_t still_running_log_ms; /* rate limit of the "still running" line */
    unsigned still_running_quiet; /* lines left out since */
    int64_t rain_t[HS_RT_RAIN_SLOTS];   /* gauge history for the rain window */
    double rain_v[HS_RT_RAIN_SLOTS];
    unsigned rain_n, rain_head;
    double predicted_mix_kg_m3;   /* last mixing prediction, NaN unknown */
    int64_t flow_ms;              /* wall time up to which pumping is in the balances */
    int feedback_seen;            /* this run's feedback has confirmed the pump (logged) */
};

/* Per-signal storage by exception (hs_runtime_keep.c): the last kept raw
 * sample, and the running 1-minute rollup of every sample. */
/* One series' open 1-minute rollup: n, min, sum, max, worst quality. */
struct hs_rt_acc {
    int64_t minute_ms, n;
    double vmin, vsum, vmax;
    int worst;
};

/* A signal's last kept raw sample (by exception) and its open minute. */
struct hs_rt_keep {
    int have;
    double v;
    int q;
    int64_t t_ms;
    struct hs_rt_acc acc;
};

/* A pond's last stored state (by exception) and its quantities' open
 * minutes (hs_store_state_fields). */
struct hs_rt_keep_state {
    int have;
    int64_t t_ms;
    double sg, depth_m;
    int stage, quality;
    struct hs_rt_acc acc[HS_STORE_STATE_FIELDS];
};

/* A raw sample or a pond state kept by exception, held in memory until the
 * next commit (hs_rt_keep_commit): the daemon never keeps a write
 * transaction open between commits, so the CLI and the page can write. */
struct hs_rt_held_sample {
    size_t signal;
    int64_t t_ms;
    double value;
    int quality, code, flags;
    char reason[HS_REASON_MAX];
};
struct hs_rt_held_state {
    size_t pond;
    int64_t t_ms;
    hc_brine_state state;
    hs_pond_extra extra;
    int quality;
};
#define HS_RT_HELD_MAX 4096 /* held rows written and committed early past this */

/* A closed minute waiting for the next rollup write: series is a signal
 * index, or n_signals + pond * HS_STORE_STATE_FIELDS + field. */
struct hs_rt_minute {
    size_t series;
    struct hs_rt_acc acc;
};

/* Per-pond memory between cycles. */
struct hs_rt_pond {
    hs_pond_view view;
    hs_pond_aids aids;            /* calibration and manual reading (hs_runtime_calib.c) */
    hc_calibration calibration;   /* the pond's fit when calib_ok */
    int calib_ok;
    size_t calib_rows, calib_skipped; /* readings behind the fit, to notice new ones */
    int dirty;                    /* new samples (or a quality change) since the last evaluation */
    int64_t last_state_ms;        /* input time of the last stored state; 0 none */
    int last_state_quality;       /* its quality; -1 none */
    /* what was last published (MQTT, emit): input time, qualities, and when
     * (monotonic), for the heartbeat of the retained state */
    int64_t pub_t_ms, pub_mono_ms;
    int pub_quality, pub_depth_quality, pub_have;
    struct hs_hydro hydro;
    int hydro_ok;
    struct hs_hydro_report report;
    /* recent trend of 1/CF for days-to-target before the daily balance has
     * a rate: (wall time [s], 1/CF) pairs, newest at trend_head - 1 */
    double trend_t[HS_RT_TREND_SLOTS], trend_inv_cf[HS_RT_TREND_SLOTS];
    unsigned trend_n, trend_head;
    struct hs_stage_table table;  /* stage-storage table when the pond has one */
    int table_loaded;
    double rain_last_m;           /* last rain-gauge total fed to the balance, NaN none */
    char uncertain[256];          /* alarm rules of the pond the uncertainty holds back
                                     now ("band,fall") */
    char uncertain_told[256];     /* ... as told in the log since uncertain_told_ms */
    int64_t uncertain_told_ms;    /* monotonic; 0 never */
};

struct hs_runtime {
    struct hs_emit_sink sink;     /* the host's emit (borrowed callback) */
    char config_path[HS_PATH_MAX];
    hs_site site;
    hs_brine_models *models;
    double gravity_m_s2;

    hp_queue *queue;
    hp_bus **buses;               /* n = site.n_buses; NULL for a bus without points */
    uint32_t **bus_signals;       /* per bus: point index -> signal index */
    size_t *bus_n_points;
    hs_reading *readings;         /* per signal */
    struct hs_rt_keep *keep;      /* per signal */
    struct hs_rt_keep_state *keep_state; /* per pond */
    struct hs_rt_minute *minutes; /* closed minutes not written yet (owned) */
    size_t n_minutes, cap_minutes;
    struct hs_rt_held_sample *held_samples; /* kept rows not written yet (owned) */
    size_t n_held_samples, cap_held_samples;
    struct hs_rt_held_state *held_states;
    size_t n_held_states, cap_held_states;
    int held_now;                 /* a held row an operator must see at once: commit now */
    int *bus_down;                /* per bus: every point of it failing */
    uint64_t (*units_down)[4];    /* per bus: unit ids down, as last logged */
    int *slow_logged;             /* per bus: "cannot keep the poll interval" said */
    int warm;                     /* every bus has answered once or is known down */

    struct hs_rt_pond *ponds;     /* per pond */
    struct hs_rt_transfer *transfers; /* per transfer */

    hs_lock *lock;                /* one daemon per site (hs_lock.h) */
    hs_store *store;
    hs_alarm_engine *alarms;
    hs_alarm_sink alarm_sink;
    hs_topics topics;
    hp_mqtt *link;                /* NULL: MQTT off */
    hs_publisher *publisher;
    hs_commands commands;
    hs_web *web;                  /* NULL: no [web] section */
    hs_mb_image *mb_image;        /* [modbus_server]: the map; NULL off */
    hp_mbserver *mb_server;       /* its thread; reads mb_image only */
    hs_sparkplug *spb;            /* [sparkplug]: the edge node's thread; NULL off */
    uint64_t spb_bd_seq;          /* the next session's bdSeq, kept across reloads */
    int64_t spb_bd_seq_kept;      /* as last kept in the store (store_meta), -1 not read */

    int64_t next_eval_ms;         /* monotonic */
    int64_t next_maintain_ms;
    int64_t next_calib_ms;        /* monotonic; 0: re-read the readings now */
    int64_t next_command_ms;
    int64_t next_commit_ms;       /* monotonic: samples and states go to disk then */
    int64_t next_schedule_ms;     /* monotonic: when to look at the schedule again */
    int64_t schedule_day;         /* UTC day of the last published schedule; -1 none */
    char schedule_told[256];      /* the last failure logged at warning ("" none) */
    int64_t state_heartbeat_ms;   /* republish an unchanged retained state this often; 0 never */
    uint64_t samples_in, cycles;
    uint64_t states_stored, states_published;
    int64_t started_ms;
};

/* hs_runtime_calib.c: hydrometer readings -> per-pond calibration and
 * manual reading, re-read when next_calib_ms is due */
void hs_rt_calib_refresh(hs_runtime *rt, int64_t mono_ms);

/* hs_runtime_io.c: buses and samples */
int hs_rt_buses_start(hs_runtime *rt);
void hs_rt_buses_stop(hs_runtime *rt);
/* Moves queued samples into readings and the store; marks ponds dirty. */
size_t hs_rt_drain(hs_runtime *rt, int64_t now_ms);
/* Marks readings older than their bus's stale limit stale; bus-down flags. */
void hs_rt_age_readings(hs_runtime *rt, int64_t now_ms);
/* Writes one register or coil through the bus's worker. 0 / -1. */
/* 1 when the device (bus, unit id) that signal g is read from is down
 * (hp_bus.h: no answer, only probed now). */
int hs_rt_device_down(const hs_runtime *rt, const hs_signal *g);
int hs_rt_write(hs_runtime *rt, int bus, uint8_t unit_id, int coil, uint16_t address,
                uint16_t value);

/* hs_runtime_schedule.c: the chain schedule, daily, retained on MQTT */
void hs_rt_schedule_tick(hs_runtime *rt, int64_t mono_ms, int64_t now_ms);

/* hs_runtime_keep.c: one sample to the store, kept raw by exception and
 * counted in its minute's rollup; one computed pond state likewise. The
 * minutes are held in memory and written together by hs_rt_keep_write
 * (those closed by now_ms) or hs_rt_keep_flush (all, open ones too). */
void hs_rt_keep_sample(hs_runtime *rt, size_t signal, int64_t t_ms, double value, hs_quality q,
                       const char *reason, int code);
void hs_rt_keep_state(hs_runtime *rt, size_t pond, int64_t t_ms, const hc_brine_state *b,
                      const hs_pond_extra *extra, hs_quality q);
void hs_rt_keep_write(hs_runtime *rt, int64_t now_ms);
void hs_rt_keep_flush(hs_runtime *rt);
/* Writes the held raw samples and state rows into the store's batch (the
 * caller commits it). */
void hs_rt_keep_commit(hs_runtime *rt);
void hs_rt_keep_free(hs_runtime *rt);

/* hs_runtime_transfer.c */
int hs_rt_transfers_init(hs_runtime *rt);
void hs_rt_transfers_run(hs_runtime *rt, int64_t mono_ms, int64_t now_ms);
void hs_rt_transfers_safe(hs_runtime *rt);
/* Every tick: carries each actuated transfer's decision to its output
 * (confirmed commands, hs_output.h) and counts the PLC heartbeats. */
void hs_rt_outputs_tick(hs_runtime *rt, int64_t mono_ms);
/* Before a reload to fresh: every actuated output that fresh no longer
 * actuates at the same address is driven to STOP and confirmed (manual
 * outputs are left alone). */
void hs_rt_transfers_release(hs_runtime *rt, const hs_site *fresh);
/* After a reload: the output states of outputs that stayed (same bus, unit,
 * kind and address) are taken over from old (n_old transfers of old_site). */
void hs_rt_transfers_adopt(hs_runtime *rt, const hs_site *old_site,
                           const struct hs_rt_transfer *old, size_t n_old);

/* hs_runtime_emit.c: values to the host, state and advice to MQTT */
void hs_rt_emit_pond(hs_runtime *rt, size_t pond, int64_t now_ms);
void hs_rt_emit_transfer(hs_runtime *rt, size_t transfer, int64_t now_ms);
void hs_rt_emit_alarm(hs_runtime *rt, const hs_alarm_event *ev);
void hs_rt_emit_gateway(hs_runtime *rt, int online, int64_t now_ms);
int hs_rt_enqueue_state(hs_runtime *rt, size_t pond, int64_t now_ms);
struct hs_pond_doc;
void hs_rt_pond_doc(const hs_runtime *rt, size_t pond, struct hs_pond_doc *d);

/* hs_runtime_hydro.c */
int hs_rt_hydro_init(hs_runtime *rt);
void hs_rt_hydro_update(hs_runtime *rt, size_t pond, int64_t now_ms);
void hs_rt_hydro_free(hs_runtime *rt);
/* The pond's geometry for mixing predictions; NULL when unknown. */
const hc_pond_shape *hs_rt_pond_shape(const hs_runtime *rt, size_t pond);

/* hs_runtime_mqtt.c: the link and the outbox pump; MQTT is off (rt->link
 * NULL) when the site has no [mqtt] section. */
int hs_rt_mqtt_open(hs_runtime *rt);
void hs_rt_mqtt_pump(hs_runtime *rt, int wait_ms);
/* Sends what the outbox holds (up to wait_ms), publishes the gateway
 * offline, disconnects. */
void hs_rt_mqtt_close(hs_runtime *rt, int wait_ms);

/* hs_runtime_scada.c: the read-only Modbus server and the Sparkplug edge
 * node, each off without its section. */
int hs_rt_scada_open(hs_runtime *rt);
void hs_rt_scada_close(hs_runtime *rt);
void hs_rt_scada_pond(hs_runtime *rt, size_t pond, const json_t *doc);
void hs_rt_scada_transfer(hs_runtime *rt, size_t transfer);
void hs_rt_scada_beat(hs_runtime *rt, int64_t now_ms);

int64_t hs_rt_wall_ms(void);
int64_t hs_rt_mono_ms(void);

#endif
