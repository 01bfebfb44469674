#!/usr/bin/env bash
# The actuation matrix of issue 17 against tests/tools/hs_act_device (a
# Modbus TCP device that logs every write and refuses, drops, stalls or
# ignores writes on command). Points 3 and 4 (manual, one daemon per site)
# are in test_actuation_lock.sh. Each scenario has its own device, site and
# history. Every wait is bounded; timings are read from the device's log.
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/act_lib.sh"

# ---- 1: a STOP the device does not carry out is re-sent at once, with
# back-off, until it is confirmed; meanwhile an alarm and no heartbeat ----
act_scenario stop-dropped || not_ok "stop-dropped: pump did not start"
act_ctl "writes coil drop"
act_mark drop
act_ctl "hr 2 1800"             # feed level 0.2 m: below level_min, STOP
check "1: STOP decided (source-level-low)" hs_wait_file_line "$ACT_DLOG" 'blocked \(.*source-level-low' 10
check "1: unconfirmed STOP raises the alarm" hs_wait_file_line "$ACT_DLOG" 'did not confirm pump output STOP' 10
check "1: the heartbeat stops" hs_wait_file_line "$ACT_DLOG" 'PLC heartbeat \(register 30\) stopped' 5
t_hb_stop=$(date +%s%3N)
sleep 2 # a window in which no heartbeat may reach the device
hb_in_window=$(awk -v a="$t_hb_stop" -v b="$(date +%s%3N)" '$1 > a + 100 && $1 < b && / write hr 30 /' "$ACT_LOG" | wc -l)
check "1: no heartbeat write while the STOP is unconfirmed ($hb_in_window)" test "$hb_in_window" -eq 0
n_sent=$(awk -v t="$(act_t 'mark drop')" '$1 >= t && / write coil 5 0 dropped/' "$ACT_LOG" | wc -l)
check "1: STOP re-sent, not once ($n_sent tries in the drop window)" test "$n_sent" -ge 3
act_ctl "writes coil normal"
act_mark heal
check "1: STOP applied once the device takes writes again" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 10
t_heal=$(act_t 'mark heal')
t_applied=$(awk -v t="$t_heal" '$1 >= t && / write coil 5 0 applied/ {print $1; exit}' "$ACT_LOG")
check "1: applied within the longest back-off after the device healed ($((t_applied - t_heal)) ms)" test $((t_applied - t_heal)) -le 4500
check "1: confirmed again, the heartbeat counts again" hs_wait_file_line "$ACT_DLOG" 'PLC heartbeat counts again' 10
sqlite3 "$ACT_DIR/act.db" "SELECT rule, to_state FROM alarm_journal WHERE pond = 'feed-to-crys'" >"$ACT_DIR/journal.txt"
check "1: the journal has the output-unconfirmed alarm" grep -q '^output-unconfirmed|unacknowledged' "$ACT_DIR/journal.txt"
act_scenario_end

# ---- decision to applied STOP with a device that stalls every write 2.5 s ----
act_scenario stall || not_ok "stall: pump did not start"
act_ctl "writes all stall 2500"
act_mark stall
dl0=$(wc -l <"$ACT_DLOG")
act_ctl "hr 2 1800"
check "stall: STOP applied after the stall" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 15
after_mark() { tail -n +"$((dl0 + 1))" "$ACT_DLOG" | grep -qE "$1"; }
for ((i = 0; i < 300; i++)); do after_mark 'pump output STOP confirmed' && break; sleep 0.05; done
check "stall: the daemon confirms the STOP by read-back once the device answers" after_mark 'pump output STOP confirmed'
check "stall: while the device hung, the heartbeat stopped" after_mark 'PLC heartbeat \(register 30\) stopped'
t_level=$(act_t 'set hr 2 1800')
t_first=$(act_t ' write coil 5 0 stalled')
t_applied=$(act_t ' write coil 5 0 applied')
echo "# figure: STOP with a device that stalls every request 2.5 s: level change at the device ->" \
     "STOP decided and received by the device $((t_first - t_level)) ms -> STOP applied" \
     "$((t_applied - t_level)) ms ($((t_applied - t_first)) ms from decision to applied)"
check "stall: the STOP reached the device within 1 s of the level change" test $((t_first - t_level)) -le 1000
check "stall: applied once the stall ended (<= 2.5 s + 1.5 s)" test $((t_applied - t_level)) -le 4000
act_scenario_end

