#!/usr/bin/env bash
# The operator's store commands on a real SQLite file: history (raw and per
# step, checked against the raw data recomputed here), export --csv (units
# in the header, ISO 8601 UTC), and ack through the store's command queue
# to a running process, with its refusals and the no-daemon case.
. "$(dirname "$0")/lib.sh"

CLI="$HS_BUILD/halostage"
FILL="$HS_BUILD/tools/hs_store_fill"
AGENT="$HS_BUILD/tools/hs_outbox_agent"
DB="$HS_TMP/history.db"
CONF="$HS_TMP/site.ini"
cat >"$CONF" <<CONF
[site]
name = test-works
latitude = 10
database = history.db
[bus plc]
type = tcp
host = 127.0.0.1
port = 1502
[pond east-1]
role = concentrator
area = 2 ha
density_in = 1050 kg/m3
density_out = 1150 kg/m3
level_min = 0.2 m
level_max = 0.8 m
[signal east-1.temperature]
bus = plc
address = 10
type = int16
unit = C
CONF

T0=1767225600000 # 2026-01-01T00:00:00Z
"$FILL" --db "$DB" --pond east-1 --start-ms "$T0" --minutes 180 --every-s 10 >"$HS_TMP/fill.log" 2>&1
check "store filled (3 h at 10 s)" grep -q "^wrote 1080" "$HS_TMP/fill.log"

