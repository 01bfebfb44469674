#!/usr/bin/env bash
# Storage budget of a gateway: the demo site (config/demo.ini) at its own
# poll intervals and default settings, against the pond-chain simulator
# over real Modbus TCP, with MQTT to a private mosquitto. Prints the bytes
# the daemon wrote to disk (/proc/PID/io write_bytes: the database, its WAL
# and checkpoints), per day, and the history's growth per day and per
# pond-year, from a run of BENCH_STORAGE_S seconds (default 300).
. "$(dirname "$0")/../integration/lib.sh"
D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
secs=${BENCH_STORAGE_S:-300}
mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { echo "mosquitto did not start"; exit 1; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
DB="$HS_TMP/history.db"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s|^database = .*|database = $DB|" config/demo.ini >"$HS_TMP/site.ini"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = bench-storage\n' "$mport" >>"$HS_TMP/site.ini"
"$S" --config "$HS_TMP/site.ini" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || { echo "simulator did not start"; exit 1; }
"$D" --config "$HS_TMP/site.ini" --log-level warning 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
# Warm-up: the file exists and the first states are in; then measure.
for ((i = 0; i < 600; i++)); do [ -s "$DB" ] && break; sleep 0.1; done
sleep 20 # warm-up period of the measurement itself, not a wait for a condition
wb() { awk '/^write_bytes:/ {print $2}' "/proc/$dpid/io"; }
# the history's logical size (pages in use, WAL included), not the files'
# size: the WAL file grows to its checkpoint size and stays there
size() { sqlite3 -cmd ".timeout 5000" "$DB" "SELECT page_count * page_size FROM pragma_page_count(), pragma_page_size()"; }
rows() { sqlite3 "$DB" "SELECT (SELECT count(*) FROM sample) + (SELECT count(*) FROM pond_state)"; }
w0=$(wb); s0=$(size); t0=$(date +%s)
sleep "$secs" # the measured period
w1=$(wb); s1=$(size); t1=$(date +%s)
kill -TERM "$dpid"; wait "$dpid"
dt=$((t1 - t0))
ponds=$(grep -c '^\[pond ' config/demo.ini)
per_day_w=$(( (w1 - w0) * 86400 / dt ))
per_day_s=$(( (s1 - s0) * 86400 / dt ))
samples=$(sqlite3 "$DB" "SELECT count(*) FROM sample")
states=$(sqlite3 "$DB" "SELECT count(*) FROM pond_state")
real=$(sqlite3 "$DB" "SELECT coalesce(sum(n), 0) FROM rollup WHERE step_s = 60 AND series_id IN (SELECT id FROM series WHERE name NOT LIKE '%:%')")
echo "storage: demo site ($ponds ponds), ${dt} s measured"
echo "storage: written to disk $(( (w1 - w0) / 1024 )) KiB = $(( per_day_w / 1048576 )) MiB/day (goal <= 50)"
echo "storage: history grew $(( (s1 - s0) / 1024 )) KiB = $(( per_day_s / 1048576 )) MiB/day, $(( per_day_s * 365 / ponds / 1048576 )) MiB per pond-year"
echo "storage: rows kept: $samples raw samples, $states pond states; samples rolled up: $real"