# ---- 2: a reload that moves, removes or stops actuating an output first
# drives the old output to STOP and confirms it ----
for change in move no-actuate remove; do
    act_scenario "reload-$change" || not_ok "reload-$change: pump did not start"
    case $change in
    move) sed -i 's/^output_address = 5$/output_address = 6/' "$ACT_CFG" ;;
    no-actuate) sed -i 's/^actuate = yes$/actuate = no/' "$ACT_CFG" ;;
    remove) /usr/bin/python3 -c 'import sys; p=sys.argv[1]; s=open(p).read(); open(p,"w").write(s[:s.index("[transfer feed-to-crys]")])' "$ACT_CFG" ;;
    esac
    act_mark reload
    kill -HUP "$ACT_DPID"
    check "2 ($change): the old output is driven to STOP" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 10
    check "2 ($change): STOP confirmed before the new file applies" hs_wait_file_line "$ACT_DLOG" 'STOP for the reload .*confirmed by the device' 10
    hs_wait_file_line "$ACT_DLOG" 'reloaded' 10
    if [ "$change" = move ]; then
        check "2 (move): the new output runs" hs_wait_file_line "$ACT_LOG" ' write coil 6 1 applied' 10
        t5=$(act_t ' write coil 5 0 applied')
        t6=$(act_t ' write coil 6 ')
        check "2 (move): coil 5 stopped before coil 6 was written" test "$t5" -le "$t6"
    fi
    act_scenario_end
    check "2 ($change): coil 5 left at STOP after the daemon stopped" bash -c "tail -n 50 '$ACT_LOG' | grep ' write coil 5 ' | tail -1 | grep -q ' write coil 5 0 applied'"
done

# ---- 5: a transfer stops when its deciding density source goes bad, even
# though the pond falls back to conductivity ----
act_scenario density-source \
    "[signal feed.conductivity]" "bus = plc" "address = 3" "type = uint16" "scale = 0.01" "unit = mS/cm" \
    || not_ok "density-source: pump did not start"
act_ctl "hr 0 65535"   # densitometer reads 6553.5 kg/m3: out of range, bad
check "5: stopped, reason density-source" hs_wait_file_line "$ACT_DLOG" 'blocked \(.*density-source' 10
check "5: STOP applied" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 10
act_scenario_end

# ---- 6: a pump that never confirms running locks out after lockout_after
# failed starts until an operator acknowledges; the alarm is journaled ----
act_scenario lockout "lockout_after = 2" || not_ok "lockout: pump did not start"
act_ctl "follow -1 -1"
act_ctl "hr 20 0"       # run feedback stays 0 whatever the coil
act_mark nofeedback
check "6: locked out after 2 failed starts" hs_wait_file_line "$ACT_DLOG" 'locked out until an operator resets it after 2 failed starts' 30
act_mark locked
sleep 6 # longer than feedback_timeout + min_off: the old code started again here
runs=$(awk -v t="$(act_t 'mark locked')" '$1 >= t && / write coil 5 1 /' "$ACT_LOG" | wc -l)
check "6: no start while locked out ($runs RUN writes)" test "$runs" -eq 0
sqlite3 "$ACT_DIR/act.db" "SELECT rule, to_state FROM alarm_journal WHERE pond = 'feed-to-crys'" >"$ACT_DIR/journal.txt"
check "6: the lockout alarm is in the journal" grep -q '^feedback-lockout|unacknowledged' "$ACT_DIR/journal.txt"
act_ctl "follow 5 20"
"$HS_BUILD/halostage" ack --config "$ACT_CFG" --pond feed-to-crys --rule feedback-lockout \
    --operator brine-master --wait 10s >"$ACT_DIR/ack.txt" 2>&1
check "6: halostage ack accepted" test $? -eq 0
check "6: lockout reset by the acknowledgement" hs_wait_file_line "$ACT_DLOG" 'feedback lockout reset' 10
check "6: the pump starts again" hs_wait_file_line "$ACT_DLOG" 'pump output RUN confirmed.*' 20
act_scenario_end

# ---- 7: heartbeat and pump commands go ahead of slow reads; the
# heartbeat steps by exactly +1 ----
act_scenario priority \
    "[pond spare]" "role = concentrator" "density_in = 1050 kg/m3" "density_out = 1100 kg/m3" \
    "level_min = 0.1 m" "level_max = 1.0 m" "freeboard = 1.5 m" "area = 1 ha" "distance_height = 2.0 m" \
    "[signal spare.conductivity]" "bus = plc" "unit_id = 2" "address = 0" "type = uint16" "scale = 0.01" "unit = mS/cm" \
    "[signal spare.temperature]" "bus = plc" "unit_id = 2" "address = 10" "type = uint16" "scale = 0.1" "unit = C" \
    "[signal spare.level-distance]" "bus = plc" "unit_id = 2" "address = 20" "type = uint16" "scale = 0.001" "unit = m" \
    "[signal spare.rain]" "bus = plc" "unit_id = 2" "address = 30" "type = uint16" "scale = 0.1" "unit = mm" \
    "[signal spare.pump-run]" "bus = plc" "unit_id = 2" "address = 40" "type = uint16" \
    "[signal spare.pump-manual]" "bus = plc" "unit_id = 2" "address = 50" "type = uint16" \
    || not_ok "priority: pump did not start"