# The same numbers as hs_store_fill, recomputed independently.
expect() {
    /usr/bin/python3 - "$@" <<'PY'
import json, sys
step_s = int(sys.argv[1]); got = json.load(open(sys.argv[2]))
rho = [1100 + 0.01 * i + ((i * 7919) % 13) / 10 for i in range(1080)]
per = step_s // 10
pts = got["points"]
if len(pts) != 1080 // per:
    print("# %d points, expected %d" % (len(pts), 1080 // per)); sys.exit(1)
for k, p in enumerate(pts):
    chunk = rho[k * per:(k + 1) * per]
    d = p["density_kg_m3"]
    if d["count"] != len(chunk) or abs(d["min"] - min(chunk)) > 1e-9 or \
       abs(d["max"] - max(chunk)) > 1e-9 or abs(d["mean"] - sum(chunk) / len(chunk)) > 1e-9:
        print("# bucket", k, d, min(chunk), sum(chunk) / len(chunk), max(chunk)); sys.exit(1)
print("# %d steps match the raw data" % len(pts))
PY
}
"$CLI" history --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T03:00Z --step 1h --json >"$HS_TMP/h1.json"
check "history --step 1h: min/mean/max/count match the raw data" expect 3600 "$HS_TMP/h1.json"
"$CLI" history --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T03:00Z --step 15min --json >"$HS_TMP/h15.json"
check "history --step 15min from the minute rollups" expect 900 "$HS_TMP/h15.json"
"$CLI" history --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T00:10Z >"$HS_TMP/raw.txt"
check "raw history lists every state (60 in 10 min)" \
    test "$(grep -c '^2026-01-01T00:' "$HS_TMP/raw.txt")" -eq 60
"$CLI" history --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T03:00Z --step 1h >"$HS_TMP/h1.txt"
check "text history has one line per hour" test "$(grep -c '^2026-01-01T0' "$HS_TMP/h1.txt")" -eq 3
"$CLI" history --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T03:00Z --limit 5 >"$HS_TMP/lim.txt" 2>"$HS_TMP/lim.err"
check "--limit 5 lists 5 rows (exit 0)" test $? -eq 0 -a "$(grep -c '^2026-01-01T' "$HS_TMP/lim.txt")" -eq 5
check "--limit keeps the latest rows" grep -q '^2026-01-01T02:59:50' "$HS_TMP/lim.txt"
check "--limit says how many were left out" grep -q "showing the last 5 of 1080" "$HS_TMP/lim.err"
"$CLI" history --config "$CONF" --pond west-9 --since 7d >/dev/null 2>"$HS_TMP/unknown.err"
check "unknown pond: exit 2 (a usage error)" test $? -eq 2
check "unknown pond: the message names the known ponds" grep -q "no pond 'west-9'.*(ponds: east-1)" "$HS_TMP/unknown.err"
"$CLI" history --config "$CONF" --pond east-l --since 7d >/dev/null 2>"$HS_TMP/slip.err"
check "a slip gets 'did you mean'" grep -q "did you mean 'east-1'" "$HS_TMP/slip.err"
"$CLI" export --csv --config "$CONF" --pond west-9 >"$HS_TMP/export-unknown.csv" 2>"$HS_TMP/export-unknown.err"
check "export of an unknown pond is refused, not silently empty (exit 2)" test $? -eq 2
check "export names the known ponds" grep -q "no pond 'west-9'" "$HS_TMP/export-unknown.err"
"$CLI" history --config "$CONF" --signal east-1.temprature --since 7d >/dev/null 2>"$HS_TMP/sig.err"
check "an unknown signal gets 'did you mean'" grep -q "did you mean 'east-1.temperature'" "$HS_TMP/sig.err"
check "the reason names the pond" grep -q "west-9" "$HS_TMP/unknown.err"
"$CLI" history --config "$CONF" --pond east-1 --since 7d --step 90s >/dev/null 2>&1
check "a step that is not whole minutes is refused (exit 2)" test $? -eq 2
"$CLI" history --config "$CONF" --pond east-1 --since yesterdayish >/dev/null 2>&1
check "a time that is neither duration nor date is refused (exit 2)" test $? -eq 2

"$CLI" export --csv --config "$CONF" --pond east-1 --since 2026-01-01T00:00Z \
    --until 2026-01-01T01:00Z >"$HS_TMP/out.csv" 2>"$HS_TMP/export.err"
check "export: header carries units" \
    bash -c "head -1 '$HS_TMP/out.csv' | grep -q '^time (UTC ISO 8601),pond,quality,density (kg/m3),temperature (degC)'"
check "export: 360 rows for one hour" test "$(tail -n +2 "$HS_TMP/out.csv" | wc -l)" -eq 360
check "export: ISO 8601 UTC times" \
    bash -c "sed -n 2p '$HS_TMP/out.csv' | grep -q '^2026-01-01T00:00:00.000Z,east-1,good,1100,20,'"
check "export: parses as CSV with equal columns" /usr/bin/python3 -c "
import csv,sys
rows=list(csv.reader(open('$HS_TMP/out.csv')))
sys.exit(0 if len(set(map(len,rows)))==1 and len(rows)==361 else 1)"

# ack: nobody answers yet, then a running process answers through the queue.
"$CLI" ack --config "$CONF" --event 1 --operator ana --wait 300ms >/dev/null 2>"$HS_TMP/ack0.err"
check "ack without a daemon: exit 75 (pending)" test $? -eq 75
check "ack without a daemon says it is queued" grep -q "queued as command" "$HS_TMP/ack0.err"
PORT=$(hs_free_port) # nothing listens there: the agent runs without a broker
"$AGENT" --db "$DB" --uri "mqtt://127.0.0.1:$PORT" --alarms 1 --commands --keep-running \
    --timeout-s 60 >"$HS_TMP/agent.log" 2>&1 &
AGENT_PID=$!
HS_PIDS+=("$AGENT_PID")
hs_wait_file_line "$HS_TMP/agent.log" "^generated 1" 10
journal() { sqlite3 "$DB" "SELECT group_concat(cause) FROM (SELECT cause FROM alarm_journal ORDER BY event_id)"; }
for ((i = 0; i < 100; i++)); do [ "$(journal)" = "condition-raised,acknowledged" ] && break; sleep 0.05; done
check "the ack queued while nobody ran is applied once the process runs" \
    test "$(journal)" = "condition-raised,acknowledged"
"$CLI" ack --config "$CONF" --pond east-1 --rule band --operator ana --wait 10s \
    >"$HS_TMP/ack1.out" 2>&1
check "ack by pond and rule answered (exit 0)" test $? -eq 0
check "it is already acknowledged" grep -q "^ack: already-acknowledged" "$HS_TMP/ack1.out"
"$CLI" ack --config "$CONF" --event 1 --operator ana --wait 10s >"$HS_TMP/ack2.out" 2>&1
check "repeated ack: exit 0" test $? -eq 0
check "repeated ack says nothing changed" grep -q "already-acknowledged" "$HS_TMP/ack2.out"
"$CLI" ack --config "$CONF" --event 999 --operator ana --wait 10s >"$HS_TMP/ack3.out" 2>&1
check "unknown event refused (exit 1)" test $? -eq 1
check "refusal names the event" grep -q "unknown event_id 999" "$HS_TMP/ack3.out"
"$CLI" ack --config "$CONF" --pond east-1 --rule band --shelve 2h --operator ana \
    --note "hydrometer check" --wait 10s >"$HS_TMP/ack4.out" 2>&1
check "shelve from the gateway" grep -q "^shelve: shelved" "$HS_TMP/ack4.out"
check "shelve reports its journal event" grep -q "^event 3$" "$HS_TMP/ack4.out"
check "journal: raise, one ack, the shelve" \
    test "$(sqlite3 "$DB" "SELECT group_concat(cause) FROM (SELECT cause FROM alarm_journal ORDER BY event_id)")" = \
    "condition-raised,acknowledged,shelved"
"$CLI" ack --config "$CONF" --pond east-1 --rule band --shelve 48h --operator ana --wait 10s \
    >"$HS_TMP/ack5.out" 2>&1
check "a shelve beyond max_shelve is refused naming the limit (24 h)" \
    grep -q "longer than its max_shelve of 86400s (24 h)" "$HS_TMP/ack5.out"
# Each mistake on the command line gets its own sentence.
ack_err() {  # EXPECTED-TEXT ARGS...
    local want=$1; shift
    "$CLI" ack "$@" >/dev/null 2>"$HS_TMP/ackerr"
    local rc=$?
    [ "$rc" -eq 2 ] && grep -qF -- "$want" "$HS_TMP/ackerr"
}
check "ack: no --config" ack_err "needs --config FILE" --event 1
check "ack: neither --event nor --pond" ack_err "which alarm?" --config "$CONF"
check "ack: both --event and --pond" ack_err "not both" --config "$CONF" --event 1 --pond east-1
check "ack: --shelve with --unshelve" ack_err "exclude each other" --config "$CONF" \
    --pond east-1 --rule band --shelve 1h --unshelve
check "ack: --shelve by --event" ack_err "not by --event" --config "$CONF" --event 1 --shelve 1h
check "ack: --shelve without --rule" ack_err "--shelve needs --pond POND and --rule RULE" \
    --config "$CONF" --pond east-1 --shelve 1h
check "ack: an unknown pond names the known ones" ack_err "(ponds: east-1)" --config "$CONF" \
    --pond west-9 --operator ana
env -u USER "$CLI" ack --config "$CONF" --event 1 --wait 300ms >/dev/null 2>"$HS_TMP/nouser.err"
check "ack without \$USER takes the login name instead of refusing" \
    bash -c "[ $? -ne 2 ] && ! grep -q 'operator' '$HS_TMP/nouser.err'"
for sub in history "export --csv"; do
    "$CLI" $sub --config "$CONF" --pond east-1 --since yesterday 2>"$HS_TMP/when.err" >/dev/null
    check "${sub%% *}: unreadable --since exits 2" test $? -eq 2
    check "${sub%% *}: the message names the command and the value" \
        grep -q "^halostage ${sub%% *}: 'yesterday' is neither" "$HS_TMP/when.err"
done
printf '[site]\nname = x\nlatitude = 100\n' >"$HS_TMP/bad.ini"
"$CLI" history --config "$HS_TMP/bad.ini" --pond a --since 1d 2>"$HS_TMP/bad.err"
check "bad config: exit 78" test $? -eq 78
check "bad config: FILE:LINE message" grep -q "bad.ini:3:" "$HS_TMP/bad.err"
hs_finish
