#!/usr/bin/env bash
# Issue 17 point 6, the operator's side: a feedback lockout holds across a
# restart of halostaged (the journal remembers it) and an acknowledgement of
# the transfer's feedback-lockout alarm over MQTT (command/ack, the path the
# web page uses too) resets it. Device: tests/tools/hs_act_device.
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/act_lib.sh"

BROKER=$(hs_free_port)
hs_start_mosquitto "$BROKER" || not_ok "broker starts"
act_scenario lockout "lockout_after = 1" "" "[mqtt]" "uri = mqtt://127.0.0.1:$BROKER" \
    || not_ok "pump did not start"
act_ctl "follow -1 -1"
act_ctl "hr 20 0"       # the pump never confirms running
check "locked out after 1 failed start" hs_wait_file_line "$ACT_DLOG" 'locked out until an operator resets it after 1 failed start' 30

# a restart does not reset the lockout
kill -TERM "$ACT_DPID"
wait "$ACT_DPID"
act_mark restart
"$ACT_D" --config "$ACT_CFG" >"$ACT_DIR/daemon2.log" 2>&1 &
ACT_DPID=$!
HS_PIDS+=("$ACT_DPID")
check "after the restart the lockout holds (from the journal)" hs_wait_file_line "$ACT_DIR/daemon2.log" 'still locked out after failed starts' 20
act_ctl "follow 5 20"
sleep 5 # longer than min_off + feedback_timeout
runs=$(awk -v t="$(act_t 'mark restart')" '$1 >= t && / write coil 5 1 /' "$ACT_LOG" | wc -l)
check "no start after the restart while locked out ($runs RUN writes)" test "$runs" -eq 0

# the operator resets it over MQTT
mosquitto_sub -h 127.0.0.1 -p "$BROKER" -q 1 -v -t halostage/act-test/reply -t halostage/act-test/error \
    -C 1 -W 20 >"$ACT_DIR/reply.txt" 2>/dev/null &
sub=$!
HS_PIDS+=("$sub")
now=$(date -u +%Y-%m-%dT%H:%M:%SZ)
for ((i = 0; i < 100; i++)); do
    mosquitto_pub -h 127.0.0.1 -p "$BROKER" -q 1 -t halostage/act-test/command/ack -m \
        "{\"pond\":\"feed-to-crys\",\"rule\":\"feedback-lockout\",\"operator\":\"ana\",\"request_id\":\"lock-$i\",\"time\":\"$now\"}"
    hs_wait_file_line "$ACT_DIR/daemon2.log" 'feedback lockout reset' 1 && break
done
check "MQTT ack of feedback-lockout resets the lockout" hs_wait_file_line "$ACT_DIR/daemon2.log" 'feedback lockout reset' 10
check "the pump starts again" hs_wait_file_line "$ACT_DIR/daemon2.log" 'pump output RUN confirmed' 20
wait "$sub"
check "the ack was answered on the reply topic" grep -q '^halostage/act-test/reply .*"ok": *true' "$ACT_DIR/reply.txt"
act_scenario_end

hs_finish
