#!/usr/bin/env bash
# One daemon per site and manual is untouchable (issue 17 points 3 and 4),
# against tests/tools/hs_act_device: a second halostaged on the same site is
# refused with a message naming the holder's PID and writes nothing;
# `halostage status` names the holder while the CLI still reads the store;
# a pump in manual, or whose manual signal is unknown, is never written, not
# even at shutdown.
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/act_lib.sh"

act_start_device || not_ok "device did not start"
cfg="$HS_TMP/site.ini"
act_config "$cfg"

"$ACT_D" --config "$cfg" >"$HS_TMP/d1.log" 2>&1 &
d1=$!
HS_PIDS+=("$d1")
check "first daemon starts the pump (coil 5 RUN applied)" hs_wait_file_line "$ACT_LOG" ' write coil 5 1 applied' 20

# a second daemon on the same site: refused, clear message, no write
stops_before=$(act_coil_writes 0)
timeout 20 "$ACT_D" --config "$cfg" >"$HS_TMP/d2.log" 2>&1
rc=$?
check "second daemon refused (exit $rc)" test "$rc" -ne 0 -a "$rc" -ne 124
check "refusal names the holder's PID $d1" grep -q "another halostaged (PID $d1) already runs this site" "$HS_TMP/d2.log"
stops_after=$(act_coil_writes 0)
check "the refused daemon wrote no STOP to the running pump ($stops_before -> $stops_after)" test "$stops_before" -eq "$stops_after"

check "first daemon still runs" kill -0 "$d1"

# the CLI reads the store and names the holder
"$HS_BUILD/halostage" status --config "$cfg" >"$HS_TMP/status.txt" 2>&1
check "status names the daemon holding the lock" grep -q "daemon: running, PID $d1 holds the site lock" "$HS_TMP/status.txt"
"$HS_BUILD/halostage" status --config "$cfg" --json >"$HS_TMP/status.json" 2>&1
check "status --json: daemon.pid" /usr/bin/python3 -c 'import json,sys; d=json.load(open(sys.argv[1]))["daemon"]; sys.exit(0 if d["running"] and d["pid"]==int(sys.argv[2]) else 1)' "$HS_TMP/status.json" "$d1"

# manual: the operator takes the pump to local control; nothing is written,
# not even at shutdown
act_ctl "hr 21 1"
check "advice: manual-override" hs_wait_file_line "$HS_TMP/d1.log" 'feed-to-crys\]: .*manual-override' 10
n_before=$(grep -c ' write coil 5 ' "$ACT_LOG")
kill -TERM "$d1"
wait "$d1"
rc=$?
check "clean stop (exit $rc)" test "$rc" -eq 0
n_after=$(grep -c ' write coil 5 ' "$ACT_LOG")
check "shutdown with the pump in manual wrote nothing to coil 5 ($n_before -> $n_after)" test "$n_before" -eq "$n_after"
check "shutdown says it left the output as it is" grep -q 'left as it is at shutdown' "$HS_TMP/d1.log"
"$HS_BUILD/halostage" status --config "$cfg" >"$HS_TMP/status2.txt" 2>&1
check "status after the stop: nobody holds the lock" grep -q "daemon: NOT RUNNING" "$HS_TMP/status2.txt"

# the manual signal unknown (an invalid value): hands off, also at shutdown
act_ctl "hr 21 0"
act_ctl "coil 5 0"
act_ctl "mark restart"
hs_wait_file_line "$ACT_LOG" 'mark restart' 5
"$ACT_D" --config "$cfg" >"$HS_TMP/d3.log" 2>&1 &
d3=$!
HS_PIDS+=("$d3")
check "a new daemon starts once the first is gone" hs_wait_file_line "$ACT_LOG" ' write coil 5 1 applied' 20
act_ctl "hr 21 7"   # beyond valid_max: the manual signal is bad
check "manual unknown: reason manual-unknown" hs_wait_file_line "$HS_TMP/d3.log" 'feed-to-crys\]: .*manual-unknown' 10
m_before=$(grep -c ' write coil 5 ' "$ACT_LOG")
kill -TERM "$d3"
wait "$d3"
m_after=$(grep -c ' write coil 5 ' "$ACT_LOG")
check "manual unknown: nothing written to coil 5, not even at shutdown ($m_before -> $m_after)" test "$m_before" -eq "$m_after"

hs_finish
