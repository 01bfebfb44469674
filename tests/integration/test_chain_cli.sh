#!/usr/bin/env bash
# `halostage chain` from a real SQLite store of the demo site: the schedule
# as JSON (every day, transfer and pond; water and ions balance), rain
# blocks the rain-guarded intake transfer, the text form, and one-line
# refusals for bad input.
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
PY=/usr/bin/python3
cfg=$HS_TMP/site.ini
sed "s|^database = .*|database = $HS_TMP/h.db|" config/demo.ini >"$cfg"
while read -r pond depth rho; do
    "$HS_BUILD/tools/hydro_seed_store" "$HS_TMP/h.db" "$pond" 5 "$depth" "$rho" 25 5,6,5 ||
        not_ok "seeding $pond"
done <<'EOF_STATES'
intake 0.8 1024
c1 0.4 1045
c2 0.35 1080
c3 0.3 1125
c4 0.3 1170
store 1.2 1205
x1 0.25 1225
x2 0.25 1225
bittern 0.8 1260
EOF_STATES

out=$HS_TMP/chain.json
"$HS" chain --config "$cfg" --days 30 --rain-mm 2:12,9:3.5 --humidity 0.6 --json >"$out"
check "chain --json exits 0" test $? -eq 0
check "30 days, each with every transfer and pond" test "$($PY - "$out" <<'PY'
import json, sys
d = json.load(open(sys.argv[1]))
ok = d["days_planned"] == 30 and len(d["days"]) == 30 and d["advice_only"] is True
ok = ok and all(len(x["ponds"]) == 9 and len(x["transfers"]) == 8 for x in d["days"])
print(ok)
PY
)" = True
check "water and ions balance to 1e-9" test "$($PY -c "import json; b=json.load(open('$out'))['balance']; print(b['water_residual_relative'] < 1e-9 and b['ion_residual_relative'] < 1e-9)")" = True
check "rain on day 2 blocks the rain-guarded intake transfer" test "$($PY -c "
import json; d=json.load(open('$out'))
t=[x for x in d['days'][1]['transfers'] if x['transfer']=='intake-feed'][0]
print(t['advice'] == 'blocked' and 'rain' in t['reasons'])")" = True
check "hours = volume / rated flow, within a day" test "$($PY -c "
import json; d=json.load(open('$out'))
print(all(0 <= t['hours'] <= 24 and (t['volume_m3'] == 0 or t['hours'] > 0) for x in d['days'] for t in x['transfers']))")" = True
check "the store-to-x1 rule (stage trigger, halite) is followed" test "$($PY -c "
import json; d=json.load(open('$out'))
ok=True
for x in d['days']:
    t=[y for y in x['transfers'] if y['transfer']=='store-to-x1'][0]
    if t['advice']=='run': ok = ok and 'trigger-not-met' not in t['reasons']
print(ok)")" = True
# Penman from the weather gives a schedule too, and says so.
"$HS" chain --config "$cfg" --days 3 --air-min 18 --air-max 29 --humidity 0.55 --wind 3 \
    --solar 26 --json >"$HS_TMP/p.json"
check "Penman evaporation used" test "$($PY -c "import json; d=json.load(open('$HS_TMP/p.json')); print(d['evaporation_source']=='penman' and 3 < d['penman_mm_day'] < 12)")" = True
text=$("$HS" chain --config "$cfg" --days 2)
check "text form lists transfers and ponds" grep -qE '^  pond c4 ' <<<"$text"
check "text form says it is advice" grep -q 'advice only' <<<"$text"

refuse() {
    local code=$1 pat=$2; shift 2
    local err=$HS_TMP/err rc
    "$HS" "$@" >/dev/null 2>"$err"; rc=$?
    if [ "$rc" -eq "$code" ] && grep -qE -- "$pat" "$err"; then ok "refused ($code): $*"
    else not_ok "expected exit $code and /$pat/ for: $* (got $rc: $(head -c 300 "$err"))"; fi
}
refuse 2 "--config FILE is needed" chain --days 3
refuse 2 "--days must be a whole number" chain --config "$cfg" --days 0
refuse 2 "not DAY:MM" chain --config "$cfg" --days 3 --rain-mm 5:2
refuse 2 "not DAY:MM" chain --config "$cfg" --rain-mm 1:x
refuse 2 "Penman evaporation needs" chain --config "$cfg" --air-min 10
refuse 2 "--humidity must be in 0..1" chain --config "$cfg" --humidity 60
sed "s|^database = .*|database = $HS_TMP/empty.db|" config/demo.ini >"$HS_TMP/empty.ini"
refuse 1 "pond intake: no state in the store" chain --config "$HS_TMP/empty.ini"
hs_finish
