#!/usr/bin/env bash
# The daemon publishes the chain schedule retained on
# <prefix>/<site>/schedule (real mosquitto, the simulator, a store seeded
# with a few days of achieved evaporation): a late subscriber gets it, it is
# advice only, and it covers every pond and transfer of the site.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
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
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = chain-gateway\n' "$mport" >>"$cfg"
# Achieved net evaporation of the days before (the daemon's own balance
# needs a day to give its first).
for pond in intake c1 c2 c3 c4 store x1 x2 bittern; do
    "$HS_BUILD/tools/hydro_seed_store" "$HS_TMP/history.db" "$pond" 4 0.3 1100 25 4,5 ||
        not_ok "seeding $pond"
done

"$S" --config "$cfg" --speed 60 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
"$D" --config "$cfg" >"$HS_TMP/daemon.out" 2>"$HS_TMP/daemon.log" &
HS_PIDS+=($!)
check "the daemon logs a published schedule" \
    hs_wait_file_line "$HS_TMP/daemon.log" "schedule: 7 days published" 120
grep -q "schedule: 7 days published" "$HS_TMP/daemon.log" ||
    echo "# daemon log: $(tail -5 "$HS_TMP/daemon.log")"
# A subscriber that comes later still gets it: retained.
mosquitto_sub -h 127.0.0.1 -p "$mport" -t 'halostage/demo-works/schedule' -C 1 -W 20 \
    >"$HS_TMP/schedule.json" 2>"$HS_TMP/sub.err"
check "a late subscriber gets the retained schedule" test -s "$HS_TMP/schedule.json"
check "the schedule: advice only, 7 days of every pond and transfer" test "$(/usr/bin/python3 - \
    "$HS_TMP/schedule.json" <<'PY'
import json, sys
d = json.loads(open(sys.argv[1]).readline())
ok = d["advice_only"] is True and d["site"] == "demo-works" and d["days_planned"] == 7
ok = ok and all(len(x["ponds"]) == 9 and len(x["transfers"]) == 8 for x in d["days"])
ok = ok and d["balance"]["water_residual_relative"] < 1e-9
print(ok)
PY
)" = True
grep -q "schedule:" "$HS_TMP/daemon.log" || not_ok "no schedule line in the log: $(tail -5 "$HS_TMP/daemon.log")"
hs_finish
