/* The [mqtt] password as both `halostaged --check` and the daemon's start
 * see it: the same secret-file checks (hs_secret.h), and whether it would
 * cross the network in clear. */
#ifndef HS_MQTT_SECRET_H
#define HS_MQTT_SECRET_H

#include <stddef.h>

#include "hs_conf_mqtt.h"

/* Reads m's password_file into buf ("" when it names none). 0, or -1 with
 * "FILE:LINE: [mqtt] password_file PATH: reason" in err. */
int hs_mqtt_password(const hs_mqtt_conf *m, const char *site_path, char *buf, size_t len,
                     char *err, size_t errlen);

/* 1 when a password would go to the broker unencrypted: mqtt:// (not
 * mqtts://) to a host that is not this machine (127.0.0.0/8, ::1,
 * localhost). Then warning holds a one-line warning naming the key. */
int hs_mqtt_password_in_clear(const hs_mqtt_conf *m, const char *site_path, char *warning,
                              size_t len);

#endif
