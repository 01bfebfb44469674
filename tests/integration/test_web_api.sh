#!/usr/bin/env bash
# /api/v1 of the operators' page against the simulator: every endpoint, bad
# input (400 naming the field), unauthorised writes (401/403), login
# slow-down, CSRF and origin checks, reload with public_view and HTTPS; and
# the [web] checks of --check and `halostage user`.
set -u
cd "$(dirname "$0")/../.."
. tests/integration/lib.sh
. tests/integration/web_lib.sh
D=$HS_BUILD/halostaged
H=$HS_BUILD/halostage

# --check refuses what must not run
conf=$HS_TMP/check.ini
cp config/demo.ini "$conf"
printf '\n[web]\nlisten = 0.0.0.0:8480\n' >>"$conf"
out=$("$D" --config "$conf" --check 2>&1); rc=$?
check "--check refuses a non-loopback listen without users_file (78, names listen)" \
    test "$rc" -eq 78 -a -n "$(echo "$out" | grep -E ':[0-9]+: listen: 0.0.0.0:8480 is reachable')"
sed -i 's/^listen = .*/listen = 127.0.0.1:8480\ntls_cert = x.pem/' "$conf"
out=$("$D" --config "$conf" --check 2>&1); rc=$?
check "--check refuses tls_cert without tls_key" test "$rc" -eq 78 -a -n "$(echo "$out" | grep 'tls_cert and tls_key go together')"
sed -i 's/^listen = .*/listen = localhost:80/; /^tls_cert/d' "$conf"
out=$("$D" --config "$conf" --check 2>&1); rc=$?
check "--check refuses a listen that is not a numeric address" test "$rc" -eq 78 -a -n "$(echo "$out" | grep 'listen:.*numeric')"

# halostage user
conf=$HS_TMP/users.ini
cp config/demo.ini "$conf"
printf '\n[web]\nlisten = 127.0.0.1:8480\nusers_file = people\n' >>"$conf"
check "user add reads the password from stdin" sh -c "printf 'a-long-secret\n' | '$H' user --config '$conf' add mara --role operator >/dev/null"
check "the users file holds a yescrypt hash, never the password" \
    sh -c "grep -q '^mara operator \\\$y\\\$' '$HS_TMP/people' && ! grep -q a-long-secret '$HS_TMP/people'"
check "user list shows name and role" sh -c "'$H' user --config '$conf' list | grep -Eq '^mara +operator$'"
out=$(printf 'short\n' | "$H" user --config "$conf" add ben --role viewer 2>&1); rc=$?
check "a password under 8 characters is refused" test "$rc" -eq 2 -a -n "$(echo "$out" | grep 'at least 8')"
out=$(printf 'a-long-secret\n' | "$H" user --config "$conf" add ben --role boss 2>&1); rc=$?
check "an unknown role is refused" test "$rc" -eq 2
out=$(printf 'a-long-secret\n' | "$H" user --config "$conf" add 'b n' --role viewer 2>&1); rc=$?
check "a name with a blank is refused" test "$rc" -eq 2 -a -n "$(echo "$out" | grep "user name 'b n'")"
check "user remove" sh -c "'$H' user --config '$conf' remove mara >/dev/null && '$H' user --config '$conf' list --json | grep -qx '\\[\\]'"
out=$("$H" user --config "$conf" remove mara 2>&1); rc=$?
check "removing a missing user fails and says so" test "$rc" -eq 1 -a -n "$(echo "$out" | grep "no user 'mara'")"
out=$("$H" user --config config/demo.ini list 2>&1); rc=$?
check "user without [web] users_file: 78 and why" test "$rc" -eq 78 -a -n "$(echo "$out" | grep 'no \[web\] users_file')"

# a page that cannot listen (port taken) leaves the ponds watched
busy=$(hs_free_port)
/usr/bin/python3 -c 'import socket,sys,time; s=socket.socket(); s.bind(("127.0.0.1",int(sys.argv[1]))); s.listen(); time.sleep(120)' "$busy" &
HS_PIDS+=($!)
hs_wait_port "$busy" 10
mkdir -p "$HS_TMP/busy"
sed -e "s/^port = 15020/port = $(hs_free_port)/" -e "s/^port = 15021/port = $(hs_free_port)/" \
    config/demo.ini >"$HS_TMP/busy/site.ini"
printf '\n[web]\nlisten = 127.0.0.1:%s\n' "$busy" >>"$HS_TMP/busy/site.ini"
"$D" --config "$HS_TMP/busy/site.ini" 2>"$HS_TMP/busy/log" &
bpid=$!
HS_PIDS+=("$bpid")
check "with its port taken, the page is off and says so in the log" \
    hs_wait_file_line "$HS_TMP/busy/log" "\[web\] could not start; running without the page" 20
check "... and the daemon runs on, watching the ponds" kill -0 "$bpid"
kill -TERM "$bpid"; wait "$bpid"
check "... and stops cleanly" test $? -eq 0

if ! hs_web_site; then
    not_ok "the simulator and halostaged with [web] start"
    tail -5 "$HS_TMP/halostaged.log"
    hs_finish
fi
HS_WEB_URL=$HS_WEB_URL HS_WEB_CONF=$HS_WEB_CONF HS_WEB_PID=$HS_WEB_DAEMON_PID HS_WEB_TMP=$HS_TMP \
    HS_BUILD=$HS_BUILD timeout 300 /usr/bin/python3 tests/integration/web_api.py
[ $? -eq 0 ] || { hs_failed=1; tail -5 "$HS_TMP/halostaged.log"; }
hs_web_stop_daemon
hs_finish
