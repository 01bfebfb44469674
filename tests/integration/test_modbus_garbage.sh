#!/usr/bin/env bash
# The bus worker against a malicious Modbus TCP server on loopback
# (tests/tools/hs_evil_slave): wrong byte counts, function codes, transaction,
# unit and protocol ids, cut and huge frames, exceptions with any code, random
# bytes, closes and silence, mixed with good replies. The worker must keep
# cycling, mark what it could not read comm-fail, pass the good replies on,
# reconnect after the server drops the link, and leave the other bus (served
# by the simulator) untouched. Under build/san any read past a buffer aborts.
source "$(dirname "$0")/lib.sh"
SIM_BIN="$HS_BUILD/halostage-sim"
D="$HS_BUILD/halostaged"
PROBE="$HS_BUILD/tools/hs_acq_probe"
EVIL="$HS_BUILD/tools/hs_evil_slave"
PY=/usr/bin/python3

PE=$(hs_free_port)
P2=$(hs_free_port)
PS=$(hs_free_port)
while [ "$P2" = "$PE" ]; do P2=$(hs_free_port); done
while [ "$PS" = "$PE" ] || [ "$PS" = "$P2" ]; do PS=$(hs_free_port); done

# The simulator serves the analysers on P2 (its dikes on a spare port); the
# probe reads the dikes from the evil server instead.
common=(-e 's/^poll_interval = .*/poll_interval = 100ms/'
        -e 's/^response_timeout = .*/response_timeout = 200ms/'
        -e 's/^backoff_min = .*/backoff_min = 100ms/'
        -e 's/^backoff_max = .*/backoff_max = 1s/'
        -e "s/^port = 15021/port = $P2/")
sed "${common[@]}" -e "s/^port = 15020/port = $PS/" config/demo.ini >"$HS_TMP/sim.ini"
sed "${common[@]}" -e "s/^port = 15020/port = $PE\nbackoff_min = 100ms\nbackoff_max = 1s/" \
    config/demo.ini >"$HS_TMP/site.ini"

"$SIM_BIN" --config "$HS_TMP/sim.ini" >"$HS_TMP/sim.log" 2>&1 &
SIM=$!
HS_PIDS+=("$SIM")
"$EVIL" --port "$PE" --seed 7 --seconds 120 >"$HS_TMP/evil.out" 2>"$HS_TMP/evil.err" &
EV=$!
HS_PIDS+=("$EV")
check "simulator and evil server listen" hs_wait_port "$P2" 10 && hs_wait_port "$PE" 10

"$PROBE" --config "$HS_TMP/site.ini" --seconds 8 >"$HS_TMP/probe.json" 2>"$HS_TMP/probe.err"
rc=$?
check "bus workers survive 8 s of garbage (exit 0, no sanitizer report)" \
    test "$rc" -eq 0 -a ! -s "$HS_TMP/probe.err"
cat "$HS_TMP/probe.json" "$HS_TMP/probe.err"
check "garbage bus keeps cycling, fails, reconnects, passes good replies on" \
    $PY - "$HS_TMP/probe.json" <<'PYEOF'
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1])]
b = {r["bus"]: r for r in rows if "bus" in r}["dikes"]
s = b["samples"]
data = sum(v for k, v in s.items() if k not in ("comm-fail", "stale"))
ok = (b["cycles"] >= 4 and b["failures"] > 0 and b["exceptions"] > 0
      and b["reconnects"] > 0 and s["comm-fail"] > 0 and data > 0)
print("dikes:", b["cycles"], "cycles", b["transactions"], "transactions", b["failures"],
      "failures", b["exceptions"], "exceptions", b["reconnects"], "reconnects", s)
sys.exit(0 if ok else 1)
PYEOF
check "the other bus is untouched: every sample good, cycles on time" \
    $PY - "$HS_TMP/probe.json" <<'PYEOF'
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1])]
b = {r["bus"]: r for r in rows if "bus" in r}["analysers"]
s = b["samples"]
bad = {k: v for k, v in s.items() if k != "good" and v}
print("analysers:", b["cycles"], "cycles, max", b["max_cycle_ms"], "ms", s)
sys.exit(0 if b["cycles"] >= 20 and not bad and s["good"] > 0 else 1)
PYEOF

# The daemon's one-shot path decodes the same garbage into pond states.
bad=0
for i in $(seq 1 12); do
    "$D" --config "$HS_TMP/site.ini" --once --json >"$HS_TMP/once.json" 2>"$HS_TMP/once.err"
    rc=$?
    lines=$(grep -c '"pond"' "$HS_TMP/once.json")
    if [ "$rc" -gt 1 ] || [ "$lines" -ne 9 ] || grep -q 'Sanitizer\|runtime error' "$HS_TMP/once.err"; then
        echo "run $i: exit $rc, $lines ponds"; cat "$HS_TMP/once.err"; bad=$((bad + 1))
    fi
done
check "halostaged --once against garbage: 12 runs, every pond printed, exit 0 or 1" test "$bad" -eq 0

check "evil server still running (nothing hung it)" kill -0 "$EV"
kill "$EV"; wait "$EV" 2>/dev/null
cat "$HS_TMP/evil.out"
check "every fault kind was served" $PY - "$HS_TMP/evil.out" <<'PYEOF'
import sys
line = open(sys.argv[1]).read().split()
counts = {k: int(v) for k, v in (w.split("=") for w in line[1:])}
print("faults served:", sum(counts.values()))
sys.exit(0 if len(counts) == 16 and all(counts.values()) else 1)
PYEOF
hs_finish
