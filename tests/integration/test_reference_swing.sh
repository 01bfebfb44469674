#!/usr/bin/env bash
# Decisions follow the brine, not the weather. A test device on real Modbus
# TCP holds two ponds' brine fixed while their temperature swings
# 15 -> 35 -> 15 degC, through the whole field path (device -> acquisition ->
# brine state -> alarm rules and transfer engine of halostaged):
#  - pond "warm": an inline densitometer reads the in-situ density of one
#    brine (1180 kg/m3 at 20 degC) at the pond's temperature; those in-situ
#    densities come from the calculator's own model (halostage calc) and
#    swing by about 10 kg/m3;
#  - pond "sea": a conductivity cell reads S_P 40 water, its conductivity at
#    each temperature from PSS-78 as TEOS-10 gsw implements it
#    (gsw.C_from_SP, the reference library, independent of our code).
# Expected: no density-band or density-fall alarm, the density-triggered
# transfer (start 1.5 kg/m3 above the brine at reference temperature, which
# the in-situ density crosses twice) neither starts nor stops, and each
# pond's SG spread stays <= 0.0015.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
C="$HS_BUILD/halostage"
port=$(hs_free_port)
cfg="$HS_TMP/site.ini"
table="$HS_TMP/insitu.json"
done_flag="$HS_TMP/swing.done"
REF=1180.0 # the warm pond's brine at 20 degC [kg/m3]

# In-situ density of the warm pond's brine at 15..35 degC: Newton on the
# calculator's density at the reference temperature (d rho_ref / d rho ~ 1).
/usr/bin/python3 - "$C" "$REF" "$table" <<'PY' || not_ok "in-situ density table"
import json, subprocess, sys
calc, ref, out = sys.argv[1], float(sys.argv[2]), sys.argv[3]
table = {}
for t in range(15, 36):
    rho = ref
    for _ in range(6):
        r = subprocess.run([calc, "calc", "--density", "%.6f" % rho, "--temperature", str(t),
                            "--reference-temperature", "20", "--json"],
                           capture_output=True, text=True, check=True)
        d = json.loads(r.stdout)["density_ref_kg_m3"]
        rho += ref - d
        if abs(ref - d) < 1e-4:
            break
    table[t] = rho
json.dump(table, open(out, "w"))
PY

cat >"$cfg" <<EOF
[site]
name = swing-works
database = swing.db
latitude = 37.5
reference_temperature = 20 C
baume_modulus = 145

[bus plc]
type = tcp
host = 127.0.0.1
port = $port
unit_ids = 1
response_timeout = 500ms
poll_interval = 1s

[pond warm]
role = concentrator
next = sea
area = 1 ha
density_in = 1177 kg/m3
density_out = 22.4 Be

[pond sea]
role = concentrator
area = 1 ha
density_in = 1.0280 SG

[signal warm.temperature]
bus = plc
address = 0
type = int16
scale = 0.01
unit = C

[signal warm.density]
bus = plc
address = 2
type = float32
unit = kg/m3

[signal sea.temperature]
bus = plc
address = 10
type = int16
scale = 0.01
unit = C

[signal sea.conductivity]
bus = plc
address = 12
type = float32
unit = mS/cm

[alarm swing-band]
kind = density-band
ponds = warm
low = 1177
high = 1183
on_delay = 0s
off_delay = 0s

[transfer warm-to-sea]
source = warm
destination = sea
start_density = 1181.5 kg/m3
hysteresis = 2 kg/m3
min_on = 1s
min_off = 1s
EOF
check "--check accepts the site (SG and Be bands)" "$D" --check --config "$cfg"

# The test device: Modbus TCP (FC 03 and 04), one unit, the swing on its own clock.
/usr/bin/python3 - "$port" "$table" "$done_flag" >"$HS_TMP/device.log" 2>&1 <<'PY' &
import json, select, socket, struct, sys, time
import gsw
port, table, done_flag = int(sys.argv[1]), json.load(open(sys.argv[2])), sys.argv[3]
table = {int(k): v for k, v in table.items()}

def temperature(t):  # hold 15, up to 35 in 15 s, hold, down in 15 s, hold
    if t < 4: return 15.0
    if t < 19: return 15.0 + 20.0 * (t - 4) / 15.0
    if t < 23: return 35.0
    if t < 38: return 35.0 - 20.0 * (t - 23) / 15.0
    return 15.0

