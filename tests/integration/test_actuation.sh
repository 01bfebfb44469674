#!/usr/bin/env bash
# Actuation over real Modbus TCP against the simulator: an opted-in transfer
# starts the simulated pump by writing its coil, the run feedback confirms
# it, the PLC heartbeat register is written, and on SIGTERM the output is
# left at stop (the simulator's pump halts). Manual override and every other
# interlock are covered by tests/unit/test_transfer.c.
# The transfer's start density is set below the brine store's, so it is due
# at once; min_off is short so the test does not wait.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    config/demo.ini >"$cfg"
# the store-to-x1 feed: due now (density trigger below the store's brine)
/usr/bin/python3 - "$cfg" <<'PY'
import sys
p = sys.argv[1]
s = open(p).read()
a = s.index("[transfer store-to-x1]")
b = s.index("[transfer x1-drain]")
s = s[:a] + """[transfer store-to-x1]
source = store
destination = x1
start_density = 1150 kg/m3
destination_level_max = 0.55 m
min_on = 1s
min_off = 2s
actuate = yes
bus = dikes
unit_id = 1
output = coil
output_address = 54
heartbeat_address = 9
feedback = store.pump-run
feedback_timeout = 10s

""" + s[b:]
open(p, "w").write(s)
PY
truth="$HS_TMP/truth.json"
"$S" --config "$cfg" --speed 60 --truth "$truth" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"

"$D" --config "$cfg" --emit-stdout >"$HS_TMP/emit.txt" 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")

store_pumping() {
    /usr/bin/python3 -c 'import json,sys; sys.exit(0 if json.load(open(sys.argv[1]))["ponds"]["store"]["pumping"] == (sys.argv[2] == "1") else 1)' "$truth" "$1" 2>/dev/null
}
check "advice run for the due transfer" hs_wait_file_line "$HS_TMP/emit.txt" '^transfer/store-to-x1/advice good run$' 20
check "pump output RUN written" hs_wait_file_line "$HS_TMP/daemon.log" 'store-to-x1\]: pump output RUN written' 10
for ((i = 0; i < 100; i++)); do store_pumping 1 && break; sleep 0.1; done
check "the simulated pump runs (coil written over Modbus)" store_pumping 1
# the heartbeat: holding register 9 of unit 1, read over Modbus (FC 03) twice
read_reg() {
    /usr/bin/python3 - "$dikes" <<'PY'
import socket, struct, sys
s = socket.create_connection(("127.0.0.1", int(sys.argv[1])), timeout=2)
s.sendall(struct.pack(">HHHBBHH", 7, 0, 6, 1, 3, 9, 1))
r = s.recv(64)
print(struct.unpack(">H", r[9:11])[0])
PY
}
# The daemon's own clock instead of a fixed sleep: the heartbeat advances once
# a cycle; wait (bounded) for three more cycles, past the run-feedback check.
hb1=$(read_reg)
hb2=$hb1
for ((i = 0; i < 200; i++)); do
    hb2=$(read_reg)
    [ -n "$hb1" ] && [ -n "$hb2" ] && [ $(( (hb2 - hb1 + 65536) % 65536 )) -ge 3 ] && break
    sleep 0.1
done
check "PLC heartbeat register counts ($hb1 -> $hb2)" test -n "$hb1" -a -n "$hb2" -a "$hb1" != 0 -a "$hb1" != "$hb2"
check "run feedback confirmed: no feedback alarm" bash -c "! grep -q 'did not confirm running' '$HS_TMP/daemon.log'"

kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "clean stop (exit $rc)" test "$rc" -eq 0
check "the stop set the pump output to STOP" grep -q 'store-to-x1\]: pump output set to STOP for shutdown' "$HS_TMP/daemon.log"
for ((i = 0; i < 100; i++)); do store_pumping 0 && break; sleep 0.1; done
check "after the daemon stopped, the simulated pump is stopped" store_pumping 0

hs_finish
