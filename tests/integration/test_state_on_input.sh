#!/usr/bin/env bash
# A pond state is computed, stored and published when a new input arrives
# (or an input's quality changes), not every cycle: no two stored states of
# a pond share an input time, the MQTT state messages (real mosquitto) are
# no more than the stored states, and an unchanged retained state still
# goes out every [mqtt] state_heartbeat. (Rollups counting real samples:
# test_store.c.)
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
for tool in mosquitto mosquitto_sub sqlite3; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
DB="$HS_TMP/history.db"
site() { # site DIKES_POLL ANALYSERS_POLL HEARTBEAT
    sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
        -e "s/^poll_interval = 5s/poll_interval = $1/" -e "s/^poll_interval = 10s/poll_interval = $2/" \
        -e "s/^stale_after = 60s/stale_after = 10min/" \
        -e "s/^\[site\]/[site]\nstate_max_interval = 1s\ncommit_interval = 1s/" \
        -e "s|^database = .*|database = $DB|" config/demo.ini
    printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = oninput\nstate_heartbeat = %s\n' \
        "$mport" "$3"
}
site 1s 2s 5min >"$HS_TMP/fast.ini"
"$S" --config "$HS_TMP/fast.ini" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/demo-works/pond/c2/state' >"$HS_TMP/c2.txt" 2>&1 &
HS_PIDS+=($!)
"$D" --config "$HS_TMP/fast.ini" --log-level info 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
rows() { sqlite3 "$DB" "SELECT count(*) FROM pond_state ps JOIN pond p ON p.id = ps.pond_id WHERE p.name = 'c2'" 2>/dev/null || echo 0; }
for ((i = 0; i < 600; i++)); do [ "$(rows)" -ge 12 ] && break; sleep 0.1; done
check "c2 has stored states" test "$(rows)" -ge 12
kill -TERM "$dpid"; wait "$dpid"
check "the daemon stopped cleanly" test $? -eq 0

dups=$(sqlite3 "$DB" "SELECT count(*) - count(DISTINCT pond_id || '/' || t_ms || '/' || quality) FROM pond_state")
check "no two stored states of a pond share input time and quality ($dups repeats)" test "$dups" -eq 0
n_rows=$(rows)
n_msgs=$(grep -c '^{' "$HS_TMP/c2.txt")
# at most one message more: the first cycle publishes what is known before any input
check "MQTT states of c2 ($n_msgs) are no more than its stored states ($n_rows) + 1" \
    test "$n_msgs" -le $((n_rows + 1))
check "and the states did go out ($n_msgs)" test "$n_msgs" -ge $((n_rows / 2))
# inputs every second at most: the states of c2 are no more than the seconds run
span=$(sqlite3 "$DB" "SELECT (max(t_ms) - min(t_ms)) / 1000 + 1 FROM pond_state ps JOIN pond p ON p.id = ps.pond_id WHERE p.name = 'c2'")
check "c2: $n_rows states in $span s of input at a 1 s and 2 s poll (no more than one per poll)" \
    test "$n_rows" -le $((span * 2 + 2))

# (a state row at most every second here: state_max_interval = 1s, so
# every new input's state is also a row; by exception: test_store_exception.sh)
# Raw samples by exception, counted in full: the minute rollups of the
# signals count every poll (at most one a second per signal here), the raw
# table keeps only the exceptions.
kept=$(sqlite3 "$DB" "SELECT count(*) FROM sample")
counted=$(sqlite3 "$DB" "SELECT coalesce(sum(r.n), 0) FROM rollup r JOIN series s ON s.id = r.series_id WHERE r.step_s = 60 AND s.name NOT LIKE '%:%'")
maxn=$(sqlite3 "$DB" "SELECT coalesce(max(r.n), 0) FROM rollup r JOIN series s ON s.id = r.series_id WHERE r.step_s = 60 AND s.name NOT LIKE '%:%'")
echo "# $counted samples counted in the rollups, $kept kept raw"
check "every sample counted in the rollups, fewer kept raw ($kept < $counted)" \
    test "$kept" -gt 0 -a "$kept" -lt "$counted"
check "no minute counts more samples than polls ($maxn <= 61)" test "$maxn" -le 61 -a "$maxn" -gt 0

# Heartbeat: slow polls (60 s) and a 1 s heartbeat: the retained state goes
# out again while no state is stored.
site 60s 60s 1s >"$HS_TMP/slow.ini"
: >"$HS_TMP/c2.txt"
"$D" --config "$HS_TMP/slow.ini" 2>"$HS_TMP/daemon2.log" &
dpid=$!
HS_PIDS+=("$dpid")
msgs() { grep -c '^{' "$HS_TMP/c2.txt"; }
for ((i = 0; i < 300; i++)); do [ "$(msgs)" -ge 2 ] && break; sleep 0.1; done
before=$(rows)
m0=$(msgs)
for ((i = 0; i < 300; i++)); do [ "$(msgs)" -ge $((m0 + 3)) ] && break; sleep 0.1; done
check "heartbeat: the unchanged c2 state went out again ($m0 -> $(msgs) messages)" \
    test "$(msgs)" -ge $((m0 + 3))
check "heartbeat: and nothing new was stored for it ($before -> $(rows) rows)" test "$(rows)" -eq "$before"
kill -TERM "$dpid"; wait "$dpid"
hs_finish
