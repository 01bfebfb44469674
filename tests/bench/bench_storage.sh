#!/usr/bin/env bash
# Storage budget of a gateway: the demo site (config/demo.ini) at its own
# poll intervals and default settings, against the pond-chain simulator
# over real Modbus TCP, with MQTT to a private mosquitto. Prints the bytes
# the daemon wrote to disk (/proc/PID/io write_bytes: the database, its WAL,
# its shared-memory index and checkpoints), per day, and the history's
# growth per day and per pond-year, from a run of BENCH_STORAGE_S seconds
# (default 960: one pass of the 1-minute rollups, written every 15 min, is
# inside the window).
#
# The history starts aged: a first short run creates the series, then
# BENCH_STORAGE_AGE_DAYS (default 2) days of 1-minute and 1-hour rollups are
# put in for every series, so that each series' rollups fill pages of their
# own as on a site that has run for a while (a fresh file packs every series
# into a few shared pages and writes far less per pass than a real one).
# (values with fractions: SQLite stores a whole-number REAL as an integer,
# which would make the rows look smaller than they are.)
# BENCH_STORAGE_MQTT=off runs without MQTT: the difference is the outbox's
# share of the writes.
. "$(dirname "$0")/../integration/lib.sh"
D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
secs=${BENCH_STORAGE_S:-960}
age_days=${BENCH_STORAGE_AGE_DAYS:-2}
mqtt=${BENCH_STORAGE_MQTT:-on}
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { echo "mosquitto did not start"; exit 1; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
DB="$HS_TMP/history.db"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s|^database = .*|database = $DB|" config/demo.ini >"$HS_TMP/site.ini"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = bench-storage\n' "$mport" >>"$HS_TMP/site.ini"
[ "$mqtt" = off ] && echo "enabled = no" >>"$HS_TMP/site.ini"
"$S" --config "$HS_TMP/site.ini" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || { echo "simulator did not start"; exit 1; }
q() { sqlite3 -cmd ".timeout 5000" "$DB" "$1"; }
# KiB written (/proc/self/io) by SQLite doing the given statements in one
# transaction, as the daemon's maintenance does, then a checkpoint (the same library the daemon uses;
# the daemon may be running: the checkpoint copies what its WAL holds).
cat >"$HS_TMP/io.py" <<'PY'
import sqlite3, sys
def wb():
    with open("/proc/self/io") as f:
        return next(int(l.split()[1]) for l in f if l.startswith("write_bytes:"))
db = sqlite3.connect(sys.argv[1], isolation_level=None, timeout=10)
db.execute("PRAGMA secure_delete = FAST") # as the daemon's connection
w0 = wb()
if len(sys.argv) > 2:
    db.execute("BEGIN IMMEDIATE")
    for sql in sys.argv[2:]:
        db.execute(sql)
    db.execute("COMMIT")
db.execute("PRAGMA wal_checkpoint(PASSIVE)")
print((wb() - w0) // 1024)
PY
sqlio() { /usr/bin/python3 "$HS_TMP/io.py" "$DB" "$@"; }

# The first run: every signal's first sample and every pond's first state
# create their series.
"$D" --config "$HS_TMP/site.ini" --log-level warning 2>"$HS_TMP/daemon0.log" &
dpid=$!
HS_PIDS+=("$dpid")
for ((i = 0; i < 1200; i++)); do
    [ "$(q "SELECT count(*) FROM pond_state" 2>/dev/null || echo 0)" -ge 9 ] && break
    sleep 0.1
done
kill -TERM "$dpid"; wait "$dpid"
series=$(q "SELECT count(*) FROM series")
if [ "$age_days" -gt 0 ]; then
    now_ms=$(($(date +%s) * 1000))
    # one table per UTC day, as the daemon keeps them
    hour_cut=$((now_ms / 3600000 * 3600000 - 3600000))
    for ((d = (now_ms - age_days * 86400000) / 86400000; d <= now_ms / 86400000; d++)); do
        q "CREATE TABLE IF NOT EXISTS rollup_minute_$d(t_ms INTEGER NOT NULL,
           series_id INTEGER NOT NULL, n INTEGER NOT NULL, vmin REAL, vsum REAL, vmax REAL,
           worst INTEGER NOT NULL, PRIMARY KEY(t_ms, series_id)) STRICT, WITHOUT ROWID;
           WITH RECURSIVE m(t) AS (SELECT max($d * 86400000, ($now_ms - $age_days * 86400000)
                                              / 60000 * 60000)
                                   UNION ALL SELECT t + 60000 FROM m WHERE t + 60000 < $now_ms - 120000
                                   AND t + 60000 < ($d + 1) * 86400000)
           INSERT OR IGNORE INTO rollup_minute_$d(series_id, t_ms, n, vmin, vsum, vmax, worst)
           SELECT s.id, m.t, 6, 1000.1 + s.id / 7.0, 6 * (1000.3 + s.id / 7.0),
           1000.7 + s.id / 7.0, 0 FROM series s CROSS JOIN m WHERE m.t < $now_ms - 120000
           ORDER BY m.t, s.id;
           INSERT OR IGNORE INTO rollup_hour(series_id, t_ms, n, vmin, vsum, vmax, worst)
           SELECT series_id, t_ms / 3600000 * 3600000, sum(n), min(vmin), sum(vsum), max(vmax), 0
           FROM rollup_minute_$d WHERE t_ms < $hour_cut GROUP BY 1, 2 ORDER BY 1, 2"
    done
    # the hours are folded up to there; the later ones are read from the minutes
    q "INSERT INTO store_meta(key, value) VALUES('rollup_hour_done_ms',
       $now_ms / 3600000 * 3600000 - 3600000)
       ON CONFLICT(key) DO UPDATE SET value = excluded.value"
    q "PRAGMA wal_checkpoint(TRUNCATE)" >/dev/null
