#!/usr/bin/env bash
# Our PSS-78 against TEOS-10 gsw.SP_from_C over a large numpy array:
# ns per value for each, and the ratio. gsw is vectorised C called once for
# the whole array; ours is called once per value, as the daemon does.
set -u
bin=${HS_BUILD:-build}/bench/bench_calc
ours=$("$bin" --pss78-ns) || { echo "bench_calc failed" >&2; exit 1; }
/usr/bin/python3 - "$ours" <<'PY'
import sys, time
import numpy as np
import gsw
ours = float(sys.argv[1])
n = 2_000_000
rng = np.random.default_rng(7)
t = rng.uniform(-2.0, 40.0, n)
p = np.where(rng.random(n) < 0.25, 0.0, rng.uniform(0.0, 5.0, n))
c = gsw.C_from_SP(rng.uniform(1.0, 42.0, n), t, p)  # same spread as bench_calc
best = float("inf")
for _ in range(5):
    t0 = time.perf_counter()
    gsw.SP_from_C(c, t, p)
    best = min(best, time.perf_counter() - t0)
theirs = best / n * 1e9
print(f"gsw {gsw.__version__} SP_from_C (numpy, {n} values): {theirs:8.1f} ns per value")
print(f"halostage pss78 per value:                {ours:8.1f} ns per value")
print(f"ratio ours / gsw:                         {ours / theirs:8.2f}")
PY
