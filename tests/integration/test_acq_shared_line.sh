#!/usr/bin/env bash
# Per-device health on shared lines: two unit ids on one RTU line (socat pty
# pair) and two behind one TCP serial gateway. Unit 1 falls silent on both
# for 20 s: unit 2 must keep its samples good, unit 1 must be declared down
# (and only probed), and once unit 1 answers again it must be read within
# its probe interval. Every wait is on a condition, bounded.
source "$(dirname "$0")/lib.sh"
SIM_BIN="$HS_BUILD/halostage-sim"
PROBE="$HS_BUILD/tools/hs_acq_probe"
D="$HS_BUILD/halostaged"
PY=/usr/bin/python3
PROBE_INTERVAL_MS=3000
POLL_MS=200

socat pty,raw,echo=0,link="$HS_TMP/ttyA" pty,raw,echo=0,link="$HS_TMP/ttyB" \
    >"$HS_TMP/socat.log" 2>&1 &
HS_PIDS+=("$!")
for _ in $(seq 1 200); do
    [ -e "$HS_TMP/ttyA" ] && [ -e "$HS_TMP/ttyB" ] && break
    sleep 0.05
done
check "socat made a pty pair" test -e "$HS_TMP/ttyA" -a -e "$HS_TMP/ttyB"

PORT=$(hs_free_port)
CFG="$HS_TMP/shared.ini"
{
    cat <<INI
[site]
name = shared-line-test
latitude = 40

[bus line]
type = rtu
device = $HS_TMP/ttyA
baud = 19200
unit_ids = 1-2
response_timeout = 300ms
byte_timeout = 50ms
retries = 0
backoff_min = 100ms
poll_interval = ${POLL_MS}ms
probe_interval = ${PROBE_INTERVAL_MS}ms

[bus gw]
type = tcp
host = 127.0.0.1
port = $PORT
unit_ids = 1-2
response_timeout = 300ms
retries = 0
backoff_min = 100ms
poll_interval = ${POLL_MS}ms
probe_interval = ${PROBE_INTERVAL_MS}ms
INI
    i=0
    for bus in line gw; do
        for unit in 1 2; do
            i=$((i + 1))
            cat <<INI

[pond p$i]
role = concentrator
area = 1 ha

[signal p$i.conductivity]
bus = $bus
unit_id = $unit
table = input
address = 0
type = float32
unit = mS/cm

[signal p$i.temperature]
bus = $bus
unit_id = $unit
table = input
address = 2
type = int16
scale = 0.1
unit = C
INI
        done
    done
} >"$CFG"
check "the shared-line test site is valid" "$D" --config "$CFG" --check

FAULTS="$HS_TMP/faults"
: >"$FAULTS"
"$SIM_BIN" --config "$CFG" --rtu line="$HS_TMP/ttyB" --faults "$FAULTS" >"$HS_TMP/sim.log" 2>&1 &
SIM=$!
HS_PIDS+=("$SIM")
check "simulator serves the line and the gateway" \
    eval 'hs_wait_file_line "$HS_TMP/sim.log" "serving RTU" 10 && hs_wait_port "$PORT" 10'

# set_faults TEXT: the simulator reads its faults again; waits until it has.
reloads=0
set_faults() {
    printf '%s' "$1" >"$FAULTS"
    reloads=$((reloads + 1))
    kill -HUP "$SIM"
    local i
    for ((i = 0; i < 200; i++)); do
        [ "$(grep -c 'faults read again' "$HS_TMP/sim.log")" -ge "$reloads" ] && return 0
        sleep 0.05
    done
    return 1
}
now_ms() { date +%s%3N; }

OUT="$HS_TMP/stream.json"
STOP="$HS_TMP/stop-probe"
"$PROBE" --config "$CFG" --seconds 300 --stream --until-file "$STOP" >"$OUT" 2>"$HS_TMP/probe.err" &
PROBE_PID=$!
HS_PIDS+=("$PROBE_PID")

# wait_for SECONDS PYTHON_CONDITION: polls the stream until the condition on
# the list `rows` (parsed lines) holds.
wait_for() {
    local limit=$1 cond=$2 i
    for ((i = 0; i < limit * 4; i++)); do
        if $PY - "$OUT" "$cond" <<'PYEOF'
import json, sys
rows = []
for line in open(sys.argv[1]):
    try:
        rows.append(json.loads(line))
    except ValueError:
        pass  # a line still being written
sys.exit(0 if eval(sys.argv[2]) else 1)
PYEOF
        then return 0; fi
        sleep 0.25
    done
    return 1
}

