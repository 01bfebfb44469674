#!/usr/bin/env bash
# MQTT over TLS with a password file, against a real mosquitto: certificates
# made with openssl here, the broker verified by its CA (host checked), the
# password read from a file that others may not read. Wrong CA, wrong
# password and an exposed password file are refused, and nothing is lost.
. "$(dirname "$0")/lib.sh"

AGENT="$HS_BUILD/tools/hs_outbox_agent"
D="$HS_TMP/tls"
mkdir -p "$D"

# A CA, a broker certificate for 127.0.0.1, and a second CA that signed nothing.
mkcert() {
    openssl req -x509 -newkey ec -pkeyopt ec_paramgen_curve:prime256v1 -nodes -days 2 -subj "/CN=halostage test CA" \
        -keyout "$D/ca.key" -out "$D/ca.pem" &&
    openssl req -newkey ec -pkeyopt ec_paramgen_curve:prime256v1 -nodes -subj "/CN=127.0.0.1" \
        -keyout "$D/server.key" -out "$D/server.csr" &&
    printf 'subjectAltName=IP:127.0.0.1,DNS:localhost\n' >"$D/san.ext" &&
    openssl x509 -req -in "$D/server.csr" -CA "$D/ca.pem" -CAkey "$D/ca.key" \
        -CAcreateserial -days 2 -extfile "$D/san.ext" -out "$D/server.pem" &&
    openssl req -x509 -newkey ec -pkeyopt ec_paramgen_curve:prime256v1 -nodes -days 2 -subj "/CN=another CA" \
        -keyout "$D/other.key" -out "$D/other.pem" &&
    openssl req -newkey ec -pkeyopt ec_paramgen_curve:prime256v1 -nodes -subj "/CN=gateway-7" \
        -keyout "$D/client.key" -out "$D/client.csr" &&
    openssl x509 -req -in "$D/client.csr" -CA "$D/ca.pem" -CAkey "$D/ca.key" \
        -CAcreateserial -days 2 -out "$D/client.pem"
}
mkcert >"$D/openssl.log" 2>&1 || not_ok "openssl makes the test certificates"
chmod 644 "$D"/*.key  # the broker may run as another user (mosquitto drops to its own user)

printf 'gateway-7\n' >"$D/pw-good"
printf 'not-it\n' >"$D/pw-bad"
chmod 600 "$D/pw-good" "$D/pw-bad"
mosquitto_passwd -b -c "$D/broker.passwd" gateway-7 "$(cat "$D/pw-good")" >/dev/null 2>&1
mosquitto_passwd -b "$D/broker.passwd" reader reader-pw >/dev/null 2>&1
chmod 644 "$D/broker.passwd"

PORT=$(hs_free_port)
PORT2=$(hs_free_port)
PORT3=$(hs_free_port)
{
    echo "allow_anonymous false"
    echo "password_file $D/broker.passwd"
    [ "$(id -u)" -eq 0 ] && echo "user root"
    # The same broker on 127.0.0.2, whose name the certificate does not carry.
    for l in "$PORT 127.0.0.1" "$PORT2 127.0.0.2"; do
        echo "listener $l"
        echo "cafile $D/ca.pem"
        echo "certfile $D/server.pem"
        echo "keyfile $D/server.key"
    done
    # A listener that also wants a client certificate from our CA.
    echo "listener $PORT3 127.0.0.1"
    echo "cafile $D/ca.pem"
    echo "certfile $D/server.pem"
    echo "keyfile $D/server.key"
    echo "require_certificate true"
} >"$D/broker.conf"
mosquitto -c "$D/broker.conf" >"$D/broker.log" 2>&1 &
HS_PIDS+=("$!")
hs_wait_port "$PORT" 10 || not_ok "TLS broker starts"

URI="mqtts://127.0.0.1:$PORT"
SUBARGS=(-h 127.0.0.1 -p "$PORT" --cafile "$D/ca.pem" -u reader -P reader-pw -q 1 -v -i reader-sub)

mosquitto_sub "${SUBARGS[@]}" -t 'halostage/demo/alarm/#' -C 5 -W 30 >"$D/sub.txt" 2>"$D/sub.err" &
SUB_PID=$!
HS_PIDS+=("$SUB_PID")
hs_wait_file_line "$D/broker.log" "as reader-sub" 10

"$AGENT" --db "$D/good.db" --uri "$URI" --ca "$D/ca.pem" --user gateway-7 \
    --password-file "$D/pw-good" --alarms 5 --timeout-s 20 >"$D/good.log" 2>&1
check "TLS + password: the outbox drains" grep -q "^drained" "$D/good.log"
wait "$SUB_PID"
check "TLS + password: the subscriber got all 5 transitions" \
    test "$(grep -c '"event_id"' "$D/sub.txt")" -eq 5

# The password file must not be readable by others.
chmod 644 "$D/pw-good"
"$AGENT" --db "$D/exposed.db" --uri "$URI" --ca "$D/ca.pem" --user gateway-7 \
    --password-file "$D/pw-good" --alarms 1 --timeout-s 5 >"$D/exposed.log" 2>&1
rc=$?
chmod 600 "$D/pw-good"
check "an exposed password file is refused (exit 78)" test "$rc" -eq 78
check "the refusal names the file" grep -q "pw-good: readable or writable by others" "$D/exposed.log"

# A wrong password or a broker we cannot verify: nothing is sent, nothing lost.
"$AGENT" --db "$D/bad.db" --uri "$URI" --ca "$D/ca.pem" --user gateway-7 \
    --password-file "$D/pw-bad" --alarms 3 --timeout-s 3 >"$D/bad.log" 2>&1
check "wrong password: not drained" test $? -eq 1
check "wrong password: the 3 transitions stay in the outbox" \
    test "$(sqlite3 "$D/bad.db" 'SELECT count(*) FROM outbox')" -eq 3
"$AGENT" --db "$D/otherca.db" --uri "$URI" --ca "$D/other.pem" --user gateway-7 \
    --password-file "$D/pw-good" --alarms 2 --timeout-s 3 >"$D/otherca.log" 2>&1
check "unknown CA: no connection" test $? -eq 1
check "unknown CA: never connected" test "$(grep -c '^connected' "$D/otherca.log")" -eq 0
# The host name is checked too: the certificate names 127.0.0.1, not 127.0.0.2.
# A client that skips the name check does get in there (exit 27: timed out
# waiting for messages, i.e. it was connected).
mosquitto_sub -h 127.0.0.2 -p "$PORT2" --cafile "$D/ca.pem" --insecure -u reader -P reader-pw \
    -t nothing -C 1 -W 2 >/dev/null 2>&1
check "the 127.0.0.2 listener works without the name check" test $? -eq 27
"$AGENT" --db "$D/host.db" --uri "mqtts://127.0.0.2:$PORT2" --ca "$D/ca.pem" --user gateway-7 \
    --password-file "$D/pw-good" --alarms 1 --timeout-s 3 >"$D/host.log" 2>&1
check "host name mismatch: never connected" test "$(grep -c '^connected' "$D/host.log")" -eq 0
# A client certificate where the broker asks for one.
"$AGENT" --db "$D/cert.db" --uri "mqtts://127.0.0.1:$PORT3" --ca "$D/ca.pem" \
    --cert "$D/client.pem" --key "$D/client.key" --user gateway-7 \
    --password-file "$D/pw-good" --alarms 2 --timeout-s 20 >"$D/cert.log" 2>&1
check "client certificate: the outbox drains" grep -q "^drained" "$D/cert.log"
"$AGENT" --db "$D/nocert.db" --uri "mqtts://127.0.0.1:$PORT3" --ca "$D/ca.pem" \
    --user gateway-7 --password-file "$D/pw-good" --alarms 1 --timeout-s 3 >"$D/nocert.log" 2>&1
check "no client certificate where one is required: never connected" \
    test "$(grep -c '^connected' "$D/nocert.log")" -eq 0
# mqtts without a CA file is refused before anything starts.
"$AGENT" --db "$D/noca.db" --uri "$URI" --alarms 1 --timeout-s 4 >"$D/noca.log" 2>&1
check "mqtts without a CA is refused (exit 78)" test $? -eq 78
hs_finish
