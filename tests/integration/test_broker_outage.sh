#!/usr/bin/env bash
# A broker outage across a daemon restart loses nothing: with mosquitto
# gone, halostaged keeps queueing in its SQLite outbox; SIGTERM leaves the
# queue in the file (and says so); once the broker and the daemon are back,
# the queue drains to a real subscriber. While the broker is away the outbox
# keeps each pond's latest state only (a newer one replaces it), and every
# other message.
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
# the ponds' states wait while the broker is away: the latest of each, all
# queued after the loss (so none of them can be one already delivered)
states() { rows "SELECT count(DISTINCT topic) FROM outbox WHERE kind = 0 AND t_ms > $lost_ms"; }
for ((i = 0; i < 300; i++)); do [ "$(states)" -ge 9 ] 2>/dev/null && break; sleep 0.1; done
check "the outbox holds a state of every pond queued while the broker is away ($(states))" \
    test "$(states)" -eq 9
kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "clean stop without a broker (exit $rc)" test "$rc" -eq 0
check "the daemon says what stays queued" grep -qE 'MQTT: [0-9]+ messages stay in the outbox' "$HS_TMP/daemon1.log"
queued=$(rows 'SELECT count(*) FROM outbox')
check "the queue survives the stop ($queued rows)" test "$queued" -ge 9
check "it holds a state of every pond, and only the latest of each" \
    test "$(rows "SELECT count(DISTINCT topic) || ' ' || count(*) FROM outbox WHERE kind = 0")" = "9 9"
# nothing was dropped (far below the outbox bound): every queued message that
# is not a pond state must arrive as it was; a queued state may be replaced
# by a newer one of its pond before the broker is back, but each pond's
# state arrives
rows "SELECT topic || ' ' || CAST(payload AS TEXT) FROM outbox WHERE kind <> 0 ORDER BY id" \
    >"$HS_TMP/must_arrive.txt"
rows "SELECT DISTINCT topic FROM outbox WHERE kind = 0" >"$HS_TMP/state_topics.txt"

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
no_state=0
while read -r topic; do grep -q "^$topic " "$HS_TMP/mqtt.txt" || no_state=$((no_state + 1)); done \
    <"$HS_TMP/state_topics.txt"
check "a state of every queued pond arrived ($no_state missing)" test "$no_state" -eq 0
hs_finish