def insitu(tc):
    lo = min(34, max(15, int(tc)))
    f = tc - lo
    return table[lo] + f * (table[lo + 1] - table[lo])

def f32(v):
    return list(struct.unpack(">HH", struct.pack(">f", v)))

start = time.monotonic()
def registers():
    t = time.monotonic() - start
    tc = temperature(t)
    regs = [0] * 16
    regs[0] = int(round(tc * 100))
    regs[2:4] = f32(insitu(tc))
    regs[10] = int(round(tc * 100))
    regs[12:14] = f32(float(gsw.C_from_SP(40.0, tc, 0.0)))
    if t > 42:
        open(done_flag, "w").close()
    return regs

srv = socket.socket()
srv.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
srv.bind(("127.0.0.1", port))
srv.listen(4)
conns = []
while True:
    r, _, _ = select.select([srv] + conns, [], [], 0.5)
    registers()
    for s in r:
        if s is srv:
            conns.append(srv.accept()[0])
            continue
        data = s.recv(260)
        if len(data) < 12:
            conns.remove(s); s.close(); continue
        tid, _, _, unit, fc, addr, count = struct.unpack(">HHHBBHH", data[:12])
        if fc not in (3, 4) or addr + count > 16:
            s.sendall(struct.pack(">HHHBBB", tid, 0, 3, unit, fc | 0x80, 2))
            continue
        regs = registers()[addr:addr + count]
        body = struct.pack(">BBB", unit, fc, 2 * count) + struct.pack(">%dH" % count, *regs)
        s.sendall(struct.pack(">HHH", tid, 0, len(body)) + body)
PY
HS_PIDS+=($!)
hs_wait_port "$port" 10 || not_ok "test device did not start"

"$D" --config "$cfg" --emit-stdout >"$HS_TMP/emit.txt" 2>"$HS_TMP/daemon.log" &
HS_PIDS+=($!)

# Bounded wait: the swing ends, then the daemon has read 15 degC again.
for ((i = 0; i < 1200; i++)); do [ -e "$done_flag" ] && break; sleep 0.1; done
check "the device finished its swing" test -e "$done_flag"
back_at_15() {
    /usr/bin/python3 - "$HS_TMP/emit.txt" <<'PY'
import sys
t = [float(l.split()[2]) for l in open(sys.argv[1]) if l.startswith("pond/warm/temperature_c good")]
sys.exit(0 if t and max(t) > 34.5 and t[-1] < 15.5 else 1)
PY
}
for ((i = 0; i < 300; i++)); do back_at_15 && break; sleep 0.1; done
check "the daemon saw 15 -> 35 -> 15 degC" back_at_15

/usr/bin/python3 - "$HS_TMP/emit.txt" <<'PY'
import re, sys
vals = {}
for line in open(sys.argv[1]):
    f = line.split()
    if len(f) == 3 and f[1] == "good" and f[0].startswith("pond/"):
        try:
            vals.setdefault(f[0], []).append(float(f[2]))
        except ValueError:
            pass
def spread(tag):
    v = vals.get(tag, [])
    return (max(v) - min(v)) if v else float("nan"), len(v)
fail = 0
for pond in ("warm", "sea"):
    sg, n = spread("pond/%s/specific_gravity" % pond)
    rho, _ = spread("pond/%s/density_kg_m3" % pond)
    ref, _ = spread("pond/%s/density_ref_kg_m3" % pond)
    good = n >= 20 and sg <= 0.0015 and rho >= 4.0
    print("%s - %s: %d samples, SG spread %.5f (<= 0.0015), in-situ spread %.2f kg/m3, "
          "reference spread %.3f kg/m3" % ("ok" if good else "not ok", pond, n, sg, rho, ref))
    fail |= not good
sys.exit(fail)
PY
[ $? -eq 0 ] || hs_failed=1
check "no density alarm raised" bash -c \
    "! grep -E '^alarm/(warm|sea)/(swing-band|density-band|density-fall) ' '$HS_TMP/emit.txt'"
check "the transfer engine ran (advice published)" \
    grep -qE '^transfer/warm-to-sea/advice good ' "$HS_TMP/emit.txt"
check "the transfer never started (no run advice)" bash -c \
    "! grep -E '^transfer/warm-to-sea/advice good run' '$HS_TMP/emit.txt'"
check "the daemon logged no transfer start or stop" bash -c \
    "! grep -E 'warm-to-sea\\]: (run|stop)' '$HS_TMP/daemon.log'"
hs_finish
