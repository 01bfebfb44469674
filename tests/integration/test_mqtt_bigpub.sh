#!/usr/bin/env bash
# Inbound size is bounded before it is read: the daemon tells the broker its
# Maximum Packet Size (MQTT 5 CONNECT), so a 128 MB publish on a command
# topic never reaches it. Its peak RSS (VmHWM from /proc) may not grow by
# more than a few MB, and it goes on answering commands. A real mosquitto.
# (Without the limit the same publish raised the peak by 262 MB.)
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
for tool in mosquitto mosquitto_sub mosquitto_pub; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done
mport=$(hs_free_port)
hs_start_mosquitto "$mport" "log_type all" || { not_ok "mosquitto did not start"; hs_finish; }
LOG="$HS_TMP/mosquitto-$mport.log"
cfg="$HS_TMP/site.ini"
sed -e "s|^database = .*|database = $HS_TMP/history.db|" config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = bigpub\n' "$mport" >>"$cfg"
"$D" --config "$cfg" 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
hs_wait_file_line "$LOG" "bigpub 1 halostage/demo-works/command/#" 20 ||
    not_ok "the daemon subscribed to its commands"
check "the daemon asked for a packet limit at connect (MQTT 5)" \
    hs_wait_file_line "$LOG" "New client connected from .* as bigpub \\(p5," 5
mosquitto_sub -h 127.0.0.1 -p "$mport" -q 1 -v -i big-watch -t halostage/demo-works/error \
    -W 120 >"$HS_TMP/errors.txt" 2>/dev/null &
HS_PIDS+=($!)
hs_wait_file_line "$LOG" "big-watch 1 halostage/demo-works/error" 10
hwm() { awk '/^VmHWM:/ {print $2}' "/proc/$dpid/status"; }
# let start-up allocations settle: a first (small, refused) command answered
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t halostage/demo-works/command/first -m '{}'
hs_wait_file_line "$HS_TMP/errors.txt" '"command":"first"' 20
before=$(hwm)
head -c $((128 * 1024 * 1024)) /dev/zero | tr '\0' 'x' >"$HS_TMP/big.bin"
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t halostage/demo-works/command/ack -f "$HS_TMP/big.bin"
check "128 MB publish accepted by the broker" test $? -eq 0
rm -f "$HS_TMP/big.bin"
# a command after the big one is answered: the daemon is alive and past it
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t halostage/demo-works/command/after -m '{}'
check "a command after it is answered" hs_wait_file_line "$HS_TMP/errors.txt" '"command":"after"' 60
after=$(hwm)
grow=$((after - before))
echo "# peak RSS (VmHWM) before ${before} kB, after ${after} kB: +${grow} kB"
check "peak RSS grew by ${grow} kB (limit 4096 kB) under a 128 MB publish" test "$grow" -le 4096
kill -TERM "$dpid"; wait "$dpid"
check "clean stop" test $? -eq 0
hs_finish
