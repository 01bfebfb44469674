/* How to reach one field bus: a Modbus TCP device (or serial gateway), or an
 * RTU line. Filled by the plugin from the site configuration; the bus worker
 * (hp_bus.h) only reads it. Plain data. */
#ifndef HP_BUS_CONF_H
#define HP_BUS_CONF_H

#include <stdbool.h>
#include <stdint.h>

#define HP_HOST_MAX 64
#define HP_DEVICE_MAX 128
/* Modbus Application Protocol v1.1b §6.3/§6.4: Read Holding / Input
 * Registers carry at most 125 (0x7D) registers per request. */
#define HP_MAX_READ_REGISTERS 125

typedef enum { HP_BUS_TCP, HP_BUS_RTU, HP_BUS_KIND_COUNT } hp_bus_kind;
typedef enum { HP_PARITY_NONE, HP_PARITY_EVEN, HP_PARITY_ODD, HP_PARITY_COUNT } hp_parity;

typedef struct {
    hp_bus_kind kind;
    char host[HP_HOST_MAX];       /* tcp: address or name (loopback in tests) */
    int port;                     /* tcp */
    char device[HP_DEVICE_MAX];   /* rtu: serial device path */
    int baud;                     /* rtu: one of hp_baud_valid() */
    hp_parity parity;             /* rtu */
    int data_bits;                /* rtu: 7 or 8 */
    int stop_bits;                /* rtu: 1 or 2 */
    bool rs485;                   /* rtu: ask the driver for RS-485 mode */
    int64_t response_timeout_ms;  /* also the TCP connect timeout (libmodbus) */
    int64_t byte_timeout_ms;      /* gap allowed between bytes of one reply */
    unsigned retries;             /* extra attempts of one read before comm-fail */
    int64_t backoff_min_ms;       /* first reconnect delay after a failure */
    int64_t backoff_max_ms;       /* the delay doubles up to this */
    unsigned max_gap;             /* unused registers one read may span */
    unsigned max_registers;       /* per read, at most HP_MAX_READ_REGISTERS */
    int64_t stale_after_ms;       /* a point not read good for this long is stale */
    int64_t probe_interval_ms;    /* a device (unit id) that is down is asked this
                                   * often, not every cycle; 0 = 30 s */
} hp_bus_conf;

/* True for the baud rates we accept (libmodbus 3.1.6 silently falls back to
 * 9600 on any other; libmodbus 3.1.6). */
bool hp_baud_valid(int baud);

#endif
