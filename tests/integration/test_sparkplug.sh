#!/usr/bin/env bash
# The Sparkplug B edge node against a real mosquitto on loopback, the
# simulator and the daemon. Every message is decoded with Python's protobuf
# (Debian python3-protobuf) from our schema compiled by protoc, not by the
# encoder halostaged uses (protobuf-c), and checked against Eclipse
# Sparkplug 3.0.0:
#   - with primary_host_id set, nothing is born before the host's retained
#     STATE says online;
#   - NBIRTH: seq 0, bdSeq (UInt64), Node Control/Rebirth (Boolean);
#     DBIRTH of each pond: every metric of the map with its datatype, alias
#     and a "unit" property on every number;
#   - DDATA by alias, each metric only when it changed; seq counts 0..255
#     over every message after NBIRTH;
#   - an NCMD asking anything but a rebirth is refused; a Node
#     Control/Rebirth NCMD gives a fresh NBIRTH (same bdSeq, seq 0) and
#     DBIRTHs;
#   - when the field goes silent, ponds die (DDEATH);
#   - killing the daemon (SIGKILL) yields the NDEATH will with the bdSeq of
#     its NBIRTH.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
for tool in mosquitto mosquitto_sub mosquitto_pub protoc; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done
/usr/bin/python3 -c 'import google.protobuf' 2>/dev/null ||
    { not_ok "python3-protobuf is not installed (mk/deps.sh)"; hs_finish; }
protoc --python_out="$HS_TMP" -Iprotocol protocol/sparkplug_b.proto ||
    { not_ok "protoc compiles protocol/sparkplug_b.proto"; hs_finish; }

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
# short stale limits so the silent field shows within the test
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    -e "s/^stale_after = 60s/stale_after = 3s/" config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = spb-gw\n[sparkplug]\ngroup_id = works\nedge_node_id = gw1\nprimary_host_id = scada1\n' \
    "$mport" >>"$cfg"

cap="$HS_TMP/spb.txt"
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'spBv1.0/works/#' -F '%t %x' >"$cap" 2>&1 &
HS_PIDS+=($!)
"$S" --config "$cfg" --speed 300 >"$HS_TMP/sim.log" 2>&1 &
spid=$!
HS_PIDS+=("$spid")
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
"$D" --config "$cfg" --log-level info >"$HS_TMP/daemon.log" 2>&1 &
dpid=$!
HS_PIDS+=("$dpid")

check "the edge node connects and waits for the primary host" \
    hs_wait_file_line "$HS_TMP/daemon.log" 'Sparkplug: connected as spb-gw-spb .*waiting for host scada1' 15
# states flow meanwhile (the gateway's own MQTT); still no birth
hs_wait_file_line "$HS_TMP/daemon.log" 'MQTT: .* as spb-gw' 5
check "no birth before the host's STATE" test "$(grep -c 'BIRTH' "$cap")" -eq 0
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -r -t spBv1.0/STATE/scada1 \
    -m "{\"online\": true, \"timestamp\": $(date +%s%3N)}"
nb() { test "$(grep -c "^spBv1.0/works/$1" "$cap")" -ge "$2"; }
wait_count() { local i; for ((i = 0; i < ${3:-15} * 10; i++)); do nb "$1" "$2" && return 0; sleep 0.1; done; return 1; }
check "NBIRTH after the host came online" wait_count NBIRTH/gw1 1
check "a DBIRTH per pond" wait_count DBIRTH/gw1/ 9
check "DDATA by exception arrives" wait_count DDATA/gw1/ 10 30

# commands: something else than a rebirth is refused, a rebirth is done
/usr/bin/python3 - "$HS_TMP" <<'PY'
import sys, time
sys.path.insert(0, sys.argv[1])
import sparkplug_b_pb2 as spb
def cmd(name, value, path):
    p = spb.Payload(timestamp=int(time.time() * 1000))
    m = p.metrics.add(name=name, datatype=11)   # Boolean
    m.boolean_value = value
    open(path, "wb").write(p.SerializeToString())
