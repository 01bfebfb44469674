#!/usr/bin/env bash
# Modbus RTU over a socat pseudo-terminal pair: the daemon reads one end, the
# simulator serves the other, with several devices on the line.
source "$(dirname "$0")/lib.sh"
SIM_BIN="$HS_BUILD/halostage-sim"
D="$HS_BUILD/halostaged"
PY=/usr/bin/python3

socat pty,raw,echo=0,link="$HS_TMP/ttyA" pty,raw,echo=0,link="$HS_TMP/ttyB" \
    >"$HS_TMP/socat.log" 2>&1 &
HS_PIDS+=("$!")
for _ in $(seq 1 200); do
    [ -e "$HS_TMP/ttyA" ] && [ -e "$HS_TMP/ttyB" ] && break
    sleep 0.05
done
check "socat made a pty pair" test -e "$HS_TMP/ttyA" -a -e "$HS_TMP/ttyB"

CFG="$HS_TMP/rtu.ini"
cat >"$CFG" <<INI
[site]
name = rtu-test
latitude = 40

[bus line]
type = rtu
device = $HS_TMP/ttyA
baud = 19200
parity = even
unit_ids = 1-3
response_timeout = 300ms
byte_timeout = 50ms
retries = 0
backoff_min = 100ms
poll_interval = 200ms

[pond p1]
role = intake
area = 1 ha
density_in = 1020 kg/m3
density_out = 1030 kg/m3

[pond p2]
role = bittern
area = 1 ha

[signal p1.conductivity]
bus = line
unit_id = 1
table = input
address = 0
type = float32
word_order = little
unit = mS/cm

[signal p1.temperature]
bus = line
unit_id = 1
table = input
address = 2
type = int16
scale = 0.01
unit = C

[signal p1.level-pressure]
bus = line
unit_id = 2
address = 4
type = uint32
byte_order = little
scale = 0.1
unit = Pa

[signal p2.temperature]
bus = line
unit_id = 3
table = input
address = 0
type = int16
scale = 0.1
unit = C
INI
check "the RTU test site is valid" "$D" --config "$CFG" --check

SIM=
start_sim() {
    "$SIM_BIN" --config "$CFG" --rtu line="$HS_TMP/ttyB" --truth "$HS_TMP/truth.json" "$@" \
        >"$HS_TMP/sim.log" 2>&1 &
    SIM=$!
    HS_PIDS+=("$SIM")
    hs_wait_file_line "$HS_TMP/sim.log" 'serving RTU' 10 && hs_wait_file_line "$HS_TMP/truth.json" ponds 10
}
stop_sim() { kill "$SIM" 2>/dev/null; wait "$SIM" 2>/dev/null; }

check "simulator serves the RTU line" start_sim
"$D" --config "$CFG" --once --json >"$HS_TMP/once.json" 2>"$HS_TMP/once.err"
rc=$?
cp "$HS_TMP/truth.json" "$HS_TMP/truth-once.json"
check "RTU --once: exit 0 (every signal good)" test "$rc" -eq 0
check "RTU values match the simulator (PSS-78 inverse, little-endian uint32 level)" \
    $PY - "$HS_TMP/once.json" "$HS_TMP/truth-once.json" <<'PYEOF'
import json, sys
p = {q["pond"]: q for q in map(json.loads, open(sys.argv[1]))}
t = json.load(open(sys.argv[2]))["ponds"]
a = p["p1"]
print(a["method"], a["density_kg_m3"], t["p1"]["density_kg_m3"], a["depth_m"], t["p1"]["depth_m"])
ok = (a["method"] == "pss78" and abs(a["density_kg_m3"] - t["p1"]["density_kg_m3"]) < 0.6
      and abs(a["depth_m"] - t["p1"]["depth_m"]) < 0.005
      and abs(p["p2"]["temperature_c"] - t["p2"]["temperature_c"]) < 0.2)
sys.exit(0 if ok else 1)
PYEOF
stop_sim

check "simulator with a silent unit 3 starts" start_sim --fault line:3=timeout
"$D" --config "$CFG" --once --json >"$HS_TMP/hung.json" 2>/dev/null
rc=$?
check "silent RTU device: exit 1" test "$rc" -eq 1
check "silent RTU device: its signal comm-fail, the others good" $PY - "$HS_TMP/hung.json" <<'PYEOF'
import json, sys
p = {q["pond"]: q["signals"] for q in map(json.loads, open(sys.argv[1]))}
got = (p["p2"]["temperature"]["quality"], {s["quality"] for s in p["p1"].values()})
print(got)
sys.exit(0 if got == ("comm-fail", {"good"}) else 1)
PYEOF
stop_sim
hs_finish
