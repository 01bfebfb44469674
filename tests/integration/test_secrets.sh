#!/usr/bin/env bash
# Small security gaps closed: `halostaged --check` applies the start-up's
# secret-file checks (a password_file others may read fails the check as it
# fails the start), a password sent over plain mqtt:// to another machine is
# warned about (not on loopback, not over mqtts://), and a new history file
# is created 0640 whatever the umask (its WAL too).
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
pw="$HS_TMP/mqtt.pw"
echo "s3cret" >"$pw"
chmod 0644 "$pw"
site() { # site URI [EXTRA]
    sed -e "s|^database = .*|database = $HS_TMP/history.db|" config/demo.ini
    printf '\n[mqtt]\nuri = %s\nusername = gw\npassword_file = %s\n%s\n' "$1" "$pw" "${2:-}"
}
site mqtt://127.0.0.1:1883 >"$HS_TMP/loop.ini"
"$D" --config "$HS_TMP/loop.ini" --check >"$HS_TMP/c1.out" 2>"$HS_TMP/c1.err"
check "--check: a world-readable password_file fails (exit 78)" test $? -eq 78
check "--check: the message names the file and why" \
    grep -q "password_file $pw: readable or writable by others (mode 644)" "$HS_TMP/c1.err"
check "--check: and the config line" grep -q "^$HS_TMP/loop.ini:[0-9]*: \[mqtt\]" "$HS_TMP/c1.err"
# the daemon refuses the same file at start (what --check now predicts)
"$D" --config "$HS_TMP/loop.ini" --run-for 5 >/dev/null 2>"$HS_TMP/start.err"
check "start: the same file is refused" test $? -ne 0
check "start: with the same reason" grep -q "readable or writable by others" "$HS_TMP/start.err"
chmod 0640 "$pw"
"$D" --config "$HS_TMP/loop.ini" --check >"$HS_TMP/c2.out" 2>"$HS_TMP/c2.err"
check "--check: a private password_file passes" test $? -eq 0
check "--check: no clear-text warning to a loopback broker" \
    bash -c "! grep -q 'in clear' '$HS_TMP/c2.err'"
site mqtt://broker.works.invalid:1883 >"$HS_TMP/clear.ini"
"$D" --config "$HS_TMP/clear.ini" --check >"$HS_TMP/c3.out" 2>"$HS_TMP/c3.err"
check "--check: mqtt:// to another host with a password still passes" test $? -eq 0
check "--check: but warns that the password crosses the network in clear" \
    grep -q "^warning: $HS_TMP/clear.ini:[0-9]*: \[mqtt\] uri mqtt://broker.works.invalid:1883 with password_file: the password crosses the network in clear" "$HS_TMP/c3.err"
printf 'x' >"$HS_TMP/ca.pem"
site mqtts://broker.works.invalid:8883 "ca_file = $HS_TMP/ca.pem" >"$HS_TMP/tls.ini"
"$D" --config "$HS_TMP/tls.ini" --check >"$HS_TMP/c4.out" 2>"$HS_TMP/c4.err"
check "--check: no warning over mqtts://" bash -c "! grep -q 'in clear' '$HS_TMP/c4.err'"

# The history file: 0640 even with umask 000 (SQLite alone gives 0666 & ~umask).
sed -e "s|^database = .*|database = $HS_TMP/fresh.db|" config/demo.ini >"$HS_TMP/nomqtt.ini"
(umask 000; "$D" --config "$HS_TMP/nomqtt.ini" --run-for 2 >/dev/null 2>&1)
check "the daemon created its history file" test -f "$HS_TMP/fresh.db"
check "history file mode 0640 under umask 000 (got $(stat -c %a "$HS_TMP/fresh.db"))" \
    test "$(stat -c %a "$HS_TMP/fresh.db")" = 640
(umask 000; "$HS_BUILD/halostage" status --config "$HS_TMP/nomqtt.ini" >/dev/null 2>&1)
check "a reader leaves the mode alone" test "$(stat -c %a "$HS_TMP/fresh.db")" = 640
hs_finish
