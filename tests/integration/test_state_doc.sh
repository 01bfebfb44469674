#!/usr/bin/env bash
# One pond-state document: the MQTT retained state (real mosquitto), the
# plugin's emit of pond/<pond>/state, `halostage status --json`,
# `halostage export --json` and `halostaged --once --json` carry the same
# fields in the same order, one shape of days_to_target, and numbers with
# their digits (no 16.900000000000002).
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
H="$HS_BUILD/halostage"
for tool in mosquitto mosquitto_sub; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    -e "s|^database = .*|database = $HS_TMP/history.db|" \
    config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = doc-gateway\n' "$mport" >>"$cfg"

mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/demo-works/pond/c2/state' >"$HS_TMP/mqtt.txt" 2>&1 &
HS_PIDS+=($!)
"$S" --config "$cfg" --speed 300 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
"$D" --config "$cfg" --emit-stdout >"$HS_TMP/emit.txt" 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")

has_density='"density_kg_m3":[0-9]'
check "MQTT: a c2 state with a density reached a subscriber" \
    hs_wait_file_line "$HS_TMP/mqtt.txt" "$has_density" 30
check "emit: pond/c2/state with a density" \
    hs_wait_file_line "$HS_TMP/emit.txt" "^pond/c2/state .*$has_density" 30
stored() { "$H" export --json --config "$cfg" --pond c2 --since 1h 2>/dev/null | grep -q '^{'; }
for ((i = 0; i < 200; i++)); do stored && break; sleep 0.1; done
check "export --json: a stored c2 state" stored
"$H" status --json --config "$cfg" >"$HS_TMP/status.json" 2>"$HS_TMP/status.err"
check "status --json: exit 0" test $? -eq 0
"$H" export --json --config "$cfg" --pond c2 --since 1h >"$HS_TMP/export.json" 2>/dev/null
"$D" --config "$cfg" --once --json >"$HS_TMP/once.json" 2>/dev/null
grep "^pond/c2/state .*$has_density" "$HS_TMP/emit.txt" | tail -1 | cut -d' ' -f3- >"$HS_TMP/emit.json"
grep "$has_density" "$HS_TMP/mqtt.txt" | tail -1 >"$HS_TMP/mqtt.json"

/usr/bin/python3 - "$HS_TMP" >"$HS_TMP/compare.txt" 2>&1 <<'PY'
import json, re, sys
d = sys.argv[1]
docs = {
    "mqtt": json.loads(open(d + "/mqtt.json").readline()),
    "emit": json.loads(open(d + "/emit.json").readline()),
    "status": [p for p in json.load(open(d + "/status.json"))["ponds"] if p["pond"] == "c2"][0],
    "export": [json.loads(l) for l in open(d + "/export.json") if '"density_kg_m3":null' not in l][-1],
    "once": [p for p in map(json.loads, open(d + "/once.json")) if p["pond"] == "c2"][0],
}
docs["once"].pop("signals")  # --once adds the raw signals after the document
keys = {k: list(v) for k, v in docs.items()}
for k, v in keys.items():
    assert v == keys["mqtt"], (k, [x for x in v if x not in keys["mqtt"]],
                               [x for x in keys["mqtt"] if x not in v])
for k, v in docs.items():
    dt = v["days_to_target"]
    assert isinstance(dt, dict) and list(dt) == ["low", "expected", "high"], (k, dt)
    assert v["role"] == "concentrator", (k, v["role"])
    assert isinstance(v["density_kg_m3"], float), (k, v["density_kg_m3"])
# --once knows the pond's geometry: volume from the level
assert docs["once"]["volume_m3"] is not None and docs["once"]["volume_m3"] > 0, docs["once"]
# no binary noise: no number with more than 7 significant digits
for name in ("mqtt.json", "emit.json", "status.json", "export.json", "once.json"):
    text = open(d + "/" + name).read()
    text = re.sub(r'"[^"]*"', '""', text)  # strings (times) aside
    long = re.findall(r'-?\d[\d.]*(?:e[-+]?\d+)?', text)
    reals = [n for n in long if '.' in n or 'e' in n]  # integers (counts, ms) aside
    bad = [n for n in reals if len(re.sub(r'e.*|[-.]', '', n).lstrip('0').rstrip('0')) > 7]
    assert not bad, (name, bad[:5])
print("same", len(keys["mqtt"]), "fields in all five")
PY
rc=$?; [ $rc -ne 0 ] && head -c 1500 "$HS_TMP/mqtt.json" "$HS_TMP/once.json"
cat "$HS_TMP/compare.txt"
check "one document: same fields, same order, same shape, 7 digits in all five outlets" test $rc -eq 0
hs_finish
