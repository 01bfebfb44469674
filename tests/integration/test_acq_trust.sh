#!/usr/bin/env bash
# Field trust, end to end with the daemon: a stuck analyser (flatline), an
# impossible reading (a register scaled 100x: thousands of degC), a device
# that answers with an exception, a silent device on a shared gateway, a
# dead bus, a line too slow for its poll interval and a gateway that answers
# from the wrong unit id. Each must be said where an operator looks: the
# journal (daemon log), the stored reasons (history --signal, export), the
# alarms and status. Every wait is on a condition, bounded.
source "$(dirname "$0")/lib.sh"
SIM_BIN="$HS_BUILD/halostage-sim"
EVIL="$HS_BUILD/tools/hs_evil_slave"
D="$HS_BUILD/halostaged"
H="$HS_BUILD/halostage"
PY=/usr/bin/python3

PG=$(hs_free_port); PS=$(hs_free_port); PD=$(hs_free_port); PE=$(hs_free_port)

# site FILE DAEMON: the daemon's file (DAEMON=1) also has the dead bus and
# the lying gateway, which the simulator does not serve, and reads p4's
# temperature with a scale 100 times too large.
site() {
    local scale4=0.1
    [ "$2" = 1 ] && scale4=10
    {
        cat <<INI
[site]
name = trust-test
latitude = 40
database = trust.db
stale_after = 60s

[bus gw]
type = tcp
host = 127.0.0.1
port = $PG
unit_ids = 1-4
response_timeout = 300ms
retries = 0
backoff_min = 100ms
poll_interval = 250ms
probe_interval = 2s

[bus slow]
type = tcp
host = 127.0.0.1
port = $PS
response_timeout = 1s
retries = 0
poll_interval = 100ms
INI
        for i in 1 2 3 4 5; do
            printf '\n[pond p%d]\nrole = concentrator\narea = 1 ha\n' "$i"
        done
        for i in 1 2; do
            cat <<INI

[signal p$i.conductivity]
bus = gw
unit_id = $i
table = input
address = 0
type = float32
unit = mS/cm
flatline_after = 2s

[signal p$i.temperature]
bus = gw
unit_id = $i
table = input
address = 2
type = int16
scale = 0.1
unit = C
flatline_after = 2s
INI
        done
        cat <<INI

[signal p3.temperature]
bus = gw
unit_id = 3
address = 0
type = int16
scale = 0.1
unit = C

[signal p4.temperature]
bus = gw
unit_id = 4
address = 0
type = int16
scale = $scale4
unit = C

[signal p5.temperature]
bus = slow
address = 0
type = int16
scale = 0.1
unit = C
INI
        if [ "$2" = 1 ]; then
            cat <<INI

[bus dead]
type = tcp
host = 127.0.0.1
port = $PD
response_timeout = 200ms
backoff_min = 100ms
backoff_max = 500ms

[bus liar]
type = tcp
host = 127.0.0.1
port = $PE
response_timeout = 300ms
retries = 0
poll_interval = 250ms

[pond p6]
role = concentrator
area = 1 ha

[pond p7]
role = concentrator
area = 1 ha

[signal p6.temperature]
bus = dead
address = 0
type = int16
scale = 0.1
unit = C

[signal p7.temperature]
bus = liar
address = 0
type = int16
scale = 0.1
unit = C
INI
        fi
    } >"$1"
}
CFG="$HS_TMP/site.ini"
site "$HS_TMP/sim.ini" 0
site "$CFG" 1
check "the daemon's site file is valid" "$D" --config "$CFG" --check

"$SIM_BIN" --config "$HS_TMP/sim.ini" --fault gw:1=stuck --fault gw:2=exception \
    --fault gw:3=timeout --fault slow:1=latency:300 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=("$!")
"$EVIL" --port "$PE" --only wrong-unit --seconds 120 >"$HS_TMP/evil.out" 2>&1 &
HS_PIDS+=("$!")
check "simulator and the lying gateway listen" \
    eval 'hs_wait_port "$PG" 10 && hs_wait_port "$PS" 10 && hs_wait_port "$PE" 10'

