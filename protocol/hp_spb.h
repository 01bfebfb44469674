/* Sparkplug B payloads (Eclipse Sparkplug 3.0.0, chapter 6) on protobuf-c,
 * from our schema protocol/sparkplug_b.proto: encoding of the messages an
 * edge node sends, reading of the commands it may receive, and the primary
 * host's STATE document (JSON, §7.4 in 3.0). Nothing of ponds: the caller
 * names the metrics.
 *
 * Memory: hp_spb_encode returns a malloc'ed buffer the caller frees.
 * Error convention: 0 on success, -1 on failure (reason in why where given). */
#ifndef HP_SPB_H
#define HP_SPB_H

#include <stddef.h>
#include <stdint.h>

/* DataType values (specification §6.4.16). */
typedef enum {
    HP_SPB_UINT16 = 6,
    HP_SPB_UINT32 = 7,
    HP_SPB_UINT64 = 8,
    HP_SPB_FLOAT = 9,
    HP_SPB_DOUBLE = 10,
    HP_SPB_BOOLEAN = 11,
    HP_SPB_STRING = 12
} hp_spb_type;

typedef struct {
    const char *name;      /* NULL: by alias only (DATA messages after a birth) */
    uint64_t alias;        /* 0: none */
    hp_spb_type type;
    int with_type;         /* births carry the datatype; data may leave it out */
    int is_null;           /* no value: unknown */
    double number;         /* FLOAT, DOUBLE, UINT16, UINT32, BOOLEAN (0/1) */
    uint64_t u64;          /* UINT64 */
    const char *text;      /* STRING */
    const char *unit;      /* engineering unit, sent as the property "unit"; NULL none */
    uint64_t timestamp_ms; /* 0: none */
} hp_spb_metric;

/* Encodes a payload: timestamp, seq (-1: none, as in NDEATH) and metrics.
 * *out is malloc'ed. */
int hp_spb_encode(uint64_t timestamp_ms, int seq, const hp_spb_metric *metrics, size_t n,
                  uint8_t **out, size_t *len);

/* Reads an inbound NCMD/DCMD. Returns 1 when its only request is the
 * Boolean metric control_name set true (e.g. "Node Control/Rebirth"), 0
 * when it is a readable payload asking anything else (refused; why says
 * what), -1 when it cannot be decoded. */
int hp_spb_command_is(const void *payload, size_t len, const char *control_name, char *why,
                      size_t whylen);

/* Reads a STATE message: {"online": bool, "timestamp": ms}. 0 / -1. */
int hp_spb_state_parse(const void *payload, size_t len, int *online, uint64_t *timestamp_ms);

#endif
