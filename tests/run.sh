#!/usr/bin/env bash
# Runs every unit test binary and every integration script, for each build
# folder given (plain, then sanitized), and ends with one closing line:
#   total: N passed, N failed
# Unit tests are cmocka binaries (their verdict goes to stderr, so 2>&1).
# Integration scripts print TAP-style "ok - ..." / "not ok - ..." lines; each
# such line counts as one test. A script that exits non-zero without a
# "not ok" line counts as one failure.
set -u
cd "$(dirname "$0")/.."
passed=0
failed=0
failures=()

count_cmocka() {  # $1 = output file
    local p f
    p=$(sed -n 's/^\[  PASSED  \] \([0-9]*\) test.*/\1/p' "$1" | awk '{s+=$1} END {print s+0}')
    f=$(sed -n 's/^\[  FAILED  \] \([0-9]*\) test.*/\1/p' "$1" | awk '{s+=$1} END {print s+0}')
    echo "$p $f"
}

for build in "$@"; do
    [ -d "$build/tests" ] || continue
    echo "=== unit tests ($build)"
    for t in "$build"/tests/test_*; do
        [ -x "$t" ] || continue
        out=$(mktemp)
        "$t" >"$out" 2>&1
        rc=$?
        cat "$out"
        read -r p f < <(count_cmocka "$out")
        if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi
        passed=$((passed + p)); failed=$((failed + f))
        [ "$f" -gt 0 ] && failures+=("$t")
        rm -f "$out"
    done
done

# The integration scripts of each build run as one stream; the streams of
# the builds run side by side (most of a script's time is waiting on a
# daemon, a broker or a browser, not computing), and their logs are shown in
# order afterwards. HS_SERIAL=1 runs them one build after the other.
integration_stream() {  # BUILD LOGFILE RESULTFILE
    local build=$1 log=$2 res=$3 s out t0 rc p f np=0 nf=0 fails=""
    for s in tests/integration/test_*.sh; do
        [ -f "$s" ] || continue
        out=$(mktemp)
        t0=$SECONDS
        HS_BUILD="$build" timeout 600 bash "$s" >"$out" 2>&1
        rc=$?
        p=$(grep -c '^ok ' "$out")
        f=$(grep -c '^not ok ' "$out")
        {
            echo "=== integration $(basename "$s") ($build)"
            cat "$out"
            if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then echo "not ok - $s exited $rc"; fi
            echo "# $(basename "$s") ($build) took $((SECONDS - t0)) s"
        } >>"$log"
        if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi
        np=$((np + p)); nf=$((nf + f))
        [ "$f" -gt 0 ] && fails="$fails $s($build)"
        rm -f "$out"
    done
    echo "$np $nf$fails" >"$res"
}

streams=()
for build in "$@"; do
    log=$(mktemp); res=$(mktemp)
    streams+=("$log:$res")
    if [ "${HS_SERIAL:-0}" = 1 ]; then
        integration_stream "$build" "$log" "$res"
    else
        integration_stream "$build" "$log" "$res" &
    fi
done
wait
for st in "${streams[@]}"; do
    log=${st%%:*}; res=${st#*:}
    cat "$log"
    read -r p f rest <"$res"
    passed=$((passed + p)); failed=$((failed + f))
    for x in $rest; do failures+=("$x"); done
    rm -f "$log" "$res"
done

if [ "${#failures[@]}" -gt 0 ]; then
    echo "failing: ${failures[*]}"
fi
echo "total: $passed passed, $failed failed"
[ "$failed" -eq 0 ] && [ "$passed" -gt 0 ]
