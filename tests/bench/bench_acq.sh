#!/usr/bin/env bash
# Acquisition figures (make bench):
#  1. Modbus transactions per cycle on the demo site, against the minimum for
#     its register map (the plan with the largest possible gap);
#  2. cycle time of 50 simulated TCP devices, each with 20 ms injected
#     latency, against one such device alone;
#  3. RTU over a pty pair: bus time per cycle against the baud-limited ideal.
set -u
cd "$(dirname "$0")/../.."
HS_BUILD=${HS_BUILD:-build}
source tests/integration/lib.sh
PROBE="$HS_BUILD/tools/hs_acq_probe"
SIM_BIN="$HS_BUILD/halostage-sim"
PY=/usr/bin/python3
[ -x "$PROBE" ] || make --no-print-directory tests >/dev/null

start_sim() { "$SIM_BIN" "$@" >"$HS_TMP/sim.log" 2>&1 & SIM=$!; HS_PIDS+=("$SIM"); }
stop_sim() { kill "$SIM" 2>/dev/null; wait "$SIM" 2>/dev/null; }

# 1. demo map
P1=$(hs_free_port); P2=$(hs_free_port)
sed -e "s/^port = 15020/port = $P1/" -e "s/^port = 15021/port = $P2/" \
    -e 's/^poll_interval = .*/poll_interval = 100ms/' config/demo.ini >"$HS_TMP/demo.ini"
start_sim --config "$HS_TMP/demo.ini"
hs_wait_port "$P1" && hs_wait_port "$P2"
"$PROBE" --config "$HS_TMP/demo.ini" --seconds 3 >"$HS_TMP/demo.json"
stop_sim
$PY - "$HS_TMP/demo.json" <<'PYEOF'
import json, sys
for o in map(json.loads, open(sys.argv[1])):
    if "bus" not in o or not o["cycles"]:
        continue
    per = o["transactions"] / o["cycles"]
    print(f"demo bus {o['bus']:10s}: {per:.2f} transactions/cycle, plan {o['plan_reads']}, "
          f"minimum {o['min_reads']}, ratio {per / o['min_reads']:.2f}; "
          f"mean cycle {o['mean_cycle_ms']:.1f} ms over {o['cycles']} cycles "
          f"(a ratio a little above 1 is the cycle still running when the probe stops)")
PYEOF

# 2. 50 TCP devices with 20 ms latency each
gen_site() {  # $1 = number of devices, $2 = file
    {
        printf '[site]\nname = bench\nlatitude = 40\n'
        for i in $(seq 1 "$1"); do
            printf '[bus d%d]\ntype = tcp\nhost = 127.0.0.1\nport = %d\nresponse_timeout = 1s\npoll_interval = 250ms\n' \
                "$i" "$(hs_free_port)"
            printf '[pond p%d]\nrole = concentrator\narea = 1 ha\n' "$i"
            printf '[signal p%d.temperature]\nbus = d%d\naddress = 0\ntype = int16\nscale = 0.1\nunit = C\n' "$i" "$i"
            printf '[signal p%d.conductivity]\nbus = d%d\naddress = 2\ntype = float32\nunit = mS/cm\n' "$i" "$i"
            printf '[signal p%d.level-pressure]\nbus = d%d\naddress = 10\ntype = uint16\nunit = Pa\n' "$i" "$i"
        done
    } >"$2"
}
wait_ports() { local p; for p in $(sed -n 's/^port = //p' "$1"); do hs_wait_port "$p" 10 || return 1; done; }
for n in 1 50; do
    gen_site "$n" "$HS_TMP/n$n.ini"
    start_sim --config "$HS_TMP/n$n.ini" --fault '*=latency:20'
    wait_ports "$HS_TMP/n$n.ini"
    "$PROBE" --config "$HS_TMP/n$n.ini" --seconds 3 >"$HS_TMP/n$n.json"
    stop_sim
done
$PY - "$HS_TMP/n1.json" "$HS_TMP/n50.json" <<'PYEOF'
import json, sys
one = [o for o in map(json.loads, open(sys.argv[1])) if "bus" in o]
many = [o for o in map(json.loads, open(sys.argv[2])) if "bus" in o]
single = max(o["mean_cycle_ms"] for o in one)
means = [o["mean_cycle_ms"] for o in many]
worst = max(o["max_cycle_ms"] for o in many)
print(f"1 device, 20 ms latency: mean cycle {single:.1f} ms")
print(f"50 devices, 20 ms latency each: mean cycle {sum(means)/len(means):.1f} ms, "
      f"slowest bus mean {max(means):.1f} ms, worst single cycle {worst} ms; "
      f"ratio slowest/single {max(means)/single:.2f}; cycles per bus "
      f"{min(o['cycles'] for o in many)}..{max(o['cycles'] for o in many)}")
PYEOF

