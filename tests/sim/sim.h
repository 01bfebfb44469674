/* halostage-sim: the pond-chain simulator. It serves the devices a site
 * configuration names (Modbus TCP on their configured loopback addresses,
 * RTU on a pty given on the command line) with plausible, evolving pond
 * values, and injects faults on request. A test tool: invented physics kept
 * simple, marked where it is an approximation. */
#ifndef HS_SIM_H
#define HS_SIM_H

#include <modbus.h>
#include <pthread.h>
#include <signal.h>
#include <stdbool.h>
#include <stdint.h>

#include "hs_feed_model.h"
#include "hs_site.h"

typedef enum {
    SIM_FAULT_NONE,
    SIM_FAULT_TIMEOUT,    /* requests are read and never answered */
    SIM_FAULT_EXCEPTION,  /* every request gets exception 04 (server device failure) */
    SIM_FAULT_DROP,       /* the connection is closed on each request */
    SIM_FAULT_NAN,        /* float values become NaN, integers their first sentinel */
    SIM_FAULT_SENTINEL,   /* values become their first sentinel (or 0xFFFF) */
    SIM_FAULT_LATENCY,    /* replies are delayed by latency_ms */
    SIM_FAULT_STUCK,      /* the device's values stop changing (a frozen analyser) */
} sim_fault_kind;

typedef struct {
    int bus;              /* index into site buses, -1 = every bus */
    int unit;             /* 0 = every unit of the bus */
    sim_fault_kind kind;
    int latency_ms;
} sim_fault;

/* One device (bus, unit id): its register image. */
typedef struct {
    int bus;
    uint8_t unit;
    modbus_mapping_t *map;  /* owned; guarded by sim.lock */
} sim_device;

typedef struct {
    double depth_m;        /* brine depth above the floor */
    double cf;             /* concentration factor against the feed */
    double dilution;       /* >= 1: rain water on a brine past halite onset,
                            * as water mass over the path brine's (its
                            * deposited salt does not redissolve at once) */
    double temperature_c;
    double rain_total_m;   /* what the rain gauge has counted */
    bool pumping;
} sim_pond;

#define SIM_FAULTS_MAX 16
#define SIM_RAINS_MAX 16

/* A scripted shower: mm of rain on one pond (or every pond) within one
 * simulated hour, starting at_h simulated hours after the start. */
typedef struct {
    int pond;              /* index in site.ponds, -1 for every pond */
    double mm;
    double at_h;
} sim_rain;

typedef struct {
    hs_site site;
    double speed;
    double sim_time_s;     /* simulated seconds since the epoch */
    pthread_mutex_t lock;  /* guards ponds and device maps */
    sim_pond *ponds;       /* site.n_ponds */
    hs_paths paths;        /* evaporation paths of the feeds (calc) */
    double max_cf;         /* CF stops rising here (end of the paths) */
    sim_device *devices;
    size_t n_devices;
    sim_fault faults[SIM_FAULTS_MAX];
    size_t n_faults;
    const char *rtu_path[16]; /* per bus index < 16: pty for an rtu bus */
    unsigned seed;
    double noise_scale;    /* 1: the built-in noise of every signal, 0: none */
    double cond_noise_pct; /* > 0: conductivity noise, normal, this standard
                            * deviation [%] instead of the built-in */
    double start_time_s;   /* sim_time_s at the start */
    sim_rain rains[SIM_RAINS_MAX];
    size_t n_rains;        /* > 0: only these showers, no built-in rain */
    volatile sig_atomic_t *stop;
} sim;

/* sim_model.c */
int sim_model_init(sim *s);          /* 0, or -1 with a message on stderr */
void sim_model_step(sim *s, double dt_s);  /* advances and rewrites registers; takes the lock */
void sim_model_free(sim *s);
int sim_truth_write(sim *s, const char *path); /* 0 or -1 */
sim_device *sim_device_find(sim *s, int bus, uint8_t unit);
const sim_fault *sim_fault_for(const sim *s, int bus, int unit);

/* sim_server.c: one thread per bus. */
int sim_servers_start(sim *s);       /* 0, or -1 with a message on stderr */
void sim_servers_join(sim *s);

#endif
