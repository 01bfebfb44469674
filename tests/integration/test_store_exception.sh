#!/usr/bin/env bash
# Pond states stored by exception, counted in full, against the pond-chain
# simulator over real Modbus TCP into a real SQLite file:
#  - with deadbands wider than any change, an unchanged pond gets no new
#    state row before [site] state_max_interval (unless its stage or quality
#    changed), while every computed state still counts in the minute rollups
#    of its quantities (more states counted than rows kept, and no minute
#    counting more states than inputs arrived);
#  - with a zero level deadband every level change is stored at once;
#  - a clean stop (SIGTERM) writes the minutes the daemon held in memory:
#    the rollups reach the minute of the last stored state;
#  - a crash (SIGKILL) leaves a readable history that lacks at most the
#    last commit_interval (the documented loss).
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
command -v sqlite3 >/dev/null || { not_ok "sqlite3 is not installed (mk/deps.sh)"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
DB="$HS_TMP/history.db"
site() { # site SG_BAND LEVEL_BAND MAX_INTERVAL COMMIT_INTERVAL
    sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
        -e "s/^poll_interval = .*/poll_interval = 1s/" \
        -e "s|^database = .*|database = $DB|" \
        -e "s/^stale_after = 60s/stale_after = 10min/" \
        -e "s/^\[site\]/[site]\nstate_deadband_sg = $1\nstate_deadband_level = $2\nstate_max_interval = $3\ncommit_interval = $4/" \
        config/demo.ini
}
q() { sqlite3 -cmd ".timeout 5000" "$DB" "$1"; }
rows_of() { q "SELECT count(*) FROM pond_state ps JOIN pond p ON p.id = ps.pond_id WHERE p.name = '$1'" 2>/dev/null || echo 0; }
start_daemon() {
    "$D" --config "$1" --log-level warning 2>>"$HS_TMP/daemon.log" &
    dpid=$!
    HS_PIDS+=("$dpid")
}

site 0.1 1m 12s 1s >"$HS_TMP/quiet.ini"
"$S" --config "$HS_TMP/quiet.ini" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"

# --- wide deadbands, 12 s maximum interval: rows of c2 only every 12 s.
start_daemon "$HS_TMP/quiet.ini"
for ((i = 0; i < 900; i++)); do [ "$(rows_of c2)" -ge 3 ] && break; sleep 0.1; done
check "c2 stored its state again after the maximum interval ($(rows_of c2) rows)" \
    test "$(rows_of c2)" -ge 3
kill -TERM "$dpid"; wait "$dpid"
check "the daemon stopped cleanly" test $? -eq 0
# Two consecutive rows of one pond closer than the maximum interval must
# differ in stage or quality (the exceptions the deadbands do not cover).
early=$(q "WITH r AS (SELECT pond_id, t_ms, stage, quality, lag(t_ms) OVER w AS pt,
                      lag(stage) OVER w AS ps, lag(quality) OVER w AS pq FROM pond_state
                      WINDOW w AS (PARTITION BY pond_id ORDER BY t_ms))
           SELECT count(*) FROM r WHERE pt IS NOT NULL AND t_ms - pt < 12000
           AND stage IS ps AND quality = pq")
check "no unchanged pond stored a row before state_max_interval ($early early rows)" \
    test "$early" -eq 0
kept=$(rows_of c2)
counted=$(q "SELECT coalesce(sum(r.n), 0) FROM rollup r JOIN series s ON s.id = r.series_id
             WHERE r.step_s = 60 AND s.name = 'c2:specific_gravity'")
maxn=$(q "SELECT coalesce(max(r.n), 0) FROM rollup r JOIN series s ON s.id = r.series_id
          WHERE r.step_s = 60 AND s.name = 'c2:specific_gravity'")
echo "# c2: $counted states counted in the rollups, $kept kept as rows"
check "every computed state of c2 counted in the rollups, few kept ($kept * 3 < $counted)" \
    test $((kept * 3)) -lt "$counted"
# c2's inputs come from two buses polled every second: at most two new
# inputs, so two states, a second (plus one for a minute's edges).
check "no minute of c2 counts more states than inputs arrived ($maxn <= 121)" \
    test "$maxn" -le 121 -a "$maxn" -gt 0
# The run was shorter than a maintenance pass: the minutes in the file are
# those the clean stop wrote, up to the minute of the last state.
last_state=$(q "SELECT max(t_ms) / 60000 FROM pond_state")
last_minute=$(q "SELECT max(t_ms) / 60000 FROM rollup WHERE step_s = 60")
check "SIGTERM wrote the held minutes (last rollup minute $last_minute, last state $last_state)" \
    test -n "$last_minute" -a "$last_minute" -ge "$last_state"
sig_minute=$(q "SELECT max(r.t_ms) / 60000 FROM rollup r JOIN series s ON s.id = r.series_id
                WHERE r.step_s = 60 AND s.name = 'c2.level-pressure'")
check "and the signals' minutes too ($sig_minute)" test -n "$sig_minute" -a "$sig_minute" -ge "$last_state"

# --- a zero level deadband: every level move is a new row at once.
rm -f "$DB" "$DB-wal" "$DB-shm"
site 0.1 0m 10min 1s >"$HS_TMP/level.ini"
start_daemon "$HS_TMP/level.ini"
for ((i = 0; i < 900; i++)); do [ "$(rows_of c2)" -ge 4 ] && break; sleep 0.1; done
kill -TERM "$dpid"; wait "$dpid"
# a row may also come from a change of stage or quality (a bus answering
# late on a loaded machine): none may come without a reason
read -r moved idle <<<"$(q "WITH r AS (SELECT depth_m, lag(depth_m) OVER w AS pd, stage,
                                 lag(stage) OVER w AS ps, quality, lag(quality) OVER w AS pq
                                 FROM pond_state
                                 WHERE pond_id = (SELECT id FROM pond WHERE name = 'c2')
                                 WINDOW w AS (ORDER BY t_ms))
           SELECT sum(depth_m <> pd) || ' ' ||
                  sum(depth_m = pd AND stage = ps AND quality = pq) FROM r WHERE pd IS NOT NULL")"
check "c2: level moves stored within the 10 min maximum interval ($moved of $(rows_of c2) rows), none without a reason ($idle)" \
    test "$moved" -ge 2 -a "$idle" -eq 0

# --- a crash: the history opens and holds what was committed.
rm -f "$DB" "$DB-wal" "$DB-shm"
site 0.1 0m 10min 1s >"$HS_TMP/crash.ini"
start_daemon "$HS_TMP/crash.ini"
for ((i = 0; i < 900; i++)); do [ "$(rows_of c2)" -ge 3 ] && break; sleep 0.1; done
before=$(rows_of c2)
kill -KILL "$dpid"; wait "$dpid" 2>/dev/null
check "after SIGKILL the history is intact" test "$(q 'PRAGMA integrity_check')" = ok
check "and keeps the states committed before it ($before -> $(rows_of c2))" \
    test "$(rows_of c2)" -ge "$before"
hs_finish