act_ctl "slow 2 250"      # every read of unit 2 answers 250 ms late: 6 blocks, ~1.5 s a cycle
act_mark slow
sleep 8
act_mark measured
gaps=$(awk -v a="$(act_t 'mark slow')" -v b="$(act_t 'mark measured')" \
    '$1 >= a + 2000 && $1 <= b && / write hr 30 .* applied/ { if (p) { g = $1 - p; if (g > m) m = g } p = $1 } END { print m + 0 }' "$ACT_LOG")
echo "# figure: longest heartbeat gap while unit 2 answers every read 250 ms late: $gaps ms"
check "7: heartbeat gap stays near its 1 s period ($gaps ms <= 1500)" test "$gaps" -le 1500 -a "$gaps" -gt 0
steps=$(awk '/ write hr 30 .* applied/ { if (p != "" && $5 != p + 1) bad++; p = $5 } END { print bad + 0 }' "$ACT_LOG")
check "7: every heartbeat value the device took is the last +1 ($steps skips or repeats)" test "$steps" -eq 0
act_ctl "hr 2 1800"
act_mark stop
check "7: STOP applied while reads are slow" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 10
d=$(( $(act_t ' write coil 5 0 applied') - $(act_t 'mark stop') ))
echo "# figure: level change -> STOP applied with slow reads on the same bus: $d ms"
check "7: STOP within 1.5 s although a poll cycle takes ~1.5 s ($d ms)" test "$d" -le 1500
act_scenario_end

# ---- 8: no blind re-assert; a panel's STOP is not overwritten; the
# still-running line does not flood ----
act_scenario reassert "lockout_after = 1" || not_ok "reassert: pump did not start"
act_ctl "coil 5 0"      # a panel stops the pump (the PLC reports remote)
check "8: the daemon notices the panel's STOP" hs_wait_file_line "$ACT_DLOG" 'the PLC or a panel stopped the pump' 10
act_mark panel
sleep 5
runs=$(awk -v t="$(act_t 'mark panel')" '$1 >= t && / write coil 5 1 /' "$ACT_LOG" | wc -l)
check "8: RUN not written over the panel's STOP ($runs)" test "$runs" -eq 0
act_ctl "hr 21 1"       # operator runs the pump in manual
act_ctl "coil 5 1"
sleep 4
n=$(grep -c 'still reports running' "$ACT_DLOG")
check "8: no still-running lines while the pump is in manual ($n)" test "$n" -eq 0
act_ctl "hr 21 0"       # back to remote with the pump running against our STOP
check "8: STOP sent again when the device runs against it" hs_wait_file_line "$ACT_LOG" ' write coil 5 0 applied' 10
act_ctl "writes coil ignore"  # the device acknowledges STOP but keeps running
act_ctl "coil 5 1"
sleep 5
n=$(grep -c 'still reports running' "$ACT_DLOG")
check "8: still-running reported at most once in 5 s ($n)" test "$n" -le 1
act_scenario_end

# ---- 8: --check refuses what an actuated transfer must have ----
ACT_PORT=1502
act_config "$HS_TMP/nofb.ini"
sed -i -e '/^feedback = /d' -e '/^heartbeat_address = /d' "$HS_TMP/nofb.ini"
"$ACT_D" --config "$HS_TMP/nofb.ini" --check >/dev/null 2>"$HS_TMP/nofb.err"
check "8: --check refuses actuate without feedback and heartbeat (exit $?)" test $? -eq 78
check "8: ... naming feedback" grep -q 'actuate = yes needs feedback' "$HS_TMP/nofb.err"
check "8: ... naming heartbeat_address" grep -q 'actuate = yes needs heartbeat_address' "$HS_TMP/nofb.err"
act_config "$HS_TMP/slowpoll.ini"
sed -i 's/^poll_interval = 200ms$/poll_interval = 10s/' "$HS_TMP/slowpoll.ini"
"$ACT_D" --config "$HS_TMP/slowpoll.ini" --check >/dev/null 2>"$HS_TMP/slowpoll.err"
check "5: --check refuses poll_interval > stale_after for an actuated transfer (exit $?)" test $? -eq 78
check "5: ... naming the signal and the bus" grep -q 'polled every 10000 ms but goes stale after 5000 ms' "$HS_TMP/slowpoll.err"
act_config "$HS_TMP/nomanual.ini"
sed -i '/^manual = /d' "$HS_TMP/nomanual.ini"
"$ACT_D" --config "$HS_TMP/nomanual.ini" --check >/dev/null 2>"$HS_TMP/nomanual.err"
check "8: --check accepts actuate without a manual signal (exit $?)" test $? -eq 0
check "8: ... with a warning" grep -q 'warning: .*without a manual signal' "$HS_TMP/nomanual.err"

hs_finish