fi
aged_size=$(q "SELECT page_count * page_size FROM pragma_page_count(), pragma_page_size()")

"$D" --config "$HS_TMP/site.ini" --log-level warning 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
sleep 20 # warm-up period of the measurement itself, not a wait for a condition
wb() { awk '/^write_bytes:/ {print $2}' "/proc/$dpid/io"; }
# the history's logical size (pages in use), not the files' size: the WAL
# file grows to its checkpoint size and stays there
size() { q "SELECT (page_count - freelist_count) * page_size FROM pragma_page_count(),
            pragma_freelist_count(), pragma_page_size()"; }
counts() { q "SELECT (SELECT count(*) FROM sample) || ' ' || (SELECT count(*) FROM pond_state)
              || ' ' || (SELECT count(*) FROM rollup WHERE step_s = 60)"; }
aged_rows=$(q "SELECT count(*) FROM rollup") # the daemon's start put the aged days in the view
sqlio >/dev/null # what the start wrote is in the file: the end's checkpoint copies the window's
w0=$(wb); s0=$(size); c0=($(counts)); t0=$(date +%s)
sleep "$secs" # the measured period
w1=$(wb); t1=$(date +%s)
ckpt=$(sqlio) # the checkpoint of the window's WAL (the daemon's own comes every 4000 pages)
kill -TERM "$dpid"; wait "$dpid" # the clean stop writes the minutes held in memory
s1=$(size); c1=($(counts))
dt=$((t1 - t0))
ponds=$(grep -c '^\[pond ' config/demo.ini)
per_day_w=$(( (w1 - w0) * 86400 / dt ))
per_day_s=$(( (s1 - s0) * 86400 / dt ))
d_samples=$((c1[0] - c0[0])); d_states=$((c1[1] - c0[1])); d_minutes=$((c1[2] - c0[2]))
echo "storage: demo site ($ponds ponds, $series series, MQTT $mqtt), ${dt} s measured on a" \
     "history aged $age_days days ($aged_rows rollup rows, $((aged_size / 1048576)) MiB)"
per_day_c=$(( ckpt * 1024 * 86400 / dt ))
echo "storage: written to disk $(( (w1 - w0) / 1024 )) KiB = $(( per_day_w / 1048576 )) MiB/day," \
     "and its checkpoint $ckpt KiB = $(( per_day_c / 1048576 )) MiB/day"
echo "storage: history grew $(( (s1 - s0) / 1024 )) KiB = $(( per_day_s / 1048576 )) MiB/day," \
     "$(( per_day_s * 365 / ponds / 1048576 )) MiB per pond-year"
echo "storage: rows added: $d_samples raw samples ($(( d_samples * 86400 / dt ))/day)," \
     "$d_states pond states ($(( d_states * 86400 / dt ))/day), $d_minutes 1-minute rollups"
real=$(q "SELECT coalesce(sum(n), 0) FROM rollup WHERE step_s = 60 AND t_ms >= $t0 * 1000
          AND series_id IN (SELECT id FROM series WHERE name NOT LIKE '%:%')")
echo "storage: samples counted in the rollups since the start: $real"
if [ "$age_days" -gt 0 ]; then
    # bytes per rollup row as stored (pages of the rollup table and its key)
    per_row=$(q "SELECT sum(pgsize) / (SELECT count(*) FROM rollup) FROM dbstat
                 WHERE name GLOB 'rollup_minute_[0-9]*' OR name = 'rollup_hour'" 2>/dev/null)
    [ -n "$per_row" ] && echo "storage: $per_row bytes per rollup row on disk"
fi
# What the operators' page reads: one pond's day at 5-minute steps from the
# 1-minute rollups (kept in time order, one table a day, so the day of
# every series is read and filtered) and its week at 1-hour steps.
pond=$(q "SELECT name FROM pond ORDER BY name LIMIT 1")
for view in "1d 5min" "7d 1h"; do
    set -- $view
    a=$(date +%s%N)
    pts=$("$HS_BUILD/halostage" history --config "$HS_TMP/site.ini" --pond "$pond" --since "$1" \
          --step "$2" | grep -c .)
    b=$(date +%s%N)
    echo "storage: history of $pond over $1 at $2 steps: $pts lines in $(( (b - a) / 1000000 )) ms"
done
# Not inside the window: the daily fold of the minutes into hours (the
# last aged day's hours are taken out, then folded again the daemon's way)
# and, at the steady state, retention dropping a day's table of 1-minute
# rollups (108 series x 1440 rows; the history here is aged only two days).
if [ "$age_days" -gt 1 ]; then
    day_end=$(q "SELECT max(t_ms) + 3600000 FROM rollup_hour")
    day_start=$((day_end - 86400000))
    sqlio "DELETE FROM rollup_hour WHERE t_ms >= $day_start AND t_ms < $day_end" >/dev/null
    hours=()
    for ((h = day_start; h < day_end; h += 3600000)); do
        hours+=("INSERT INTO rollup_hour(series_id, t_ms, n, vmin, vsum, vmax, worst)
                 SELECT series_id, (t_ms / 3600000) * 3600000, sum(n), min(vmin), total(vsum),
                 max(vmax), max(worst) FROM rollup_minute_$((h / 86400000)) WHERE t_ms >= $h
                 AND t_ms < $h + 3600000 GROUP BY series_id, t_ms / 3600000 ORDER BY series_id")
    done
    fold=$(sqlio "${hours[@]}")
    full_day=$((now_ms / 86400000 - 1)) # aged whole
    deleted=$(q "SELECT count(*) FROM rollup_minute_$full_day")
    ret=$(sqlio "DROP TABLE rollup_minute_$full_day")
    total=$(( per_day_w + per_day_c + (fold + ret) * 1024 ))
    echo "storage: the daily fold into hours $fold KiB; retention dropping a day of 1-minute" \
         "rollups ($deleted rows) $ret KiB"
    echo "storage: per day at the steady state: $(( total / 1048576 )) MiB" \
         "= $(( total / 1000000 )) MB written (goal <= 50 MB)"
fi
