#!/usr/bin/env bash
# `make demo`: the whole job on the invented salt works of config/demo.ini.
# Starts the pond-chain simulator (accelerated), a private mosquitto on a
# free loopback port when mosquitto is installed, and halostaged; shows a
# live status table of every pond for about a minute and serves the
# operators' page on loopback (its address is printed); then stops all it
# started, by PID, and leaves the history file for `halostage history`.
# HS_DEMO_SECONDS (default 60) and HS_DEMO_SPEED (default 600) adjust it.
# The actuated feed from the brine store to crystalliser x1 runs one cycle in
# that minute: it starts (its pump coil is written over Modbus), the run
# feedback confirms, and it stops on its own rule when x1 is full; the
# screen follows it and the end summary lists it from the daemon's log.
set -u
cd "$(dirname "$0")/.."
build=${1:-build}
seconds=${HS_DEMO_SECONDS:-60}
speed=${HS_DEMO_SPEED:-600}
out=$build/demo
mkdir -p "$out"
rm -f "$out"/demo.db "$out"/demo.db-wal "$out"/demo.db-shm "$out"/*.log
pids=()
stop_all() {
    local p
    for p in "${pids[@]}"; do kill "$p" 2>/dev/null; done
    for p in "${pids[@]}"; do wait "$p" 2>/dev/null; done
    pids=()
}
trap stop_all EXIT INT TERM

free_port() {
    /usr/bin/python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1]); s.close()'
}
wait_port() {
    local i
    for ((i = 0; i < 200; i++)); do
        (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null && return 0
        sleep 0.05
    done
    return 1
}

# The demo site on free loopback ports, polled faster than a real site would.
dikes=$(free_port)
analysers=$(free_port)
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 2s/" \
    config/demo.ini >"$out/demo.ini"

mqtt="off (mosquitto is not installed)"
if command -v mosquitto >/dev/null; then
    if grep -q '^\[mqtt' config/reference.ini; then
        mport=$(free_port)
        {
            echo "listener $mport 127.0.0.1"
            echo "allow_anonymous true"
            echo "persistence false"
            [ "$(id -u)" -eq 0 ] && echo "user root"
        } >"$out/mosquitto.conf"
        mosquitto -c "$out/mosquitto.conf" >"$out/mosquitto.log" 2>&1 &
        pids+=($!)
        if wait_port "$mport"; then
            printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = halostage-demo\n' "$mport" >>"$out/demo.ini"
            mqtt="on: mosquitto at 127.0.0.1:$mport, topics halostage/demo-works/#"
            if command -v mosquitto_sub >/dev/null; then
                mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/#' -v >"$out/mqtt.log" 2>&1 &
                pids+=($!)
            fi
        else
            mqtt="off (mosquitto did not start; see $out/mosquitto.log)"
        fi
    else
        mqtt="off (this build has no [mqtt] configuration)"
    fi
fi

# The operators' page on a free loopback port, views public, one operator
# login with a fresh password for this run.
webport=$(free_port)
webpass=$(/usr/bin/python3 -c 'import secrets; print(secrets.token_urlsafe(9))')
rm -f "$out/web-users"
printf '\n[web]\nlisten = 127.0.0.1:%s\nusers_file = web-users\npublic_view = yes\n' "$webport" >>"$out/demo.ini"
printf '%s\n' "$webpass" | "$build/halostage" user --config "$out/demo.ini" add demo --role operator >/dev/null
web="http://127.0.0.1:$webport/ (log in as demo / $webpass to acknowledge)"

"$build/halostage-sim" --config "$out/demo.ini" --speed "$speed" >"$out/sim.log" 2>&1 &
pids+=($!)
if ! wait_port "$dikes" || ! wait_port "$analysers"; then
    echo "demo: the simulator did not start; see $out/sim.log" >&2
    exit 1
fi
"$build/halostaged" --config "$out/demo.ini" --log-level notice 2>"$out/halostaged.log" &
daemon=$!
pids+=("$daemon")

# The store -> x1 cycle as the daemon logged it (start, feedback, stop).
actuation_lines() {
    grep -E '\[transfer store-to-x1\]: (run|idle|wait|blocked|pump output (RUN|STOP) written|run feedback)' \
        "$out/halostaged.log" 2>/dev/null | sed -e 's/^halostaged: [a-z]*: //'
}

start=$(date +%s)
while :; do
    now=$(date +%s)
    left=$((seconds - (now - start)))
    [ "$left" -le 0 ] && break
    if ! kill -0 "$daemon" 2>/dev/null; then
        echo "demo: halostaged stopped; see $out/halostaged.log" >&2
        tail -5 "$out/halostaged.log" >&2
        exit 1
    fi
    [ -t 1 ] && printf '\033[H\033[2J'
    echo "halostage demo: invented salt works, simulator at ${speed}x (1 s here = $((speed / 60)) min there)"
    echo "MQTT $mqtt; ${left}s left (Ctrl-C stops)"
    echo "Page: $web"
    echo "TO TARGET: time until the pond reaches its density_out at the recent pace (real time)"
    echo
    "$build/halostage" status --config "$out/demo.ini" 2>&1 || true
    echo
    echo "actuated transfer store -> x1: $(actuation_lines | tail -1)"
    echo
    echo "latest daemon log lines:"
    tail -4 "$out/halostaged.log" | cut -c1-150
    sleep 2
done

kill -TERM "$daemon" 2>/dev/null
wait "$daemon"
rc=$?
stop_all
echo
echo "halostaged stopped (exit $rc); everything the demo started is stopped."
echo "Actuation cycle of the store -> x1 feed (from the daemon's log):"
actuation_lines | sed 's/^/  /'
if [ -f "$out/mqtt.log" ]; then
    echo "MQTT messages seen by a subscriber: $(wc -l <"$out/mqtt.log")"
fi
echo "The history stays in $out/demo.db. Try:"
echo "  $build/halostage status  --config $out/demo.ini"
echo "  $build/halostage history --config $out/demo.ini --pond c1 --since 1h"
echo "Daemon log: $out/halostaged.log"