check "both units answer on both buses before the fault" wait_for 20 \
    'all(any(r.get("bus") == b and r.get("unit") == u and r.get("q") == "good" for r in rows) for b in ("line", "gw") for u in (1, 2))'

check "unit 1 falls silent on the line and behind the gateway" set_faults $'line:1=timeout\ngw:1=timeout\n'
T_SILENT=$(now_ms)
check "unit 1 is declared down on both buses (and unit 2 is not)" wait_for 20 \
    "all(any(r.get('bus') == b and 'down' in r and r['t'] >= $T_SILENT and r['down'] == [1] for r in rows) for b in ('line', 'gw'))"
check "the silence lasts 20 s (by the probe's own clock)" wait_for 60 \
    "any('q' in r and r['t'] >= $T_SILENT + 20000 for r in rows)"

check "unit 1 answers again" set_faults ''
T_BACK=$(now_ms)
check "unit 1 is read good again on both buses" wait_for 30 \
    "all(any(r.get('bus') == b and r.get('unit') == 1 and r.get('q') == 'good' and r['t'] >= $T_BACK for r in rows) for b in ('line', 'gw'))"
touch "$STOP"
wait "$PROBE_PID"

check "during the silence unit 2 kept >= 95 % good samples, unit 1 was only probed" \
    $PY - "$OUT" "$T_SILENT" "$T_BACK" "$PROBE_INTERVAL_MS" "$POLL_MS" <<'PYEOF'
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1]) if l.startswith('{"t"')]
t0, t1, probe, poll = map(int, sys.argv[2:6])
ok = True
for bus in ("line", "gw"):
    u2 = [r for r in rows if r.get("bus") == bus and r.get("unit") == 2 and t0 <= r["t"] <= t1]
    good = sum(r["q"] == "good" for r in u2)
    ratio = good / max(1, len(u2))
    # After it is down unit 1 gets one probe per probe interval: one failed
    # read (2 points) each, plus the 3 timed-out reads that made it down.
    u1_fail = [r for r in rows if r.get("bus") == bus and r.get("unit") == 1 and t0 <= r["t"] <= t1
               and r["q"] != "good"]
    reads_allowed = 3 + (t1 - t0) / probe + 2
    back = [r["t"] for r in rows if r.get("bus") == bus and r.get("unit") == 1
            and r.get("q") == "good" and r["t"] >= t1]
    delay = min(back) - t1 if back else None
    print(f"{bus}: unit 2 {good}/{len(u2)} good ({ratio:.3f}); unit 1 failed samples "
          f"{len(u1_fail)} (at most {2 * reads_allowed:.0f}); unit 1 read again {delay} ms "
          f"after it answered (probe interval {probe} ms)")
    ok &= len(u2) >= 20 and ratio >= 0.95
    ok &= 0 < len(u1_fail) <= 2 * reads_allowed
    # within its probe interval, plus one poll slot and the reply itself
    ok &= delay is not None and delay <= probe + poll + 1000
sys.exit(0 if ok else 1)
PYEOF

# --once with unit 1 silent: unit 2 good, unit 1 comm-fail naming its device.
check "unit 1 silent again for --once" set_faults $'line:1=timeout\ngw:1=timeout\n'
"$D" --config "$CFG" --once --json >"$HS_TMP/once.json" 2>"$HS_TMP/once.err"
rc=$?
check "--once with a silent unit: exit 1" test "$rc" -eq 1
check "--once: unit 2 good on both buses, unit 1 comm-fail (not 'connection reset')" \
    $PY - "$HS_TMP/once.json" <<'PYEOF'
import json, sys
rows = list(map(json.loads, open(sys.argv[1])))
sig = {p["pond"]: p["signals"] for p in rows}
q = {pond: {s["quality"] for s in sigs.values()} for pond, sigs in sig.items()}
texts = [s.get("error", "") for p in ("p1", "p3") for s in sig[p].values()]
print(q, texts)
ok = q == {"p1": {"comm-fail"}, "p2": {"good"}, "p3": {"comm-fail"}, "p4": {"good"}}
ok &= not any("reset" in t for t in texts)
sys.exit(0 if ok else 1)
PYEOF
check "--once names the silent device of each bus on stderr (and only it)" \
    eval 'grep -q "\[bus line\] device (unit id) 1 did not answer" "$HS_TMP/once.err" &&
          grep -q "\[bus gw\] device (unit id) 1 did not answer" "$HS_TMP/once.err" &&
          ! grep -q "unit id) 2" "$HS_TMP/once.err"'
hs_finish
