#!/usr/bin/env bash
# End-to-end latency from a register change to its MQTT message: a small
# Modbus TCP device of our own (below) changes a pond's density register at
# known instants; halostaged polls it every 100 ms and publishes the pond's
# state; a real subscriber on a private mosquitto stamps every message as it
# arrives. Prints min / median / 95th percentile / max over the changes.
# The figure includes the poll interval (a change waits up to 100 ms for the
# next read), the daemon's 100 ms tick and the broker round trip.
set -u
cd "$(dirname "$0")/../.."
HS_BUILD=${HS_BUILD:-build}
. tests/integration/lib.sh
changes=${HS_LATENCY_CHANGES:-30}

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { echo "bench_latency: mosquitto did not start"; exit 1; }
dport=$(hs_free_port)

# The device: holding registers 0-1 density (float32, high word first),
# 2 temperature (int16, tenths of degC). Answers FC 03 and FC 04 reads.
/usr/bin/python3 - "$dport" "$changes" "$HS_TMP/changes.txt" <<'PY' &
import socket, struct, sys, threading, time
port, n, log = int(sys.argv[1]), int(sys.argv[2]), sys.argv[3]
regs = [0] * 16
def set_density(rho):
    hi, lo = struct.unpack(">HH", struct.pack(">f", rho))
    regs[0], regs[1] = hi, lo
set_density(1100.0)
regs[2] = 250
def serve(conn):
    buf = b""
    while True:
        data = conn.recv(260)
        if not data:
            return
        buf += data
        while len(buf) >= 12:
            tid, pid, length, unit, fc = struct.unpack(">HHHBB", buf[:8])
            pdu = buf[7:6 + length]
            buf = buf[6 + length:]
            addr, count = struct.unpack(">HH", pdu[1:5])
            if fc in (3, 4) and addr + count <= len(regs):
                body = bytes([fc, 2 * count]) + b"".join(struct.pack(">H", r) for r in regs[addr:addr + count])
            else:
                body = bytes([fc | 0x80, 2])
            conn.sendall(struct.pack(">HHHB", tid, 0, len(body) + 1, unit) + body)
srv = socket.socket()
srv.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
srv.bind(("127.0.0.1", port))
srv.listen(4)
def accept():
    while True:
        c, _ = srv.accept()
        threading.Thread(target=serve, args=(c,), daemon=True).start()
threading.Thread(target=accept, daemon=True).start()
time.sleep(4.0)  # the daemon connects and publishes its first states
with open(log, "w") as out:
    for i in range(n):
        rho = 1110.0 + (i % 2) * 10.0 + i * 0.01  # every value distinct
        set_density(rho)
        out.write("%.6f %.4f\n" % (time.time(), rho))
        out.flush()
        time.sleep(0.73)  # off the 100 ms grid, so changes land at every phase
time.sleep(2.0)
PY
dev=$!
HS_PIDS+=("$dev")
hs_wait_port "$dport" 10 || { echo "bench_latency: device did not start"; exit 1; }

cat >"$HS_TMP/site.ini" <<INI
[site]
name = latency
latitude = 37
database = latency.db
[bus dev]
type = tcp
host = 127.0.0.1
port = $dport
poll_interval = 100ms
response_timeout = 200ms
[pond p]
role = concentrator
area = 1 ha
[signal p.density]
bus = dev
address = 0
type = float32
unit = kg/m3
[signal p.temperature]
bus = dev
address = 2
type = int16
scale = 0.1
unit = C
[mqtt]
uri = mqtt://127.0.0.1:$mport
INI
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/latency/pond/p/state' -F '%U %p' \
    >"$HS_TMP/arrivals.txt" 2>&1 &
HS_PIDS+=($!)
"$HS_BUILD/halostaged" --config "$HS_TMP/site.ini" --log-level warning 2>"$HS_TMP/daemon.log" &
HS_PIDS+=($!)
wait "$dev"

/usr/bin/python3 - "$HS_TMP/changes.txt" "$HS_TMP/arrivals.txt" <<'PY'
import json, sys
changes = [tuple(map(float, l.split())) for l in open(sys.argv[1]) if l.strip()]
arrivals = []
for l in open(sys.argv[2]):
    t, _, payload = l.partition(" ")
    try:
        arrivals.append((float(t), json.loads(payload)["density_kg_m3"]))
    except (ValueError, KeyError, TypeError):
        pass
lat = []
for t0, rho in changes:
    hit = next((t for t, r in arrivals if t >= t0 and r is not None and abs(r - rho) < 0.005), None)
    if hit is not None:
        lat.append(1000.0 * (hit - t0))
if not lat:
    print("bench_latency: no change reached the subscriber"); sys.exit(1)
lat.sort()
pick = lambda q: lat[min(len(lat) - 1, int(q * len(lat)))]
print("register change -> MQTT state at a subscriber (poll 100 ms, tick 100 ms), %d of %d changes:"
      % (len(lat), len(changes)))
print("  min %.0f ms, median %.0f ms, p95 %.0f ms, max %.0f ms" % (lat[0], pick(0.5), pick(0.95), lat[-1]))
PY
