#!/usr/bin/env bash
# Garbage on a Modbus RTU line (socat pty pair): a scripted device on the far
# end answers requests with random bytes, bad CRCs, cut frames, the wrong
# slave or function, exceptions, oversized frames and silence, mixed with good
# replies (seeded). The bus worker must keep cycling, mark failed reads
# comm-fail, pass the good replies on, and never crash (ASan in build/san).
source "$(dirname "$0")/lib.sh"
D="$HS_BUILD/halostaged"
PY=/usr/bin/python3

socat pty,raw,echo=0,link="$HS_TMP/ttyA" pty,raw,echo=0,link="$HS_TMP/ttyB" \
    >"$HS_TMP/socat.log" 2>&1 &
HS_PIDS+=("$!")
for _ in $(seq 1 200); do
    [ -e "$HS_TMP/ttyA" ] && [ -e "$HS_TMP/ttyB" ] && break
    sleep 0.05
done
check "socat made a pty pair" test -e "$HS_TMP/ttyA" -a -e "$HS_TMP/ttyB"

CFG="$HS_TMP/rtu.ini"
cat >"$CFG" <<INI
[site]
name = rtu-garbage
latitude = 40

[bus line]
type = rtu
device = $HS_TMP/ttyA
baud = 19200
parity = even
unit_ids = 1-3
response_timeout = 300ms
byte_timeout = 50ms
retries = 0
backoff_min = 100ms
poll_interval = 200ms

[pond p1]
role = intake
area = 1 ha
density_in = 1020 kg/m3
density_out = 1030 kg/m3

[pond p2]
role = bittern
area = 1 ha

[signal p1.conductivity]
bus = line
unit_id = 1
table = input
address = 0
type = float32
word_order = little
unit = mS/cm

[signal p1.temperature]
bus = line
unit_id = 1
table = input
address = 2
type = int16
scale = 0.01
unit = C

[signal p1.level-pressure]
bus = line
unit_id = 2
address = 4
type = uint32
byte_order = little
scale = 0.1
unit = Pa

[signal p2.temperature]
bus = line
unit_id = 3
table = input
address = 0
type = int16
scale = 0.1
unit = C
INI
PROBE="$HS_BUILD/tools/hs_acq_probe"

# The far end: reads a request (a frame ends after 20 ms of silence), then
# answers good (every other request) or with the next fault in turn.
$PY - "$HS_TMP/ttyB" "$HS_TMP/dev.out" <<'PYEOF' &
import os, random, select, struct, sys, time
fd = os.open(sys.argv[1], os.O_RDWR | os.O_NOCTTY)
rnd = random.Random(31337)
def crc(b):
    c = 0xFFFF
    for x in b:
        c ^= x
        for _ in range(8):
            c = (c >> 1) ^ 0xA001 if c & 1 else c >> 1
    return struct.pack("<H", c)
def good(req):
    unit, fc = req[0], req[1]
    if fc in (3, 4) and len(req) >= 8:
        n = (req[4] << 8) | req[5]
        body = bytes([unit, fc, 2 * n]) + b"\x0b\xb8" * n
    else:
        body = bytes([unit, fc | 0x80, 1])
    return body + crc(body)
kinds = ["random", "bad-crc", "cut", "wrong-slave", "wrong-function", "exception",
         "short-count", "long-count", "huge", "silent", "echo"]
count = {k: 0 for k in kinds + ["good"]}
served = 0
end = time.time() + 120
while time.time() < end:
    r, _, _ = select.select([fd], [], [], 0.5)
    if not r:
        continue
    req = b""
    while True:
        r, _, _ = select.select([fd], [], [], 0.02)
        if not r:
            break
        req += os.read(fd, 512)
    if len(req) < 4:
        continue
    k = "good" if served % 2 == 0 else kinds[(served // 2) % len(kinds)]
    served += 1
    count[k] += 1
    g = good(req)
    if k == "good": out = g
    elif k == "random": out = bytes(rnd.randrange(256) for _ in range(rnd.randrange(1, 260)))
    elif k == "bad-crc": out = g[:-2] + bytes([g[-2] ^ 0xFF, g[-1]])
    elif k == "cut": out = g[:rnd.randrange(1, len(g))]
    elif k == "wrong-slave": out = bytes([(g[0] + 1) & 0xFF]) + g[1:-2]; out += crc(out)
    elif k == "wrong-function": out = bytes([g[0], 0x11]) + g[2:-2]; out += crc(out)
    elif k == "exception":
        out = bytes([req[0], req[1] | 0x80, rnd.randrange(256)]); out += crc(out)
    elif k in ("short-count", "long-count"):
        out = bytearray(g[:-2]); out[2] = (out[2] + (-2 if k == "short-count" else 40)) & 0xFF
        out = bytes(out); out += crc(out)
    elif k == "huge": out = bytes([req[0], req[1], 0xFF]) + bytes(rnd.randrange(256) for _ in range(600))
    elif k == "silent": out = b""
    else: out = req
    if out:
        os.write(fd, out)
    with open(sys.argv[2], "w") as f:
        f.write(" ".join("%s=%d" % kv for kv in count.items()) + "\n")
PYEOF
HS_PIDS+=("$!")

"$PROBE" --config "$CFG" --seconds 8 >"$HS_TMP/probe.json" 2>"$HS_TMP/probe.err"
rc=$?
cat "$HS_TMP/probe.json" "$HS_TMP/probe.err"
check "RTU bus worker survives 8 s of line garbage (exit 0, no sanitizer report)" \
    test "$rc" -eq 0 -a ! -s "$HS_TMP/probe.err"
check "RTU garbage: keeps cycling, marks comm-fail, passes good replies on" \
    $PY - "$HS_TMP/probe.json" <<'PYEOF'
import json, sys
b = [json.loads(l) for l in open(sys.argv[1]) if '"bus"' in l][0]
s = b["samples"]
data = sum(v for k, v in s.items() if k not in ("comm-fail", "stale"))
print("line:", b["cycles"], "cycles", b["transactions"], "transactions", b["failures"],
      "failures", s)
sys.exit(0 if b["cycles"] >= 5 and s["comm-fail"] > 0 and data > 0 else 1)
PYEOF
cat "$HS_TMP/dev.out"
check "every line fault was served" $PY - "$HS_TMP/dev.out" <<'PYEOF'
import sys
c = dict(w.split("=") for w in open(sys.argv[1]).read().split())
print("faults served:", sum(int(v) for v in c.values()))
sys.exit(0 if all(int(v) > 0 for v in c.values()) else 1)
PYEOF
hs_finish
