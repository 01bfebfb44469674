#!/usr/bin/env bash
# halostage backup against a history file that a writer keeps committing to:
# the copy passes integrity_check, holds every row committed before it began,
# is one file of mode 0640 whatever the umask, and restores into a working
# store; existing copies and the live file itself are refused.
. "$(dirname "$0")/lib.sh"

CLI="$HS_BUILD/halostage"
FILL="$HS_BUILD/tools/hs_store_fill"
DB="$HS_TMP/history.db"
CONF="$HS_TMP/site.ini"
write_conf() {  # FILE DATABASE
    cat >"$1" <<CONF
[site]
name = test-works
latitude = 10
database = $2
[bus plc]
type = tcp
host = 127.0.0.1
port = 1502
[pond east-1]
role = concentrator
area = 2 ha
[signal east-1.temperature]
bus = plc
address = 10
type = int16
unit = C
CONF
}
write_conf "$CONF" history.db
rows() { sqlite3 -cmd ".timeout 5000" "$1" "$2"; }

# A writer that commits pond states in batches for far longer than the test.
T0=1767225600000
"$FILL" --db "$DB" --pond east-1 --start-ms "$T0" --minutes 500000 --every-s 1 \
    >"$HS_TMP/fill.log" 2>&1 &
WRITER=$!
HS_PIDS+=("$WRITER")
for ((i = 0; i < 600; i++)); do
    n=$(rows "$DB" "SELECT count(*) FROM pond_state" 2>/dev/null || echo 0)
    [ "${n:-0}" -ge 20000 ] && break
    sleep 0.05
done
check "the writer is committing (${n:-0} states so far)" test "${n:-0}" -ge 20000

# What was committed before the backup began: rows are written in time order,
# so the rows up to the latest committed time are exactly those.
IFS='|' read -r before_n before_t < <(rows "$DB" "SELECT count(*), max(t_ms) FROM pond_state")
umask 022
"$CLI" backup --config "$CONF" --to "$HS_TMP/copy.db" >"$HS_TMP/backup.out" 2>&1
rc=$?
cat "$HS_TMP/backup.out" | sed 's/^/# /'
check "backup exits 0 while the writer writes" test "$rc" -eq 0
check "the writer was still writing after the copy" kill -0 "$WRITER"
check "the copy passes integrity_check" test "$(rows "$HS_TMP/copy.db" "PRAGMA integrity_check")" = ok
check "the copy holds every state committed before it began ($before_n)" \
    test "$(rows "$HS_TMP/copy.db" "SELECT count(*) FROM pond_state WHERE t_ms <= $before_t")" -eq "$before_n"
after_n=$(rows "$HS_TMP/copy.db" "SELECT count(*) FROM pond_state")
check "the copy is one snapshot: no gap after the last row ($after_n rows)" \
    test "$(rows "$HS_TMP/copy.db" "SELECT (max(t_ms) - min(t_ms)) / 1000 + 1 FROM pond_state")" -eq "$after_n"
check "the copy is a single file (no -wal beside it)" test ! -e "$HS_TMP/copy.db-wal"
check "the copy is mode 0640 under umask 022" test "$(stat -c %a "$HS_TMP/copy.db")" = 640
check "the copy has the live schema version" \
    test "$(rows "$HS_TMP/copy.db" "PRAGMA user_version")" = "$(rows "$DB" "PRAGMA user_version")"
check "the report says how to restore" grep -q "to restore it" "$HS_TMP/backup.out"
check "no partial file is left" test ! -e "$HS_TMP/copy.db.partial"

"$CLI" backup --config "$CONF" --to "$HS_TMP/copy.db" >"$HS_TMP/again.out" 2>&1
rc=$?
check "an existing copy is refused (exit 1, says --force)" \
    bash -c "[ $rc -eq 1 ] && grep -q -- 'exists.*--force' '$HS_TMP/again.out'"
check "the refused copy is untouched" \
    test "$(rows "$HS_TMP/copy.db" "SELECT count(*) FROM pond_state")" -eq "$after_n"
"$CLI" backup --config "$CONF" --to "$HS_TMP/copy.db" --force >/dev/null 2>&1
check "--force replaces it with a newer snapshot" \
    test "$(rows "$HS_TMP/copy.db" "SELECT count(*) FROM pond_state")" -ge "$after_n"
"$CLI" backup --config "$CONF" --to "$DB" --force >"$HS_TMP/self.out" 2>&1
rc=$?
check "the live database itself is refused" \
    bash -c "[ $rc -eq 1 ] && grep -q 'live database itself' '$HS_TMP/self.out'"
"$CLI" backup --config "$CONF" >"$HS_TMP/usage.out" 2>&1
check "a missing --to is a usage error (exit 2)" test $? -eq 2
"$CLI" backup --config "$HS_TMP/none.ini" --to "$HS_TMP/x.db" >/dev/null 2>&1
check "an unreadable site file exits 78" test $? -eq 78
mkdir -p "$HS_TMP/ro" && chmod 0555 "$HS_TMP/ro"
"$CLI" backup --config "$CONF" --to "$HS_TMP/ro/sub/x.db" >"$HS_TMP/ro.out" 2>&1
rc=$?
check "an unwritable destination fails naming it (exit 1)" \
    bash -c "[ $rc -eq 1 ] && grep -q 'ro/sub/x.db' '$HS_TMP/ro.out'"

kill "$WRITER" 2>/dev/null
wait "$WRITER" 2>/dev/null
# Restore as the report says, into another site folder, and read it back.
mkdir -p "$HS_TMP/restored"
cp "$HS_TMP/copy.db" "$HS_TMP/restored/history.db"
write_conf "$HS_TMP/restored/site.ini" history.db
"$CLI" history --config "$HS_TMP/restored/site.ini" --pond east-1 --since 2026-01-01 \
    --until 2026-01-01T00:10 >"$HS_TMP/hist.out" 2>&1
check "the restored copy answers history" grep -q "1100" "$HS_TMP/hist.out"
hs_finish
