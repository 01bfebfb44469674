#!/usr/bin/env bash
# A noisy crystalliser, end to end: the pond-chain simulator serves one
# crystalliser past halite onset over real Modbus TCP, its conductivity with
# 0.5 % noise (normal, standard deviation), read by halostaged every 100 ms.
# The simulator runs 30 days at 25920x (about 1000 samples, a day's
# evaporation and temperature swing every 3.3 s), then slows to 120x for a
# scripted shower that dilutes the brine by about 10 kg/m3 at the reference
# temperature. Expected: no density-fall in the 30 days of noise, and a
# density-fall for the rain. (tests/unit/test_fall_sim.c runs the same
# decision over 30 days at a 10 s poll, 259200 samples.)
. "$(dirname "$0")/lib.sh"
D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
PY=/usr/bin/python3
port=$(hs_free_port)
cfg="$HS_TMP/site.ini"
cat >"$cfg" <<EOF
[site]
name = pan-works
database = $HS_TMP/pan.db
latitude = 37.5
reference_temperature = 20 C
baume_modulus = 145
stale_after = 10s

[bus analysers]
type = tcp
host = 127.0.0.1
port = $port
unit_ids = 1
response_timeout = 500ms
poll_interval = 100ms

[pond pan]
role = crystalliser
density_in = 1210 kg/m3
density_out = 1250 kg/m3
level_min = 0.25 m
level_max = 0.35 m
area = 2 ha

[signal pan.conductivity]
bus = analysers
unit_id = 1
table = input
address = 0
type = float32
unit = mS/cm

[signal pan.temperature]
bus = analysers
unit_id = 1
table = input
address = 2
type = int16
scale = 0.1
unit = C
EOF
check "--check accepts the crystalliser site" "$D" --check --config "$cfg"

# 13 mm of rain on about 0.22 m of brine past halite onset: water +6 %,
# density at 20 C down about 10 kg/m3 (the simulator's Laliberte mixture).
"$S" --config "$cfg" --truth "$HS_TMP/truth.json" --speed 25920 --speed-after 719:120 \
    --conductivity-noise 0.5 --seed 20261202 --rain pan:13@720 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
check "simulator starts" bash -c "source '$(dirname "$0")/lib.sh'; hs_wait_port $port 10 && hs_wait_file_line '$HS_TMP/truth.json' ponds 10"
"$D" --config "$cfg" --emit-stdout >"$HS_TMP/emit.txt" 2>"$HS_TMP/daemon.log" &
HS_PIDS+=($!)

# Follows the simulator's truth (bounded waits on its clock) and the
# daemon's emitted values; prints what it saw and exits 1 on a failure.
$PY - "$HS_TMP/truth.json" "$HS_TMP/emit.txt" <<'PY'
import json, sys, time
truth_path, emit_path = sys.argv[1], sys.argv[2]

def truth():
    for _ in range(50):
        try:
            return json.load(open(truth_path))
        except (OSError, ValueError):
            time.sleep(0.02)
    raise SystemExit("not ok - the simulator's truth file cannot be read")

def emitted():
    fall = states = 0
    for line in open(emit_path):
        if line.startswith("alarm/pan/density-fall ") and "unacknowledged" in line:
            fall += 1
        elif line.startswith("pond/pan/density_ref_kg_m3 good "):
            states += 1
    return fall, states

t0 = truth()["time_s"]
hours = lambda t: (t["time_s"] - t0) / 3600.0
fail = 0
def check(ok, text):
    global fail
    print(("ok - " if ok else "not ok - ") + text)
    fail |= not ok

# 30 simulated days of noise (bounded: 15 real minutes).
before, deadline = None, time.monotonic() + 900
while time.monotonic() < deadline:
    t = truth()
    if hours(t) >= 719.0:
        before = t["ponds"]["pan"]
        break
    time.sleep(0.2)
check(before is not None, "the simulator reached day 30")
if before is None:
    sys.exit(1)
falls, states = emitted()
print("# 30 days: %d pond states from the daemon; density at 20 C %.1f kg/m3, CF %.1f, "
      "depth %.3f m" % (states, before["density_ref_kg_m3"], before["concentration_factor"],
                        before["depth_m"]))
check(states >= 300, "the daemon evaluated the pond through the 30 days (%d states)" % states)
check(falls == 0, "no density-fall from 0.5 %% conductivity noise in 30 simulated days (%d)" % falls)

# The shower: the brine's own fall, then the alarm (bounded: 5 real minutes).
lowest, deadline = before["density_ref_kg_m3"], time.monotonic() + 300
while time.monotonic() < deadline:
    t = truth()
    lowest = min(lowest, t["ponds"]["pan"]["density_ref_kg_m3"])
    if emitted()[0] >= 1 and hours(t) > 721.0:
        break
    time.sleep(0.1)
drop = before["density_ref_kg_m3"] - lowest
print("# rain: %.1f mm on the gauge, density at 20 C down %.1f kg/m3 at its lowest (simulator)"
      % (1000.0 * t["ponds"]["pan"]["rain_total_m"], drop))
check(9.0 <= drop <= 13.0, "the shower dilutes the brine by about 10 kg/m3 (%.1f)" % drop)
check(emitted()[0] >= 1, "the rain raises density-fall")
sys.exit(fail)
PY
[ $? -eq 0 ] || hs_failed=1
grep -E "density-fall|uncertain-source" "$HS_TMP/daemon.log" | head -5
hs_finish
