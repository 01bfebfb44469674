#!/usr/bin/env bash
# End to end over real sockets: the pond-chain simulator (Modbus TCP) ->
# halostaged with the real plugin -> SQLite rows, and MQTT messages checked
# by a real subscriber on a private mosquitto. Then a reload with a broken
# file (kept running on the old one), a valid reload that takes effect,
# and SIGTERM: outbox flushed, gateway offline published, clean exit.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
H="$HS_BUILD/halostage"
for tool in mosquitto mosquitto_sub sqlite3; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = e2e-gateway\n' "$mport" >>"$cfg"

mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/#' -v >"$HS_TMP/mqtt.txt" 2>&1 &
HS_PIDS+=($!)
"$S" --config "$cfg" --speed 300 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"

"$D" --config "$cfg" --emit-stdout --log-level info >"$HS_TMP/emit.txt" 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")

ponds="intake c1 c2 c3 c4 store x1 x2 bittern"
all_states() {
    local p
    for p in $ponds; do
        grep -q "^halostage/demo-works/pond/$p/state " "$HS_TMP/mqtt.txt" || return 1
    done
}
ok_wait=1
for ((i = 0; i < 300; i++)); do all_states && break; sleep 0.1; done
check "MQTT: a retained state for every pond reached a real subscriber" all_states
check "MQTT: gateway online" grep -q '^halostage/demo-works/gateway {.*"online":true' "$HS_TMP/mqtt.txt"
check "MQTT: transfer advice published" hs_wait_file_line "$HS_TMP/mqtt.txt" '^halostage/demo-works/transfer/store-to-x1 ' 10

# the payload is the brine state (hp_state_json.h) plus level and quality;
# x1's first states may come before its densitometer's first reading (a
# loaded machine), so the latest state is checked until it passes (bounded)
x1_check() {
    local line
    line=$(grep '^halostage/demo-works/pond/x1/state ' "$HS_TMP/mqtt.txt" | tail -1 | cut -d' ' -f2-)
    /usr/bin/python3 - "$line" <<'PY' >"$HS_TMP/x1.check" 2>&1
import json, sys
s = json.loads(sys.argv[1])
need = ["density_kg_m3", "baume", "specific_gravity", "stage", "next_stage", "method",
        "concentration_factor", "saturation_index", "depth_m", "volume_m3", "quality"]
missing = [k for k in need if k not in s]
assert not missing, missing
assert s["method"] == "densitometer", s["method"]          # x1 has an inline densitometer
assert 990 < s["density_kg_m3"] < 1400, s["density_kg_m3"]
assert s["stage"] in ("halite", "magnesium-sulfate", "gypsum"), s["stage"]
assert 0 < s["depth_m"] < 0.6, s["depth_m"]
print("ok")
PY
    grep -qx ok "$HS_TMP/x1.check"
}
for ((i = 0; i < 150; i++)); do x1_check && break; sleep 0.2; done
check "x1 state: densitometer method, plausible density, stage and depth ($(cat "$HS_TMP/x1.check" | tail -1))" grep -qx ok "$HS_TMP/x1.check"

# the host's emit: tagged values
check "host emit: tagged values reach the host" hs_wait_file_line "$HS_TMP/emit.txt" '^pond/c2/density_kg_m3 good [0-9.]+$' 10
check "host emit: stage as text" grep -qE '^pond/c2/stage good [a-z-]+$' "$HS_TMP/emit.txt"

# SQLite: rows of every kind the pipeline writes
db="$HS_TMP/demo.db"
rows() { sqlite3 -cmd ".timeout 5000" "$db" "$1" 2>/dev/null; }
for ((i = 0; i < 100; i++)); do [ "$(rows 'SELECT count(DISTINCT pond_id) FROM pond_state')" = 9 ] && break; sleep 0.1; done
check "SQLite: states of all 9 ponds" test "$(rows 'SELECT count(DISTINCT pond_id) FROM pond_state')" = 9
check "SQLite: raw samples" test "$(rows 'SELECT count(*) FROM sample')" -gt 30
check "SQLite: transfer decisions journaled" test "$(rows 'SELECT count(*) FROM transfer_decision')" -ge 4

# status from the store while the daemon writes
"$H" status --config "$cfg" >"$HS_TMP/status.txt" 2>&1
check "halostage status lists every pond" test "$(grep -cE '^(intake|c1|c2|c3|c4|store|x1|x2|bittern) ' "$HS_TMP/status.txt")" -eq 9
check "halostage status shows transfer advice" grep -qE '^store-to-x1 +store -> x1 +(idle|run|wait|blocked) ' "$HS_TMP/status.txt"

# reload: a broken file is refused and the old config keeps running
cp "$cfg" "$HS_TMP/good.ini"
printf '\n[pond extra]\nrole = lagoon\n' >>"$cfg"
n_before=$(grep -c '^halostage/demo-works/pond/c1/state ' "$HS_TMP/mqtt.txt")
kill -HUP "$dpid"
check "broken reload refused" hs_wait_file_line "$HS_TMP/daemon.log" 'reload refused .*still running on the previous configuration' 10
check "the reason names file and line" grep -qE "site.ini:[0-9]+: .*role" "$HS_TMP/daemon.log"
for ((i = 0; i < 100; i++)); do
    [ "$(grep -c '^halostage/demo-works/pond/c1/state ' "$HS_TMP/mqtt.txt")" -gt "$((n_before + 1))" ] && break
    sleep 0.1
done
check "still publishing on the old configuration" test "$(grep -c '^halostage/demo-works/pond/c1/state ' "$HS_TMP/mqtt.txt")" -gt "$((n_before + 1))"

# a valid change takes effect: the x1-drain transfer gets a start density
# the crystalliser's brine is already past, so its advice turns to run
cp "$HS_TMP/good.ini" "$cfg"
sed -i 's/^\[transfer x1-drain\]$/[transfer x1-drain]\nstart_density = 1100 kg\/m3\nmin_off = 1s\nmin_on = 1s/' "$cfg"
kill -HUP "$dpid"
check "valid reload done" hs_wait_file_line "$HS_TMP/daemon.log" 'reload done' 10
check "the change took effect: x1-drain now advises run" \
    hs_wait_file_line "$HS_TMP/mqtt.txt" '^halostage/demo-works/transfer/x1-drain .*"advice":"run"' 15

# shutdown: outbox flushed, gateway offline, exit 0
kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "SIGTERM: exit 0 (got $rc)" test "$rc" -eq 0
check "outbox empty after the stop: nothing lost" test "$(rows 'SELECT count(*) FROM outbox')" = 0
check "gateway offline published on the way out" hs_wait_file_line "$HS_TMP/mqtt.txt" '^halostage/demo-works/gateway {.*"online":false' 5
check "every alarm journaled was published" \
    test "$(rows 'SELECT count(*) FROM alarm_journal')" -le "$(grep -c '^halostage/demo-works/alarm/' "$HS_TMP/mqtt.txt")"
check "the store is intact" test "$(rows 'PRAGMA integrity_check')" = ok
# errors other than the broken reload's own reasons
grep ': error: ' "$HS_TMP/daemon.log" | grep -v 'site.ini:[0-9]*: \|reload refused' >"$HS_TMP/errors.txt"
check "no other errors in the daemon log" test ! -s "$HS_TMP/errors.txt"
head -5 "$HS_TMP/errors.txt"
hs_finish
