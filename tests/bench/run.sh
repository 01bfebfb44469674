#!/usr/bin/env bash
# Runs every benchmark binary and benchmark script; they print their own figures.
set -u
cd "$(dirname "$0")/../.."
build=${1:-build}
rc=0
for b in "$build"/bench/bench_*; do
    [ -x "$b" ] || continue
    echo "=== $(basename "$b")"
    "$b" || rc=1
done
for s in tests/bench/bench_*.sh; do
    [ -f "$s" ] || continue
    echo "=== $(basename "$s")"
    HS_BUILD="$build" bash "$s" || rc=1
done
exit $rc
