#!/usr/bin/env bash
# SCADA outlets (make bench), on the demo site against the simulator:
#  1. full-map reads (site block, 4 transfers, 9 pond blocks: 11 requests)
#     by 10 concurrent Modbus clients (libmodbus, hs_mb_load) for 5 s:
#     latency of one full-map read, p50/p95/p99 (goal p95 <= 5 ms);
#  2. field polling with and without that load: samples stored per second
#     over the same 5 s windows (100 ms poll interval);
#  3. Sparkplug B bytes per pond-day against the JSON pond state on the
#     gateway's own topic, both captured from the broker for 60 s with the
#     simulator at real speed and the demo's poll intervals, scaled to a day.
set -u
cd "$(dirname "$0")/../.."
HS_BUILD=${HS_BUILD:-build}
source tests/integration/lib.sh
LOAD="$HS_BUILD/tools/hs_mb_load"
[ -x "$LOAD" ] || make --no-print-directory tests >/dev/null
PY=/usr/bin/python3
SPB_SECONDS=${HS_BENCH_SPB_SECONDS:-60}

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { echo "mosquitto did not start"; exit 1; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
mb=$(hs_free_port)

site() { # $1 poll interval sed expression, $2 file
    sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
        -e "$1" -e "s|^database = .*|database = $HS_TMP/bench.db|" config/demo.ini >"$2"
    printf '\n[modbus_server]\nlisten = 127.0.0.1:%s\nmax_clients = 16\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = bench-gw\n[sparkplug]\ngroup_id = bench\nedge_node_id = gw\n' \
        "$mb" "$mport" >>"$2"
}
samples() { sqlite3 -cmd ".timeout 5000" "$HS_TMP/bench.db" 'SELECT count(*) FROM sample' 2>/dev/null; }
start() { # $1 config, $2 sim speed
    "$HS_BUILD/halostage-sim" --config "$1" --speed "$2" >"$HS_TMP/sim.log" 2>&1 &
    SIM=$!; HS_PIDS+=("$SIM")
    hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10
    "$HS_BUILD/halostaged" --config "$1" >"$HS_TMP/daemon.log" 2>&1 &
    DAEMON=$!; HS_PIDS+=("$DAEMON")
    hs_wait_port "$mb" 15
}
stop() { kill "$DAEMON" "$SIM" 2>/dev/null; wait "$DAEMON" "$SIM" 2>/dev/null; }

# ---- 1 and 2
site 's/^poll_interval = .*/poll_interval = 100ms/' "$HS_TMP/fast.ini"
start "$HS_TMP/fast.ini" 1
for ((i = 0; i < 100; i++)); do [ "$(samples)" -gt 200 ] 2>/dev/null && break; sleep 0.1; done
s0=$(samples); t0=$(date +%s.%N); sleep 5; s1=$(samples); t1=$(date +%s.%N)
"$LOAD" --port "$mb" --clients 10 --seconds 5 --ponds 9 --transfers 4 >"$HS_TMP/load.json" &
lp=$!
s2=$(samples); t2=$(date +%s.%N); wait "$lp"; s3=$(samples); t3=$(date +%s.%N)
stop
$PY - "$HS_TMP/load.json" "$s0" "$s1" "$t0" "$t1" "$s2" "$s3" "$t2" "$t3" <<'PY'
import json, sys
o = json.load(open(sys.argv[1]))
s0, s1, t0, t1, s2, s3, t2, t3 = map(float, sys.argv[2:])
quiet = (s1 - s0) / (t1 - t0)
loaded = (s3 - s2) / (t3 - t2)
print(f"Modbus full map (11 reads) x {o['clients']} clients: {o['reads']} maps in 5 s, "
      f"{o['errors']} errors; p50 {o['p50_ms']:.2f} ms, p95 {o['p95_ms']:.2f} ms "
      f"(goal <= 5), p99 {o['p99_ms']:.2f} ms, max {o['max_ms']:.2f} ms")
print(f"field polling: {quiet:.1f} samples/s without the load, {loaded:.1f} samples/s "
      f"under it ({100 * (loaded - quiet) / quiet:+.1f} %)")
PY

# ---- 3
site 's/^poll_interval = \(.*\)/poll_interval = \1/' "$HS_TMP/real.ini"
rm -f "$HS_TMP/bench.db"*
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'spBv1.0/bench/#' -t 'halostage/demo-works/pond/+/state' \
    -F '%t %l' >"$HS_TMP/bytes.txt" 2>&1 &
SUB=$!; HS_PIDS+=("$SUB")
start "$HS_TMP/real.ini" 1
sleep "$SPB_SECONDS" # a measurement window, not a wait for a condition
stop
kill "$SUB" 2>/dev/null
$PY - "$HS_TMP/bytes.txt" "$SPB_SECONDS" <<'PY'
import sys
spb = {"BIRTH": 0, "DATA": 0, "DEATH": 0}
json_b = 0
n_json = n_ddata = 0
for line in open(sys.argv[1]):
    topic, _, n = line.strip().rpartition(" ")
    n = int(n)
    if topic.startswith("halostage/"):
        json_b += n; n_json += 1
    elif "/DDATA/" in topic or "/NDATA/" in topic:
        spb["DATA"] += n; n_ddata += "/DDATA/" in topic
    elif "BIRTH" in topic:
        spb["BIRTH"] += n
    elif "DEATH" in topic:
        spb["DEATH"] += n
secs = float(sys.argv[2]); ponds = 9
day = 86400 / secs / ponds
print(f"Sparkplug over {secs:.0f} s, 9 ponds (demo poll intervals 5 s / 10 s): births "
      f"{spb['BIRTH']} B once per session; DDATA+NDATA {spb['DATA']} B in {n_ddata} DDATA "
      f"-> {spb['DATA'] * day / 1e3:.0f} kB per pond-day")
print(f"JSON pond state on the gateway topic: {json_b} B in {n_json} messages "
      f"-> {json_b * day / 1e3:.0f} kB per pond-day; Sparkplug/JSON = "
      f"{(spb['DATA'] / json_b) if json_b else float('nan'):.3f}")
PY