cmd("transfer/intake-feed/pump_on", True, sys.argv[1] + "/bad.bin")
cmd("Node Control/Rebirth", True, sys.argv[1] + "/rebirth.bin")
cmd("Device Control/Rebirth", True, sys.argv[1] + "/drebirth.bin")
PY
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t spBv1.0/works/NCMD/gw1 -f "$HS_TMP/bad.bin"
check "an NCMD that is not a rebirth is refused" \
    hs_wait_file_line "$HS_TMP/daemon.log" "NCMD refused: metric 'transfer/intake-feed/pump_on' refused" 10
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t spBv1.0/works/DCMD/gw1/c3 -f "$HS_TMP/bad.bin"
check "a DCMD that is not a rebirth is refused" \
    hs_wait_file_line "$HS_TMP/daemon.log" "DCMD for c3 refused" 10
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t spBv1.0/works/NCMD/gw1 -f "$HS_TMP/rebirth.bin"
check "Node Control/Rebirth gives a fresh NBIRTH" wait_count NBIRTH/gw1 2
check "... and fresh DBIRTHs" wait_count DBIRTH/gw1/ 18
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t spBv1.0/works/DCMD/gw1/x1 -f "$HS_TMP/drebirth.bin"
check "Device Control/Rebirth gives that pond's DBIRTH" wait_count DBIRTH/gw1/x1 3

# the primary host: an older STATE is ignored; offline ends the session
# (NDEATH), online again starts a new one with the next bdSeq
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -r -t spBv1.0/STATE/scada1 \
    -m '{"online": false, "timestamp": 1000}'
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t spBv1.0/works/NCMD/gw1 -f "$HS_TMP/bad.bin"
# the refused NCMD, sent after the old STATE, marks when that STATE was read
for ((i = 0; i < 100; i++)); do [ "$(grep -c 'NCMD refused' "$HS_TMP/daemon.log")" -ge 2 ] && break; sleep 0.1; done
check "an older STATE is ignored" test "$(grep -c '^spBv1.0/works/NDEATH' "$cap")" -eq 0
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -r -t spBv1.0/STATE/scada1 \
    -m "{\"online\": false, \"timestamp\": $(date +%s%3N)}"
check "the host going offline ends the session with NDEATH" wait_count NDEATH/gw1 1
check "... and the node connects again and waits (bdSeq 1)" \
    hs_wait_file_line "$HS_TMP/daemon.log" 'connected as spb-gw-spb \(bdSeq 1\), waiting' 15
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -r -t spBv1.0/STATE/scada1 \
    -m "{\"online\": true, \"timestamp\": $(date +%s%3N)}"
check "the host back online gives new births" wait_count NBIRTH/gw1 3

# the field goes silent: ponds die
kill "$spid"
check "a silent field kills the ponds (DDEATH)" wait_count DDEATH/gw1/ 1 30

kill -9 "$dpid"
wait "$dpid" 2>/dev/null
check "killing the daemon yields the NDEATH will" wait_count NDEATH/gw1 2 15

# a restart goes on from the stored bdSeq (sessions 0 and 1 were used):
# a host still holding the killed session's NDEATH never sees it match
"$D" --config "$cfg" --log-level info >"$HS_TMP/daemon2.log" 2>&1 &
dpid2=$!
HS_PIDS+=("$dpid2")
check "after a restart the node connects with the next bdSeq (2), not 0" \
    hs_wait_file_line "$HS_TMP/daemon2.log" 'connected as spb-gw-spb \(bdSeq 2\)' 15
kill "$dpid2"
wait "$dpid2" 2>/dev/null

/usr/bin/python3 - "$HS_TMP" "$cap" >"$HS_TMP/decode.txt" 2>&1 <<'PY'
import sys
sys.path.insert(0, sys.argv[1])
import sparkplug_b_pb2 as spb

NUMBERS = ["density_ref_kg_m3", "specific_gravity", "baume", "temperature_c", "density_kg_m3",
           "concentration_factor", "next_stage_density_ref_kg_m3", "depth_m", "volume_m3",
           "days_to_target_low", "days_to_target_high", "days_to_next_stage", "salinity_g_kg",
           "density_uncertainty_kg_m3", "days_to_target_expected"]
CODES = {"stage": 12, "next_stage": 12, "quality": 12, "alarm_bits": 6, "method": 12,
         "level_quality": 12}
fails = []
msgs = []
for line in open(sys.argv[2]):
    topic, _, hexpay = line.strip().partition(" ")
    p = spb.Payload()
    p.ParseFromString(bytes.fromhex(hexpay))
    msgs.append((topic.split("/"), p))

def value(m):
    which = m.WhichOneof("value")
    return None if m.is_null or which is None else getattr(m, which)

births = [(t, p) for t, p in msgs if t[2] == "NBIRTH"]
deaths = [(t, p) for t, p in msgs if t[2] == "NDEATH"]
bdseq = lambda p: [m.long_value for m in p.metrics if m.name == "bdSeq"]
for t, p in births:
    names = {m.name: m for m in p.metrics}
    if p.seq != 0: fails.append("NBIRTH seq %d" % p.seq)
    if names.get("bdSeq") is None or names["bdSeq"].datatype != 8: fails.append("NBIRTH bdSeq")
    reb = names.get("Node Control/Rebirth")
    if reb is None or reb.datatype != 11 or reb.boolean_value: fails.append("NBIRTH rebirth metric")