"$D" --config "$CFG" --log-level info >/dev/null 2>"$HS_TMP/daemon.log" &
DPID=$!
HS_PIDS+=("$DPID")
LOG="$HS_TMP/daemon.log"

check "journal: the dead bus is down from its first cycle (stale_after is 60 s)" \
    hs_wait_file_line "$LOG" '\[bus dead\] is down' 15
check "journal: the silent device on the gateway is named" \
    hs_wait_file_line "$LOG" '\[bus gw\] device \(unit id\) 3 is down' 20
check "journal: the stuck analyser (conductivity and temperature) is said" \
    eval 'hs_wait_file_line "$LOG" "\[signal p1.conductivity\] has read exactly .* stuck" 20 &&
          hs_wait_file_line "$LOG" "\[signal p1.temperature\] has read exactly .* stuck" 20'
check "journal: the line too slow for its poll interval is said, with the period" \
    hs_wait_file_line "$LOG" '\[bus slow\] cannot keep its poll interval of 100 ms: .*every [0-9]+ ms' 20
check "journal: devices that answer (exception) are not called down" \
    eval '! grep -qE "device \(unit id\) (1|2|4) is down" "$LOG"'

# history SIGNAL REGEX: waits until the raw history of SIGNAL shows REGEX.
history_shows() {
    local i
    for ((i = 0; i < 60; i++)); do
        "$H" history --config "$CFG" --signal "$1" --since 1h \
            >"$HS_TMP/h.txt" 2>&1 && grep -qE "$2" "$HS_TMP/h.txt" && return 0
        sleep 0.25
    done
    cat "$HS_TMP/h.txt"
    return 1
}
check "history: a stuck sample is stored bad with reason flatline" \
    history_shows p1.conductivity ' bad +flatline$'
check "history: the exception code is kept (exception 4, server device failure)" \
    history_shows p2.temperature ' bad +exception 4$'
check "history: a timeout keeps its errno (110)" \
    history_shows p3.temperature ' bad +timeout \(errno 110\)$'
check "history: a reading of thousands of degC is out-of-range, with its value" \
    history_shows p4.temperature '[0-9]{3,}.* bad +out-of-range$'
check "history: a refused connection is a link failure (errno 111)" \
    history_shows p6.temperature ' bad +link \(errno 111\)$'
check "history: a reply from the wrong unit id is refused (bad-reply, EMBBADSLAVE)" \
    history_shows p7.temperature ' bad +bad-reply \(errno 112345695\)$'
check "history --json carries the reason and its code" \
    eval '"$H" history --config "$CFG" --signal p2.temperature --since 1h --json |
          grep -q "\"reason\": *\"exception\", *\"exception\": *4"'

"$H" export --csv --config "$CFG" --what samples --pond p2 --since 1h >"$HS_TMP/samples.csv" 2>/dev/null
check "export --what samples: reason and exception code columns" \
    eval 'head -1 "$HS_TMP/samples.csv" | grep -q "quality,reason,exception code,errno" &&
          grep -qE "^[^,]+,p2.temperature,,bad,exception,4,$" "$HS_TMP/samples.csv"'

# status and alarms, once the store has them
status_shows() {
    local i
    for ((i = 0; i < 60; i++)); do
        "$H" status --config "$CFG" >"$HS_TMP/status.txt" 2>&1
        grep -qE "$1" "$HS_TMP/status.txt" && return 0
        sleep 0.25
    done
    cat "$HS_TMP/status.txt"
    return 1
}
check "status names the device that is down" status_shows '^device down: bus gw unit id 3 '
check "status: the stuck analyser raised the pond's sensor-stuck alarm" status_shows 'p1/sensor-stuck'
# the dead bus is a bus matter (a refused connection), not a device down
check "status --json lists exactly the devices down (gw unit 3)" \
    eval '"$H" status --config "$CFG" --json | $PY -c "
import json, sys
d = json.load(sys.stdin)[\"devices_down\"]
got = sorted((x[\"bus\"], x[\"unit_id\"]) for x in d)
print(got)
sys.exit(0 if got == [(\"gw\", 3)] else 1)"'

kill "$DPID"
wait "$DPID"
check "the slow line is said once, not every cycle" \
    test "$(grep -c 'cannot keep its poll interval' "$LOG")" -eq 1
hs_finish
