#!/usr/bin/env bash
# Operators' hydrometer readings: `halostage calibrate` records them in a real
# SQLite store (validated, clear errors) and lists them; the daemon, run
# against the pond-chain simulator over Modbus TCP, fits the site calibration
# from them (and refits when a new one arrives) and uses a recent manual
# reading for the crystalliser, whose conductivity says little.
# The readings are invented demo values; the checks are of plumbing, not
# of science (that is in tests/unit/test_pond_state.c and test_path_state.c).
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
H="$HS_BUILD/halostage"
command -v sqlite3 >/dev/null || { not_ok "sqlite3 is not installed (mk/deps.sh)"; hs_finish; }

dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    config/demo.ini >"$cfg"
db="$HS_TMP/demo.db"
rows() { sqlite3 -cmd ".timeout 5000" "$db" "$1" 2>/dev/null; }

# ---- the command: refusals name the field, and write nothing ----
"$H" calibrate --config "$cfg" --pond nowhere --sg 1.2 >/dev/null 2>"$HS_TMP/e1"
check "unknown pond: exit 2, named" test $? -eq 2 -a -n "$(grep -l "no pond 'nowhere'" "$HS_TMP/e1")"
"$H" calibrate --config "$cfg" --pond x2 --sg 1.8 >/dev/null 2>"$HS_TMP/e2"
check "SG out of range: exit 2, names --sg" test $? -eq 2 -a -n "$(grep -l -- '--sg 1.8: outside' "$HS_TMP/e2")"
"$H" calibrate --config "$cfg" --pond x2 --sg 1.2 --conductivity 200 >/dev/null 2>"$HS_TMP/e3"
check "conductivity without temperature: exit 2" test $? -eq 2 -a -s "$HS_TMP/e3"
"$H" calibrate --config "$cfg" --pond x2 --sg 1.2 --time yesterday-ish >/dev/null 2>"$HS_TMP/e4"
check "bad --time: exit 2, names --time" test $? -eq 2 -a -n "$(grep -l -- '--time yesterday-ish' "$HS_TMP/e4")"
"$H" calibrate --config "$cfg" --pond x2 --sg 1.2 --sg-reference-temperature 99 >/dev/null 2>"$HS_TMP/e5"
check "reference temperature out of range: exit 2" test $? -eq 2 -a -s "$HS_TMP/e5"
check "no store written by refused readings" test ! -e "$db"

# ---- readings: three with conductivity for c4, one manual for x2 ----
ok_all=1
for r in "1.100 120 30" "1.150 160 30" "1.190 190 30"; do
    set -- $r
    "$H" calibrate --config "$cfg" --pond c4 --sg "$1" --conductivity "$2" --temperature "$3" \
        --time 5min --operator tester >>"$HS_TMP/rec.txt" 2>&1 || ok_all=0
done
check "three calibration readings recorded" test "$ok_all" -eq 1
"$H" calibrate --config "$cfg" --pond x2 --sg 1.2185 --sg-reference-temperature 60F \
    --operator tester --note "shift 1" >>"$HS_TMP/rec.txt" 2>&1
check "manual reading recorded (60F reference)" test $? -eq 0
check "store rows: 4 readings" test "$(rows 'SELECT count(*) FROM calibration_sample')" = 4
check "60F stored as 15.556 degC" \
    test "$(rows "SELECT printf('%.3f', reference_temperature_c) FROM calibration_sample WHERE pond='x2'")" = 15.556
"$H" calibrate --config "$cfg" --list --pond c4 >"$HS_TMP/list.txt" 2>&1
check "--list --pond c4: header and three rows" test "$(grep -c ' c4 ' "$HS_TMP/list.txt")" -eq 3
"$H" calibrate --config "$cfg" --list --json >"$HS_TMP/list.json" 2>&1
check "--list --json: every reading with its fields" /usr/bin/python3 - "$HS_TMP/list.json" <<'PY'
import json, sys
rows = json.load(open(sys.argv[1]))
assert len(rows) == 4, rows
x2 = [r for r in rows if r["pond"] == "x2"][0]
assert abs(x2["specific_gravity"] - 1.2185) < 1e-12 and x2["conductivity_ms_cm"] is None, x2
assert x2["note"] == "shift 1" and x2["operator"] == "tester", x2
assert sorted(r["conductivity_ms_cm"] for r in rows if r["pond"] == "c4") == [120, 160, 190]
PY

# ---- the daemon uses them ----
"$S" --config "$cfg" --speed 300 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
"$D" --config "$cfg" --log-level info >"$HS_TMP/out.txt" 2>"$HS_TMP/daemon.log" &
HS_PIDS+=($!)
check "daemon fits c4's calibration from 3 readings" \
    hs_wait_file_line "$HS_TMP/daemon.log" 'pond c4: site calibration from 3 hydrometer readings' 15
x2_manual() { [ "$(rows "SELECT count(*) FROM pond_state p JOIN pond n ON n.id = p.pond_id WHERE n.name = 'x2' AND method = 'manual'")" -gt 0 ]; }
for ((i = 0; i < 150; i++)); do x2_manual && break; sleep 0.1; done
check "x2 (crystalliser, conductivity only): state from the manual reading" x2_manual
check "x2 manual state: SG near the reading (1.2185 at 60F/60F; the state is at 20/20 degC)" \
    test "$(rows "SELECT count(*) FROM pond_state p JOIN pond n ON n.id = p.pond_id WHERE n.name = 'x2' AND method = 'manual' AND abs(specific_gravity - 1.2185) < 0.003")" -gt 0
"$H" calibrate --config "$cfg" --pond c4 --sg 1.210 --conductivity 205 --temperature 30 \
    >>"$HS_TMP/rec.txt" 2>&1
check "a new reading while running is picked up (refit from 4)" \
    hs_wait_file_line "$HS_TMP/daemon.log" 'pond c4: site calibration from 4 hydrometer readings' 20
hs_finish
