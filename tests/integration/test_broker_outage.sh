#!/usr/bin/env bash
# A broker outage across a daemon restart loses nothing: with mosquitto
# gone, halostaged keeps queueing alarms, transfer advice and replies in its
# SQLite outbox; SIGTERM leaves the queue in the file (and says so); once the
# broker and the daemon are back, the queue drains to a real subscriber.
# Pond states are not queued on disk: the latest of each pond waits in
# memory and goes out when the broker is back.
#
# The outbox is read here with the sqlite3 CLI, which sees committed rows
# only, and the daemon commits an acknowledgement with its next commit, not
# at once: a row delivered a moment ago may still look queued. So the site
# commits every second (commit_interval = 1s), the queue is judged only by
# rows queued after the daemon logged the loss of the broker, and the full
# check comes after the stop, which commits everything.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
first_broker=$HS_MOSQ_PID
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    -e "s/^stale_after = 60s/stale_after = 60s\ncommit_interval = 1s/" \
    config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = outage-gateway\n' "$mport" >>"$cfg"
# a test rule: the simulated c2 is always deeper than 5 cm, so it is raised
# at once and an acknowledgement while the broker is away queues a message
printf '\n[alarm outage-depth]\nkind = level-high\nponds = c2\nhigh = 0.05\non_delay = 0s\n' >>"$cfg"
"$S" --config "$cfg" --speed 300 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
rows() { sqlite3 -cmd ".timeout 5000" "$HS_TMP/demo.db" "$1" 2>/dev/null; }

"$D" --config "$cfg" 2>"$HS_TMP/daemon1.log" &
dpid=$!
HS_PIDS+=("$dpid")
check "connected to the broker" hs_wait_file_line "$HS_TMP/daemon1.log" 'MQTT: connected to the broker' 10
kill "$first_broker"
wait "$first_broker" 2>/dev/null
check "the daemon notices the broker is gone" \
    hs_wait_file_line "$HS_TMP/daemon1.log" 'MQTT: lost the broker' 20
lost_ms=$(date +%s%3N)
# the ponds' states are not queued on disk: a newer one supersedes the last,
# so the latest of each waits in memory and goes out on the reconnect
check "no pond state is queued in the outbox while the broker is away" \
    test "$(rows "SELECT count(*) FROM outbox WHERE kind = 0 AND t_ms > $lost_ms")" = 0
# the broker comes back (empty: no retained states survive it) while the
# same daemon runs: every pond's latest state reaches a subscriber
hs_start_mosquitto "$mport" "log_type subscribe" || not_ok "mosquitto did not restart"
second_broker=$HS_MOSQ_PID
mosquitto_sub -h 127.0.0.1 -p "$mport" -i outage-sub1 -t 'halostage/+/pond/+/state' -v \
    >"$HS_TMP/states.txt" 2>&1 &
HS_PIDS+=($!)
hs_wait_file_line "$HS_TMP/mosquitto-$mport.log" "outage-sub1 0 halostage/" 10 ||
    not_ok "the state subscriber did not subscribe"
check "the daemon says the broker is back" \
    hs_wait_file_line "$HS_TMP/daemon1.log" 'MQTT: broker back after' 20
pond_states() { cut -d' ' -f1 "$HS_TMP/states.txt" | sort -u | grep -c '/state$'; }
for ((i = 0; i < 300; i++)); do [ "$(pond_states)" -ge 9 ] 2>/dev/null && break; sleep 0.1; done
check "after the reconnect every pond's latest state arrives ($(pond_states) of 9)" \
    test "$(pond_states)" -eq 9
# away again; the daemon stops without a broker
kill "$second_broker"
wait "$second_broker" 2>/dev/null
check "the daemon notices the broker is gone again" bash -c \
    "for i in \$(seq 300); do [ \$(grep -c 'MQTT: lost the broker' '$HS_TMP/daemon1.log') -ge 2 ] && exit 0; sleep 0.1; done; exit 1"
check "an acknowledgement while the broker is away is answered" \
    "$HS_BUILD/halostage" ack --config "$cfg" --pond c2 --rule outage-depth --operator night \
    --note "gauge read on the dike"
kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "clean stop without a broker (exit $rc)" test "$rc" -eq 0
check "the daemon says what stays queued" grep -qE 'MQTT: [0-9]+ messages stay in the outbox' "$HS_TMP/daemon1.log"
# nothing was dropped (far below the outbox bound): every queued message
# (alarms, transfer advice, replies) must arrive as it was
rows "SELECT topic || ' ' || CAST(payload AS TEXT) FROM outbox ORDER BY id" \
    >"$HS_TMP/must_arrive.txt"
check "the acknowledgement waits in the outbox" grep -q 'alarm/c2/outage-depth .*night' \
    "$HS_TMP/must_arrive.txt"

# broker and daemon back: the queue drains to a subscriber (subscribed
# before the daemon starts: a message that is not retained reaches only
# subscribers the broker knows at the time)
hs_start_mosquitto "$mport" "log_type subscribe" || not_ok "mosquitto did not restart"
mosquitto_sub -h 127.0.0.1 -p "$mport" -i outage-sub -t 'halostage/#' -v >"$HS_TMP/mqtt.txt" 2>&1 &
HS_PIDS+=($!)
hs_wait_file_line "$HS_TMP/mosquitto-$mport.log" "outage-sub 0 halostage/#" 10 ||
    not_ok "the subscriber did not subscribe"
"$D" --config "$cfg" --run-for 8 2>"$HS_TMP/daemon2.log"
check "second run stopped cleanly" test $? -eq 0
check "the outbox drained after the broker came back" test "$(rows 'SELECT count(*) FROM outbox')" = 0
missing=$(grep -cvxF -f "$HS_TMP/mqtt.txt" "$HS_TMP/must_arrive.txt")
check "every queued message arrived ($(wc -l <"$HS_TMP/must_arrive.txt") queued, $missing missing)" \
    test "$missing" -eq 0
hs_finish
