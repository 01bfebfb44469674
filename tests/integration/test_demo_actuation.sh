#!/usr/bin/env bash
# `make demo` as a user runs it (mk/demo.sh, its minute at 600x): the
# actuated feed from the brine store to crystalliser x1 runs a full cycle,
# in order, in the daemon's log and on the demo's screen: it starts (RUN
# written), the run feedback confirms, and it stops on its own rule (STOP
# written before the shutdown), all before the demo ends.
. "$(dirname "$0")/lib.sh"

out="$HS_BUILD/demo"
HS_DEMO_SECONDS=${HS_DEMO_SECONDS:-60} bash mk/demo.sh "$HS_BUILD" >"$HS_TMP/screen.txt" 2>&1
check "the demo ran and stopped everything it started" \
    grep -q "everything the demo started is stopped" "$HS_TMP/screen.txt"
log="$out/halostaged.log"
/usr/bin/python3 - "$log" >"$HS_TMP/cycle.txt" 2>&1 <<'PY'
import re, sys
lines = [l.rstrip("\n") for l in open(sys.argv[1])]
def first(pattern, after=-1):
    for i, l in enumerate(lines):
        if i > after and re.search(pattern, l):
            return i
    return None
run = first(r"\[transfer store-to-x1\]: pump output RUN written")
fb = first(r"\[transfer store-to-x1\]: run feedback confirms the pump is running", run if run is not None else 10**9)
stop = first(r"\[transfer store-to-x1\]: (idle|blocked|wait) \(", fb if fb is not None else 10**9)
written = first(r"\[transfer store-to-x1\]: pump output STOP written", stop if stop is not None else 10**9)
shutdown = first(r"\[transfer store-to-x1\]: pump output set to STOP for shutdown")
ok = None not in (run, fb, stop, written, shutdown) and written < shutdown
print("ok" if ok else "missing", run, fb, stop, written, shutdown,
      lines[stop].split(": ", 2)[-1] if stop is not None else "")
PY
check "store -> x1: RUN written, feedback confirms, stops on its rule before the end ($(cat "$HS_TMP/cycle.txt"))" \
    grep -q '^ok ' "$HS_TMP/cycle.txt"
check "the screen lists the cycle at the end" \
    grep -qE '^  \[transfer store-to-x1\]: run feedback confirms the pump is running' "$HS_TMP/screen.txt"
hs_finish