if len(births) < 3: fails.append("%d NBIRTH" % len(births))
elif bdseq(births[0][1]) != bdseq(births[1][1]): fails.append("rebirth changed bdSeq")
# every NDEATH carries the bdSeq of the NBIRTH before it (the first one the
# node's own on the host going offline, the second the broker's will after
# SIGKILL, the third the restarted node's own at its clean stop), and no
# bdSeq comes back
pairs = []
cur = None
for t, p in msgs:
    if t[2] == "NBIRTH":
        cur = bdseq(p)
    elif t[2] == "NDEATH":
        pairs.append((cur, bdseq(p)))
if len(pairs) != 3 or any(b != d for b, d in pairs) or len({d[0] for _, d in pairs}) != 3:
    fails.append("NBIRTH/NDEATH bdSeq pairs %s" % pairs)
print("bdSeq (NBIRTH, NDEATH) pairs %s" % pairs)

# DBIRTH: every metric with datatype, alias, and units on the numbers
aliases = {}
known = {}
n_dbirth = 0
for t, p in msgs:
    if t[2] != "DBIRTH":
        continue
    n_dbirth += 1
    dev = t[4]
    names = {m.name: m for m in p.metrics}
    for n in NUMBERS:
        m = names.get(n)
        if m is None: fails.append("%s DBIRTH lacks %s" % (dev, n)); continue
        units = dict(zip(m.properties.keys, [v.string_value for v in m.properties.values]))
        if m.datatype != 9 or not m.alias or not units.get("unit"):
            fails.append("%s %s: datatype %d alias %d unit %r" % (dev, n, m.datatype, m.alias, units))
    for n, dt in CODES.items():
        m = names.get(n)
        if m is None or m.datatype != dt or not m.alias: fails.append("%s DBIRTH code %s" % (dev, n))
    for m in p.metrics:
        if aliases.setdefault(m.alias, (dev, m.name)) != (dev, m.name):
            fails.append("alias %d used twice" % m.alias)
print("DBIRTH messages", n_dbirth, "aliases", len(aliases))
# the document's numbers flow through: a density at the reference temperature
ref = [value(m) for t, p in msgs if t[2] == "DBIRTH" for m in p.metrics
       if m.name == "density_ref_kg_m3" and value(m) is not None]
if not ref or not all(990 < v < 1400 for v in ref): fails.append("density_ref_kg_m3 %s" % ref[:3])

# DDATA only on change; seq consecutive after each NBIRTH
last = {}
n_ddata = n_metrics = 0
seq = None
for t, p in msgs:
    kind = t[2]
    if kind == "NBIRTH":
        seq = 0
        continue
    if kind in ("NDEATH", "NCMD", "DCMD") or seq is None:
        continue  # NDEATH has no seq; the commands are ours, captured too
    if p.seq != (seq + 1) % 256:
        fails.append("seq %d after %d (%s)" % (p.seq, seq, kind))
    seq = p.seq
    if kind == "DBIRTH":
        for m in p.metrics:
            last[m.alias] = value(m)
    elif kind == "DDATA":
        n_ddata += 1
        for m in p.metrics:
            n_metrics += 1
            if m.name:
                fails.append("DDATA by name %s" % m.name)
            if m.alias not in last:
                fails.append("DDATA alias %d never born" % m.alias)
            elif last[m.alias] == value(m):
                fails.append("DDATA repeats alias %d = %r" % (m.alias, value(m)))
            last[m.alias] = value(m)
print("DDATA messages", n_ddata, "metrics", n_metrics)
if n_ddata < 10: fails.append("only %d DDATA" % n_ddata)
print("FAILS:", fails[:10])
print("ok" if not fails else "not ok")
PY
check "decoded with protoc's Python: births with every metric and unit, DDATA only on change, seq, bdSeq NBIRTH = NDEATH ($(tail -1 "$HS_TMP/decode.txt"))" \
    grep -qx ok "$HS_TMP/decode.txt"
grep -qx ok "$HS_TMP/decode.txt" || sed 's/^/# /' "$HS_TMP/decode.txt"
sed 's/^/# /' "$HS_TMP/decode.txt" | grep -E 'bdSeq|messages'
[ "$hs_failed" -eq 0 ] || grep -m1 -A24 -E 'ERROR: |runtime error' "$HS_TMP/daemon.log" | sed 's/^/# daemon: /'
hs_finish
