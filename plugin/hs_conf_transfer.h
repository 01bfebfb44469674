/* [transfer NAME]: one transfer pump between two ponds, as the site
 * configuration describes it (plugin/hs_conf_transfer.c reads it). The
 * decision logic lives in hs_transfer.h; hs_conf_transfer_rule() turns this
 * section into that engine's rule. Values are SI; durations milliseconds. */
#ifndef HS_CONF_TRANSFER_H
#define HS_CONF_TRANSFER_H

#include <stdbool.h>
#include <stdint.h>

#include "hs_site.h"
#include "hs_transfer.h"

typedef enum { HS_OUTPUT_COIL, HS_OUTPUT_REGISTER } hs_output_kind;
typedef enum { HS_RAIN_GAUGE, HS_RAIN_FLAG } hs_rain_mode;

typedef struct hs_transfer_conf {
    char name[HS_NAME_MAX];
    int line;
    char source[HS_NAME_MAX];
    int source_index;
    char destination[HS_NAME_MAX];
    int dest_index;
    int trigger;                     /* hs_trigger_kind */
    int start_stage;                 /* index into the stage names = hc_stage */
    double start_density_kg_m3;      /* NaN: the source pond's density_out */
    double hysteresis_kg_m3;
    double source_level_min_m;       /* NaN: the source pond's level_min */
    double dest_level_max_m;         /* NaN: the destination's level_max */
    double level_deadband_m;
    double dest_density_min_kg_m3;   /* NaN: the destination's density_in */
    double dest_density_max_kg_m3;   /* NaN: no upper limit */
    double rated_flow_m3_h;          /* NaN: unknown (no mixing prediction) */
    int64_t batch_ms;                /* run length the mixing prediction assumes */
    int64_t min_on_ms, min_off_ms, max_run_ms, feedback_timeout_ms;
    int64_t confirm_timeout_ms;      /* an output command must be confirmed within this */
    int32_t lockout_after;           /* failed starts in a row before the lockout; 0 never */
    bool actuate;
    /* the pump output (written only with actuate = yes) */
    char bus[HS_NAME_MAX];
    int bus_index;                   /* -1: none */
    uint8_t unit_id;
    int output;                      /* hs_output_kind */
    uint16_t output_address;
    uint16_t on_value, off_value;    /* register output */
    int32_t heartbeat_address;       /* holding register the PLC watches; -1 none */
    /* optional signals, by their [signal POND.QUANTITY] names */
    char feedback[2 * HS_NAME_MAX];
    int feedback_index;              /* into site->signals, -1 none */
    char manual[2 * HS_NAME_MAX];
    int manual_index;
    char rain[2 * HS_NAME_MAX];
    int rain_index;
    int rain_mode;                   /* hs_rain_mode */
    int64_t rain_window_ms;          /* gauge: rain counted over this window */
    double rain_threshold_m;         /* gauge: this much within the window blocks */
} hs_transfer_conf;

/* 1 when transfer a of site sa and transfer b of site sb both actuate the
 * same output: same bus (name and endpoint), unit, kind and address. */
int hs_conf_transfer_same_output(const hs_site *sa, const hs_transfer_conf *a, const hs_site *sb,
                                 const hs_transfer_conf *b);

/* The engine rule for transfer t of site (defaults from its ponds filled). */
void hs_conf_transfer_rule(const hs_site *site, const hs_transfer_conf *t,
                           struct hs_transfer_rule *rule);

#endif
