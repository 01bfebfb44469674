#!/usr/bin/env bash
# The broker's loss and return are told in the log at notice level, the
# attempts in between at most a line a minute, and with the default
# [mqtt] back-off (reconnect_min = reconnect_max = 500ms) the daemon is back
# within about a second of the broker's return. A real mosquitto, stopped
# for 8 s and started again on the same port.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
for tool in mosquitto mosquitto_sub; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
first_broker=$HS_MOSQ_PID
cfg="$HS_TMP/site.ini"
sed -e "s|^database = .*|database = $HS_TMP/history.db|" config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = comeback\n' "$mport" >>"$cfg"
"$D" --config "$cfg" --log-level notice 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
check "notice: connected" hs_wait_file_line "$HS_TMP/daemon.log" "MQTT: connected to the broker" 20
kill "$first_broker"; wait "$first_broker" 2>/dev/null
check "notice: the broker's loss" hs_wait_file_line "$HS_TMP/daemon.log" "MQTT: lost the broker: " 10
# 8 s without a broker: about 8 attempts, and no line per attempt
t0=$(date +%s%N)
while (( $(date +%s%N) - t0 < 8000000000 )) && kill -0 "$dpid"; do
    sleep 0.1 # the outage itself: time passing is the condition
done
attempt_lines=$(grep -c "MQTT: still no broker" "$HS_TMP/daemon.log")
check "attempts are rate-limited ($attempt_lines lines in 8 s)" test "$attempt_lines" -le 1
hs_start_mosquitto "$mport" || not_ok "mosquitto restarted"
back0=$(date +%s%N)
check "notice: the broker's return" hs_wait_file_line "$HS_TMP/daemon.log" "MQTT: broker back after" 20
lag_ms=$(( ($(date +%s%N) - back0) / 1000000 ))
line=$(grep "MQTT: broker back after" "$HS_TMP/daemon.log" | tail -1)
echo "# reconnected ${lag_ms} ms after the broker listened again; log: ${line#*MQTT: }"
attempts=$(sed -n 's/.*(\([0-9]*\) failed attempts).*/\1/p' <<<"$line")
check "the attempts were counted ($attempts, about one a second)" test "${attempts:-0}" -ge 4
# generous against a loaded machine; the figure above is what it took
check "back within 4 s of the broker's return with the default back-off (${lag_ms} ms)" \
    test "$lag_ms" -le 4000
kill -TERM "$dpid"; wait "$dpid"
check "clean stop" test $? -eq 0
hs_finish
