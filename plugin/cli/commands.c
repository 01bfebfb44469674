#include <stddef.h>

#include "commands.h"

/* Keep in the order `halostage help` should list them. */
const struct hs_command hs_commands[] = {
    {"calc", hs_cmd_calc, "brine state of one sample from conductivity or density"},
    {"brine", hs_cmd_brine, "activities and mineral saturation of a brine analysis"},
    {"path", hs_cmd_path, "evaporation path of a feed water, from gypsum to bischofite"},
    {"status", hs_cmd_status, "every pond, alarm and transfer advice now (from the history)"},
    {"history", hs_cmd_history, "a pond's stored history, raw or per step (min/mean/max)"},
    {"export", hs_cmd_export, "stored pond states or the alarm journal as CSV"},
    {"ack", hs_cmd_ack, "acknowledge or shelve an alarm at the gateway"},
    {"calibrate", hs_cmd_calibrate, "record or list operators' hydrometer readings (site calibration)"},
    {"forecast", hs_cmd_forecast, "days until ponds reach their target density and next stage"},
    {"map", hs_cmd_map, "the read-only Modbus register map of the site, for the SCADA"},
    {"plan", hs_cmd_plan, "how much brine to move so a pond lands on a target density"},
    {"user", hs_cmd_user, "logins of the operators' page: add, remove, list"},
    {"chain", hs_cmd_chain, "a day-by-day schedule of transfers for the whole chain (advice)"},
    {"backup", hs_cmd_backup, "a consistent copy of the history while the daemon runs"},
    {NULL, NULL, NULL},
};
