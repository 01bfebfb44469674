#!/usr/bin/env bash
# The forecast against the pond-chain simulator's own evolution: the
# simulator (its own invented evaporation law, EOS-80/linear densities,
# rain events, seasons; tests/sim) runs a closed concentrator fast; after a
# 10-day window the net rate is measured from its depths as an operator's
# balance would, `halostage forecast` predicts the days until the salinity
# has risen by a third, and the simulator then shows how long it took.
# The errors are printed. The checks allow 30 % (the simulator's weather
# changes after the window: seasons, rain) and 25 % in hindsight (its
# salt-per-depth bookkeeping and coarse steps at this speed differ from the
# mass balance the forecast integrates).
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
SIM=$HS_BUILD/halostage-sim
PY=/usr/bin/python3
PORT=$(hs_free_port)
CFG=$HS_TMP/sim.ini
cat >"$CFG" <<INI
[site]
name = simfc
latitude = 38.5
reference_temperature = 20 C
[bus plc]
type = tcp
host = 127.0.0.1
port = $PORT
unit_ids = 1
[pond c3]
role = concentrator
density_in = 1100 kg/m3
density_out = 1140 kg/m3
level_min = 0.30 m
level_max = 0.50 m
freeboard = 0.8 m
area = 20 ha
INI
TRUTH=$HS_TMP/truth.json
"$SIM" --config "$CFG" --speed 500000 --truth "$TRUTH" >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_file_line "$TRUTH" ponds 10 || { not_ok "simulator started"; hs_finish; }
ok "simulator started"
# Watch the truth file (bounded: at most 120 s of wall time) and do the
# forecast from inside the watcher when the 10-day window has passed.
$PY - "$TRUTH" "$HS" "$CFG" <<'PYEOF'
import json, subprocess, sys, time
truth, hs, cfg = sys.argv[1:4]
def read():
    for _ in range(50):
        try:
            with open(truth) as f:
                d = json.load(f)
            return d["time_s"], d["ponds"]["c3"]
        except (OSError, ValueError, KeyError):
            time.sleep(0.02)
    raise SystemExit("not ok - truth file unreadable")
t0, p0 = read()
deadline = time.time() + 120
t, p = t0, p0
while t - t0 < 10 * 86400 and time.time() < deadline:
    time.sleep(0.05); t, p = read()
days = (t - t0) / 86400
rate = (p0["depth_m"] - p["depth_m"]) * 1000 / days
s_now = p["salinity_g_kg"]
s_target = s_now * 4 / 3
# The simulator keeps salt per unit depth: the target is reached when the
# depth has fallen to 3/4. As a concentration factor (water mass basis) the
# same step is k = [S_t / (1000 - S_t)] / [S / (1000 - S)].
k = (s_target / (1000 - s_target)) / (s_now / (1000 - s_now))
base = [hs, "forecast", "--level", "%.6f" % p["depth_m"], "--density", "%.4f" % p["density_kg_m3"],
        "--temperature", "%.3f" % p["temperature_c"], "--area", "200000",
        "--rate-mm-day", "%.6f" % rate, "--humidity", "0", "--json"]
now = json.loads(subprocess.run(base, capture_output=True, text=True, check=True).stdout)
cf_target = now["concentration_factor"] * k
fc = json.loads(subprocess.run(base + ["--target-cf", "%.6f" % cf_target],
                               capture_output=True, text=True, check=True).stdout)
predicted = fc["days_to_target"]["expected"]
t_start, d_start = t, p["depth_m"]
while p["salinity_g_kg"] < s_target and time.time() < deadline:
    time.sleep(0.05); t, p = read()
if p["salinity_g_kg"] < s_target:
    print("not ok - simulator reached the target salinity within the time limit"); sys.exit(0)
actual = (t - t_start) / 86400
err = (predicted - actual) / actual
print("# simulator: net rate %.2f mm/day over %.1f days; salinity %.1f -> %.1f g/kg"
      % (rate, days, s_now, s_target))
sim_rate = (d_start - p["depth_m"]) * 1000 / actual
# In hindsight: the forecast given the simulator's own mean rate over the
# period (no activity scaling: the mean already holds it). What is left is
# the bookkeeping: the simulator keeps salt per unit depth, the forecast
# conserves water and salt mass along the path (13 % more water to remove
# for this step, worked by hand from the densities).
hind = json.loads(subprocess.run(base[:-3] + ["--json", "--rate-mm-day", "%.6f" % sim_rate,
                                  "--target-cf", "%.6f" % cf_target],
                                 capture_output=True, text=True, check=True).stdout)
# base[:-3] drops --humidity 0 --json; --rate-mm-day given again wins.
hind_days = hind["days_to_target"]["expected"]
err_h = (hind_days - actual) / actual
print("# simulator's own mean rate over that period: %.2f mm/day (weather changed)" % sim_rate)
print("# forecast %.1f days, simulator %.1f days: error %+.1f %%" % (predicted, actual, 100 * err))
print("# in hindsight (its own mean rate): %.1f days, error %+.1f %%" % (hind_days, 100 * err_h))
print(("ok" if abs(err) < 0.30 else "not ok") +
      " - forecast within 30 %% of the simulator (%+.1f %%)" % (100 * err))
print(("ok" if abs(err_h) < 0.25 else "not ok") +
      " - in hindsight within 25 %% (%+.1f %%)" % (100 * err_h))
PYEOF
hs_finish
