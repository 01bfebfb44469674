#!/usr/bin/env bash
# A state you can believe, end to end over real sockets (simulator ->
# halostaged -> SQLite and a private mosquitto):
#  - one stage computation: for every pond of the demo, `status --json`,
#    `forecast --json`, the start of `chain --json` and the last retained
#    MQTT state (what the web page reads too) give the same stage,
#    and the MQTT state carries its density uncertainty;
#  - after the daemon stops, `status` says it is not running, since when and
#    which PID last held the site, shows every pond's age, and marks states
#    older than [site] stale_after as stale.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
H="$HS_BUILD/halostage"
PY=/usr/bin/python3
for tool in mosquitto mosquitto_sub; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    -e "s/^stale_after = 60s/stale_after = 3s/" config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = age-gateway\n' "$mport" >>"$cfg"
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/+/pond/+/state' -v >"$HS_TMP/mqtt.txt" 2>&1 &
HS_PIDS+=($!)
"$S" --config "$cfg" --speed 60 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
"$D" --config "$cfg" --log-level info 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")

ponds="intake c1 c2 c3 c4 store x1 x2 bittern"
all_states() {
    local p
    for p in $ponds; do
        grep -q "^halostage/demo-works/pond/$p/state .*\"stage\":\"" "$HS_TMP/mqtt.txt" || return 1
    done
}
for ((i = 0; i < 300; i++)); do all_states && break; sleep 0.1; done
check "a state with a stage for every pond reached MQTT" all_states
"$H" status --config "$cfg" >"$HS_TMP/running.txt" 2>&1
check "status while running: the daemon's PID holds the site" \
    grep -qE "^daemon: running, PID $dpid holds the site lock \(since " "$HS_TMP/running.txt"

# Stop the daemon: every outlet then holds its last state, so they can agree.
kill -TERM "$dpid"
wait "$dpid"
check "halostaged stopped cleanly" test $? -eq 0
"$H" status --config "$cfg" --json >"$HS_TMP/status.json" 2>&1
"$H" forecast --config "$cfg" --json >"$HS_TMP/forecast.json" 2>"$HS_TMP/forecast.err"
check "forecast --json ran for every pond" test "$(grep -c '^{' "$HS_TMP/forecast.json")" -eq 9
"$H" chain --config "$cfg" --json --days 1 --evaporation-mm-day 5 >"$HS_TMP/chain.json" 2>"$HS_TMP/chain.err"
check "chain --json ran" test -s "$HS_TMP/chain.json"
$PY - "$HS_TMP/status.json" "$HS_TMP/forecast.json" "$HS_TMP/mqtt.txt" "$HS_TMP/chain.json" \
    >"$HS_TMP/agree.txt" 2>&1 <<'PY'
import json, sys
status = {p["pond"]: p for p in json.load(open(sys.argv[1]))["ponds"]}
forecast = {}
for line in open(sys.argv[2]):
    d = json.loads(line)
    forecast[d["pond"]] = d
chain = {p["pond"]: p for p in json.load(open(sys.argv[4]))["start"]}
mqtt = {}
for line in open(sys.argv[3]):
    topic, payload = line.rstrip("\n").split(" ", 1)
    mqtt[topic.split("/")[3]] = json.loads(payload)
bad = []
for p, s in status.items():
    stages = (s["stage"], forecast[p]["stage"], chain[p]["stage"], mqtt[p]["stage"])
    if len(set(stages)) != 1:
        bad.append("%s: status %s, forecast %s, chain %s, mqtt %s" % ((p,) + stages))
    if not (mqtt[p]["density_uncertainty_kg_m3"] or 0) > 0:
        bad.append("%s: no density uncertainty on MQTT" % p)
    if not isinstance(mqtt[p].get("uncertain_alarms"), list):
        bad.append("%s: MQTT lacks the uncertain_alarms list" % p)
print("; ".join(bad) if bad else "ok %d ponds" % len(status))
PY
check "status, forecast, chain and MQTT give every pond the same stage ($(cat "$HS_TMP/agree.txt"))" \
    grep -q '^ok 9 ponds' "$HS_TMP/agree.txt"

# Not running: said, with since when and the last PID; ages; stale after 3 s.
"$H" status --config "$cfg" >"$HS_TMP/stopped.txt" 2>&1
check "status after the stop: not running, since when, PID $dpid last held the site" \
    grep -qE "^daemon: NOT RUNNING since 20[0-9-]+T[0-9:.]+Z \(.* ago, stopped\); PID $dpid last held the site" "$HS_TMP/stopped.txt"
check "status has an AGE column" grep -qE '^POND .* QUALITY +AGE +ALARMS' "$HS_TMP/stopped.txt"
stale_all() {
    "$H" status --config "$cfg" >"$HS_TMP/stale.txt" 2>&1
    [ "$(grep -cE '^(intake|c1|c2|c3|c4|store|x1|x2|bittern) .* stale +[0-9.]+(s|min) ' "$HS_TMP/stale.txt")" -eq 9 ]
}
for ((i = 0; i < 100; i++)); do stale_all && break; sleep 0.1; done
check "older than stale_after (3s): every pond shows stale with its age" stale_all
"$H" status --config "$cfg" --json >"$HS_TMP/status2.json" 2>&1
check "status --json: not running, last PID, since, each pond's age and stale" $PY -c "
import json, sys
d = json.load(open(sys.argv[1]))
dm = d['daemon']
assert dm['running'] is False and dm['last_pid'] == int(sys.argv[2]) and dm['not_running_since'], dm
assert dm['stopped_cleanly'] is True, dm
for p in d['ponds']:
    assert p['age_s'] > 3 and p['stale'] is True, p
" "$HS_TMP/status2.json" "$dpid"
[ "$hs_failed" = 0 ] || cat "$HS_TMP/status.json" "$HS_TMP/forecast.err" "$HS_TMP/chain.err" >&2
hs_finish
