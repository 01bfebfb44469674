/* The registered section types of the configuration. A new section type is
 * one file plugin/hs_conf_NAME.c defining `hs_section_NAME`, plus its name in
 * the extern line and one line in the list below. Cross-reference passes (link) run in this order, so a type
 * comes after the types it refers to. */
#include <stddef.h>

#include "hs_config.h"

extern const hs_section_type hs_section_site, hs_section_feed, hs_section_bus,
    hs_section_pond, hs_section_signal, hs_section_transfer, hs_section_mqtt, hs_section_alarm,
    hs_section_web, hs_section_modbus_server, hs_section_sparkplug;

const hs_section_type *const hs_section_types[] = {
    &hs_section_site,
    &hs_section_feed,
    &hs_section_bus,
    &hs_section_pond,
    &hs_section_signal,
    &hs_section_transfer,
    &hs_section_mqtt,
    &hs_section_alarm,
    &hs_section_web,
    &hs_section_modbus_server,
    &hs_section_sparkplug,
    NULL,
};
