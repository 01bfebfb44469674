#!/usr/bin/env bash
# The generic host halostaged with small test plugins: ABI refusal, signals,
# reload that keeps the old config on error, sd_notify and the watchdog.
# The real plugin's end-to-end run is in test_e2e.sh.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
P="$HS_BUILD/tests/plugins"

# -- ABI: a plugin that speaks only version 99 is refused, clearly
echo "label = a" >"$HS_TMP/counter.conf"
"$D" --plugin "$P/plugin_future_abi.so" --config "$HS_TMP/counter.conf" 2>"$HS_TMP/abi.err"
rc=$?
check "future-ABI plugin refused with exit 69 (got $rc)" test "$rc" -eq 69
check "refusal names the versions" grep -q "refused: it speaks none of this host's ABI versions (host offers 1): this plugin speaks ABI version 99 only" "$HS_TMP/abi.err"
HS_TEST_PLUGIN_LIE=1 "$D" --plugin "$P/plugin_future_abi.so" --config "$HS_TMP/counter.conf" 2>"$HS_TMP/lie.err"
rc=$?
check "plugin picking a version not offered is refused (got $rc)" test "$rc" -eq 69
check "that refusal says so" grep -q "picked ABI version 99, which this host did not offer" "$HS_TMP/lie.err"
"$D" --plugin "$HS_TMP/counter.conf" --config "$HS_TMP/counter.conf" 2>"$HS_TMP/notso.err"
rc=$?
check "a file that is no shared object is refused (got $rc)" test "$rc" -eq 69
check "and named" grep -q "cannot load plugin $HS_TMP/counter.conf" "$HS_TMP/notso.err"
# the real plugin exports the entry points and nothing of its insides
if [ -f plugin/hs_plugin.c ]; then
    exports=$(nm -D --defined-only "$HS_BUILD/halostage.so" | awk '$2 ~ /^[TDBR]$/ {print $3}' | sort | tr '\n' ' ')
    check "halostage.so exports only the ABI entry points ($exports)" \
        test "$exports" = "halostage_plugin_v1 halostage_plugin_version "
fi

# -- bad config at start: exit 78, reason on stderr
echo "nonsense" >"$HS_TMP/bad.conf"
"$D" --plugin "$P/plugin_counter.so" --config "$HS_TMP/bad.conf" 2>"$HS_TMP/bad.err"
rc=$?
check "invalid config at start exits 78 (got $rc)" test "$rc" -eq 78
check "with file:line" grep -q "bad.conf:1: not understood" "$HS_TMP/bad.err"

# -- service: notify socket, watchdog, reload, stop
notify_sock="$HS_TMP/notify.sock"
/usr/bin/python3 - "$notify_sock" "$HS_TMP/notify.log" <<'PY' &
import socket, sys
s = socket.socket(socket.AF_UNIX, socket.SOCK_DGRAM)
s.bind(sys.argv[1])
with open(sys.argv[2], "a", buffering=1) as out:
    out.write("listening\n")
    while True:
        data = s.recv(4096).decode()
        for line in data.split("\n"):
            out.write(line + "\n")
        if "STOPPING=1" in data:
            break
PY
HS_PIDS+=($!)
hs_wait_file_line "$HS_TMP/notify.log" '^listening' 10 || not_ok "notify listener did not start"

NOTIFY_SOCKET="$notify_sock" WATCHDOG_USEC=400000 \
    "$D" --plugin "$P/plugin_counter.so" --config "$HS_TMP/counter.conf" --emit-stdout \
    >"$HS_TMP/out.txt" 2>"$HS_TMP/err.txt" &
dpid=$!
HS_PIDS+=("$dpid")
check "READY=1 sent" hs_wait_file_line "$HS_TMP/notify.log" '^READY=1' 10
check "values emitted through the host" hs_wait_file_line "$HS_TMP/out.txt" '^counter/a good [0-9]+' 10
check "STATUS line from the plugin" hs_wait_file_line "$HS_TMP/notify.log" '^STATUS=counting a' 10
# five pings at 200 ms need about a second; allow ten
for ((i = 0; i < 200; i++)); do
    [ "$(grep -c '^WATCHDOG=1' "$HS_TMP/notify.log")" -ge 5 ] && break
    sleep 0.05
done
check "watchdog pinged at half the interval" test "$(grep -c '^WATCHDOG=1' "$HS_TMP/notify.log")" -ge 5

# broken config on reload: refused, old one keeps running
echo "label = b" >"$HS_TMP/counter.conf"
echo "garbage here" >>"$HS_TMP/counter.conf"
kill -HUP "$dpid"
check "broken reload refused" hs_wait_file_line "$HS_TMP/err.txt" 'reload refused .*still running on the previous configuration' 10
check "reason names file and line" grep -q "counter.conf:2: not understood" "$HS_TMP/err.txt"
n_before=$(grep -c '^counter/a ' "$HS_TMP/out.txt")
for ((i = 0; i < 100; i++)); do
    [ "$(grep -c '^counter/a ' "$HS_TMP/out.txt")" -gt "$((n_before + 2))" ] && break
    sleep 0.05
done
check "old configuration still in force after the refused reload" test "$(grep -c '^counter/a ' "$HS_TMP/out.txt")" -gt "$((n_before + 2))"
check "no value under the broken config's label" test "$(grep -c '^counter/b ' "$HS_TMP/out.txt")" -eq 0
check "RELOADING=1 sent" grep -q '^RELOADING=1' "$HS_TMP/notify.log"

# valid change: takes effect
echo "label = b" >"$HS_TMP/counter.conf"
kill -HUP "$dpid"
check "valid reload takes effect" hs_wait_file_line "$HS_TMP/out.txt" '^counter/b good' 10
check "READY=1 again after reload" test "$(grep -c '^READY=1' "$HS_TMP/notify.log")" -ge 3

# clean stop
kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "SIGTERM: clean exit 0 (got $rc)" test "$rc" -eq 0
check "plugin closed (its flush ran) before exit" grep -q '^counter/b/closed good' "$HS_TMP/out.txt"
check "STOPPING=1 sent" grep -q '^STOPPING=1' "$HS_TMP/notify.log"
check "log lines carry levels" grep -q '^halostaged: notice: stopped cleanly' "$HS_TMP/err.txt"

# journald form: <N> priority prefixes
JOURNAL_STREAM=1:1 "$D" --plugin "$P/plugin_counter.so" --config "$HS_TMP/counter.conf" \
    --run-for 1 >/dev/null 2>"$HS_TMP/journal.err"
check "under journald lines start with <priority>" grep -q '^<5>stopped cleanly' "$HS_TMP/journal.err"
check "--run-for stops by itself" grep -q 'run time of 1s reached' "$HS_TMP/journal.err"

"$D" --config 2>/dev/null
check "usage error exits 2" test $? -eq 2
hs_finish
