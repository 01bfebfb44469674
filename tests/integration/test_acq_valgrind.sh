#!/usr/bin/env bash
# valgrind over many poll cycles of the bus workers (with a bus whose device
# drops every connection, so reconnects and backoff run too) and over --once:
# no leaks, no invalid accesses. Plain build only: valgrind cannot run
# AddressSanitizer binaries.
source "$(dirname "$0")/lib.sh"
case "$HS_BUILD" in *san*) exit 0 ;; esac
SIM_BIN="$HS_BUILD/halostage-sim"
PY=/usr/bin/python3
VG="valgrind --error-exitcode=99 --leak-check=full --errors-for-leak-kinds=definite,indirect --show-leak-kinds=definite,indirect --track-fds=no"

P1=$(hs_free_port)
P2=$(hs_free_port)
while [ "$P2" = "$P1" ]; do P2=$(hs_free_port); done
CFG="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $P1/" -e "s/^port = 15021/port = $P2/" \
    -e 's/^poll_interval = .*/poll_interval = 100ms/' \
    -e 's/^response_timeout = .*/response_timeout = 200ms/' \
    -e 's/^backoff_min = .*/backoff_min = 50ms/' -e 's/^backoff_max = .*/backoff_max = 200ms/' \
    config/demo.ini >"$CFG"
"$SIM_BIN" --config "$CFG" --fault dikes=drop --fault analysers:9=exception >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=("$!")
check "simulator starts" hs_wait_port "$P2" 10

$VG "$HS_BUILD/tools/hs_acq_probe" --config "$CFG" --seconds 4 >"$HS_TMP/probe.json" 2>"$HS_TMP/vg1.log"
rc=$?
check "valgrind: bus workers over many cycles, no errors or leaks (rc $rc)" test "$rc" -eq 0
check "valgrind run covered many cycles and reconnects" $PY - "$HS_TMP/probe.json" <<'PYEOF'
import json, sys
b = {o["bus"]: o for o in map(json.loads, open(sys.argv[1])) if "bus" in o}
print(b["analysers"]["cycles"], b["dikes"]["reconnects"], b["analysers"]["exceptions"])
sys.exit(0 if b["analysers"]["cycles"] >= 15 and b["dikes"]["reconnects"] >= 3
         and b["analysers"]["exceptions"] > 0 else 1)
PYEOF
$VG "$HS_BUILD/halostaged" --config "$CFG" --once --json >"$HS_TMP/once.json" 2>"$HS_TMP/vg2.log"
rc=$?
check "valgrind: --once, no errors or leaks (rc $rc, 1 = some signal not good)" test "$rc" -eq 1
[ "$hs_failed" -eq 0 ] || tail -40 "$HS_TMP/vg1.log" "$HS_TMP/vg2.log"
hs_finish