# 3. RTU over a pty pair at 19200 baud
socat pty,raw,echo=0,link="$HS_TMP/ttyA" pty,raw,echo=0,link="$HS_TMP/ttyB" >/dev/null 2>&1 &
HS_PIDS+=("$!")
for _ in $(seq 1 200); do [ -e "$HS_TMP/ttyB" ] && break; sleep 0.05; done
{
    printf '[site]\nname = bench\nlatitude = 40\n'
    printf '[bus line]\ntype = rtu\ndevice = %s\nbaud = 19200\nunit_ids = 1-4\nresponse_timeout = 500ms\npoll_interval = 250ms\n' "$HS_TMP/ttyA"
    for i in 1 2 3 4; do
        printf '[pond p%d]\nrole = concentrator\narea = 1 ha\n' "$i"
        printf '[signal p%d.conductivity]\nbus = line\nunit_id = %d\ntable = input\naddress = 0\ntype = float32\nunit = mS/cm\n' "$i" "$i"
        printf '[signal p%d.temperature]\nbus = line\nunit_id = %d\ntable = input\naddress = 2\ntype = int16\nscale = 0.1\nunit = C\n' "$i" "$i"
    done
} >"$HS_TMP/rtu.ini"
start_sim --config "$HS_TMP/rtu.ini" --rtu line="$HS_TMP/ttyB"
hs_wait_file_line "$HS_TMP/sim.log" 'serving RTU' 10
"$PROBE" --config "$HS_TMP/rtu.ini" --seconds 3 >"$HS_TMP/rtu.json"
stop_sim
$PY - "$HS_TMP/rtu.json" <<'PYEOF'
import json, sys
o = [x for x in map(json.loads, open(sys.argv[1])) if "bus" in x][0]
# Per read of 3 registers: request 8 bytes, reply 5 + 2*3 = 11 bytes (Modbus
# over Serial Line v1.02 §2.5.1: 11 bits per character with parity), plus a
# 3.5-character silence after each frame (§2.5.1.1; 1.75 ms fixed above
# 19200 baud).
baud, reads = 19200, 4
char_s = 11 / baud
ideal_ms = reads * ((8 + 11) * char_s + 2 * 3.5 * char_s) * 1000
print(f"RTU 19200 baud, {reads} devices: mean cycle {o['mean_cycle_ms']:.1f} ms over "
      f"{o['cycles']} cycles ({o['transactions'] / max(1, o['cycles']):.1f} reads/cycle); "
      f"baud-limited ideal {ideal_ms:.1f} ms; ratio {o['mean_cycle_ms'] / ideal_ms:.2f} "
      f"(a pty is not baud-limited; the simulator's 15 ms end-of-frame silence dominates)")
PYEOF

# 4. A silent neighbour on a shared line: unit 2's poll period with unit 1
# silent (down, probed every probe_interval) against both healthy, on the RTU
# line above and on a TCP serial gateway. Goal: at most 1.1x.
PORT=$(hs_free_port)
{
    printf '[site]\nname = bench\nlatitude = 40\n'
    printf '[bus line]\ntype = rtu\ndevice = %s\nbaud = 19200\nunit_ids = 1-2\nresponse_timeout = 500ms\nretries = 1\npoll_interval = 250ms\nprobe_interval = 5s\n' "$HS_TMP/ttyA"
    printf '[bus gw]\ntype = tcp\nhost = 127.0.0.1\nport = %d\nunit_ids = 1-2\nresponse_timeout = 500ms\nretries = 1\npoll_interval = 250ms\nprobe_interval = 5s\n' "$PORT"
    i=0
    for bus in line gw; do
        for u in 1 2; do
            i=$((i + 1))
            printf '[pond p%d]\nrole = concentrator\narea = 1 ha\n' "$i"
            printf '[signal p%d.conductivity]\nbus = %s\nunit_id = %d\ntable = input\naddress = 0\ntype = float32\nunit = mS/cm\n' "$i" "$bus" "$u"
            printf '[signal p%d.temperature]\nbus = %s\nunit_id = %d\ntable = input\naddress = 2\ntype = int16\nscale = 0.1\nunit = C\n' "$i" "$bus" "$u"
        done
    done
} >"$HS_TMP/shared.ini"
for mode in healthy silent; do
    if [ "$mode" = silent ]; then
        start_sim --config "$HS_TMP/shared.ini" --rtu line="$HS_TMP/ttyB" --fault line:1=timeout --fault gw:1=timeout
    else
        start_sim --config "$HS_TMP/shared.ini" --rtu line="$HS_TMP/ttyB"
    fi
    hs_wait_file_line "$HS_TMP/sim.log" 'serving RTU' 10 && hs_wait_port "$PORT" 10
    "$PROBE" --config "$HS_TMP/shared.ini" --seconds 17 --stream >"$HS_TMP/shared-$mode.json"
    stop_sim
done
$PY - "$HS_TMP/shared-healthy.json" "$HS_TMP/shared-silent.json" <<'PYEOF'
import json, sys
def period(path, bus):
    rows = [json.loads(l) for l in open(path) if l.startswith('{"t"')]
    # steady state: from the first report with unit 1 down (silent run), or
    # from the first second on (healthy run), to the end
    start = next((r["t"] for r in rows if r.get("bus") == bus and r.get("down")), None)
    if start is None:
        start = rows[0]["t"] + 1000
    t = sorted({r["t"] for r in rows if r.get("bus") == bus and r.get("unit") == 2
                and r.get("q") == "good" and r["t"] >= start})
    return (t[-1] - t[0]) / (len(t) - 1), len(t), (t[-1] - t[0]) / 1000
for bus in ("line", "gw"):
    h, nh, sh = period(sys.argv[1], bus)
    s, ns, ss = period(sys.argv[2], bus)
    print(f"shared {bus:4s}: unit 2 poll period {h:.1f} ms with both healthy ({nh} reads in {sh:.1f} s), "
          f"{s:.1f} ms with unit 1 silent and down ({ns} reads in {ss:.1f} s; probe every 5 s, "
          f"500 ms timeout); ratio {s / h:.3f} (goal <= 1.1)")
PYEOF
