#!/usr/bin/env bash
# `halostage forecast` and `halostage plan` as operators run them: from
# explicit inputs, from a configuration, and from a real SQLite store; and a
# one-line reason with a nonzero exit for bad input.
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
PY=/usr/bin/python3
field() { $PY -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }

# ---- forecast from explicit inputs ----------------------------------------
out=$HS_TMP/f.json
"$HS" forecast --level 0.5 --density 1150 --temperature 25 --area 40000 \
    --rate-mm-day 6 --rate-spread 1 --target-density 1200 --json >"$out"
check "forecast --json exits 0" test $? -eq 0
for f in depth_m volume_m3 dissolved_salt_t deposited_salt_t net_evaporation_mm_day \
         days_to_target days_to_next_stage concentration_factor stage next_stage; do
    [ "$(field "$out" "'$f' in d")" = True ] || not_ok "forecast JSON lacks $f"
done
ok "forecast JSON carries the hydrology fields"
# Worked by hand: 4 ha with vertical walls, 0.5 m deep, holds 20000 m3.
check "volume of a vertical-walled pond" test "$(field "$out" 'round(d["volume_m3"], 6)')" = 20000.0
check "range ordered low < expected < high" test "$(field "$out" \
    'd["days_to_target"]["low"] < d["days_to_target"]["expected"] < d["days_to_target"]["high"]')" = True
check "next stage (halite) after the target" test "$(field "$out" \
    'd["next_stage"] == "halite" and d["days_to_next_stage"]["expected"] > d["days_to_target"]["expected"]')" = True
# Worked by hand: a closed pond of constant area evaporating at E takes
# time inversely proportional to E (no humidity given: no activity scaling).
"$HS" forecast --level 0.5 --density 1150 --temperature 25 --area 40000 \
    --rate-mm-day 4 --target-density 1200 --json >"$HS_TMP/f4.json"
"$HS" forecast --level 0.5 --density 1150 --temperature 25 --area 40000 \
    --rate-mm-day 8 --target-density 1200 --json >"$HS_TMP/f8.json"
r=$($PY -c "import json; a=json.load(open('$HS_TMP/f4.json')); b=json.load(open('$HS_TMP/f8.json')); print(round(a['days_to_target']['expected']/b['days_to_target']['expected'], 6))")
check "days scale as 1/rate for a closed pond (ratio $r)" test "$r" = 2.0
# Humid air slows the forecast as the brine's water activity falls.
"$HS" forecast --level 0.5 --density 1150 --temperature 25 --area 40000 \
    --rate-mm-day 4 --target-density 1200 --humidity 0.5 --json >"$HS_TMP/fh.json"
check "activity scaling lengthens the forecast" test "$($PY -c "import json; a=json.load(open('$HS_TMP/f4.json')); b=json.load(open('$HS_TMP/fh.json')); print(b['days_to_target']['expected'] > a['days_to_target']['expected'])")" = True
text=$("$HS" forecast --level 0.5 --density 1150 --temperature 25 --area 40000 --rate-mm-day 6 \
    --rate-spread 1 --target-density 1200)
check "table shows the range" grep -qE 'to 1200.0 kg/m3 +[0-9]+ days \(range [0-9]+ to [0-9]+\)' <<<"$text"

# A stage-storage table, and a broken one named by file and line.
printf 'level_m,volume_m3,area_m2\n0,0,40000\n0.5,20100,40400\n1.0,40400,40800\n' >"$HS_TMP/p.csv"
"$HS" forecast --level 0.5 --density 1150 --temperature 25 --stage-storage "$HS_TMP/p.csv" \
    --rate-mm-day 6 --json >"$out"
check "stage-storage table gives the surveyed volume" \
    test "$(field "$out" 'round(d["volume_m3"], 6)')" = 20100.0
printf 'level_m,volume_m3\n0,0\n0.5,20100\n0.4,40400\n' >"$HS_TMP/bad.csv"

# refuse CODE PATTERN ARGS...: exit CODE and a stderr line matching PATTERN.
refuse() {
    local code=$1 pat=$2; shift 2
    local err=$HS_TMP/err rc
    "$HS" "$@" >/dev/null 2>"$err"; rc=$?
    if [ "$rc" -eq "$code" ] && grep -qE -- "$pat" "$err"; then ok "refused ($code): $*"
    else not_ok "expected exit $code and /$pat/ for: $* (got $rc: $(head -c 300 "$err"))"; fi
}
refuse 2 "bad.csv:4: level_m must increase" forecast --level 0.5 --density 1150 \
    --temperature 25 --stage-storage "$HS_TMP/bad.csv" --rate-mm-day 6
refuse 2 "the current level is missing" forecast --density 1150 --temperature 25 --area 4e4
refuse 2 "level -0.1: |'-0.1' must not be negative" forecast --level -0.1 --density 1150 \
    --temperature 25 --area 4e4
refuse 2 "--humidity must be in 0..1" forecast --level 0.5 --density 1150 --temperature 25 \
    --area 4e4 --humidity 60
refuse 2 "--rate-mm-day: 'fast' is not a number" forecast --rate-mm-day fast
refuse 2 "brine temperature is unknown" forecast --level 0.5 --density 1150 --area 4e4
refuse 2 "outside its geometry" forecast --level 12 --density 1150 --temperature 25 --area 4e4
refuse 2 "unknown option '--depth'" forecast --depth 3

# ---- plan from explicit inputs --------------------------------------------
pl=$HS_TMP/p.json
"$HS" plan --target-density 1100 --temperature 25 --from-level 0.5 --from-density 1180 \
    --from-area 30000 --from-min-level 0.2 --to-level 0.3 --to-density 1050 --to-area 40000 \
    --to-max-level 0.6 --to-band 1060,1120 --json >"$pl"
check "plan within limits exits 0" test $? -eq 0
check "plan lands on the target (from the mixed composition)" \
    test "$(field "$pl" 'abs(d["mix_density_kg_m3"] - 1100) <= 0.01')" = True
# Worked by hand: vertical walls, so the source drops by volume / area.
check "source level after = level - volume / area" test "$(field "$pl" \
    'abs(d["source_level_after_m"] - (0.5 - d["volume_m3"] / 30000)) < 1e-6')" = True
check "destination rises by about the volume moved" test "$(field "$pl" \
    'abs(d["destination_volume_after_m3"] - (12000 + d["volume_m3"])) / d["destination_volume_after_m3"] < 0.01')" = True
check "no interlock" test "$(field "$pl" 'd["interlocks"] == [] and d["ok"]')" = True
"$HS" plan --target-density 1100 --temperature 25 --from-level 0.5 --from-density 1180 \
    --from-area 30000 --from-min-level 0.45 --to-level 0.3 --to-density 1050 --to-area 40000 \
    --to-max-level 0.35 --json >"$pl"
check "plan breaking limits exits 1" test $? -eq 1
check "interlocks named" test "$(field "$pl" '",".join(d["interlocks"])')" = \
    "source-below-minimum-level,destination-above-maximum-level"
"$HS" plan --target-density 1200 --temperature 25 --from-level 0.5 --from-density 1180 \
    --from-area 30000 --to-level 0.3 --to-density 1050 --to-area 40000 --json >"$pl"
check "unreachable target exits 1" test $? -eq 1
check "unreachable named" test "$(field "$pl" 'd["interlocks"]')" = "['target-unreachable']"
check "unreachable: every figure null, none 0.0 (an empty pond)" test "$(field "$pl" \
    'all(d[k] is None for k in ("volume_m3", "mix_density_kg_m3", "destination_level_after_m", "destination_volume_after_m3", "source_level_after_m"))')" = True
refuse 2 "--target-density is required" plan --from-level 1
refuse 2 "the current density is missing" plan --target-density 1100 --temperature 25 \
    --from-level 0.5 --from-area 3e4 --to-level 0.3 --to-density 1050 --to-area 4e4
refuse 2 "LOW must be below HIGH" plan --target-density 1100 --to-band 1120,1060

# ---- with a configuration and a store --------------------------------------
cfg=$HS_TMP/site.ini
cat >"$cfg" <<INI
[site]
name = it
database = hist.db
latitude = 38.5
reference_temperature = 20 C
[bus plc]
type = tcp
host = 127.0.0.1
port = 15020
unit_ids = 1
[pond c3]
role = concentrator
next = x1
density_in = 1100 kg/m3
density_out = 1180 kg/m3
level_min = 0.15 m
level_max = 0.45 m
freeboard = 0.75 m
area = 20 ha
side_slope = 3
[pond x1]
role = crystalliser
density_in = 1210 kg/m3
density_out = 1250 kg/m3
level_min = 0.1 m
level_max = 0.35 m
freeboard = 0.6 m
stage_storage = p.csv
INI
"$HS" forecast --config "$cfg" --pond c3 --level 0.3 --density 1120 --temperature 25 \
    --rate-mm-day 5 --json >"$out"
check "forecast --config: pond named, target from density_out" \
    test "$(field "$out" 'd["pond"] + " " + str(d["target_density_kg_m3"])')" = "c3 1180.0"
check "forecast --config: reference temperature from [site]" \
    test "$(field "$out" 'd["reference_temperature_c"]')" = 20.0
check "forecast --config: crystalliser reports deposited salt" test "$("$HS" forecast \
    --config "$cfg" --pond x1 --level 0.3 --density 1225 --temperature 25 --rate-mm-day 5 \
    --json | $PY -c 'import json,sys; print(json.load(sys.stdin)["deposited_salt_t"] is not None)')" = True
# A real SQLite store with 7 days of the daemon's daily rates 4,5,6 (cycling).
"$HS_BUILD/tools/hydro_seed_store" "$HS_TMP/hist.db" c3 7 0.32 1120 24 4,5,6
check "store seeded" test $? -eq 0
"$HS" forecast --config "$cfg" --pond c3 --json >"$out"
check "forecast from the store exits 0" test $? -eq 0
# Rates 4,5,6,4,5,6,4: mean 34/7, 7 days (worked by hand).
check "rate from the store's daily balances" test "$(field "$out" \
    'd["net_evaporation_days"] == 7 and abs(d["net_evaporation_mm_day"] - 34/7) < 1e-9')" = True
check "level and density from the store" test "$(field "$out" \
    'd["depth_m"] == 0.32 and d["density_kg_m3"] == 1120')" = True
"$HS" forecast --config "$cfg" >"$HS_TMP/all.txt" 2>"$HS_TMP/all.err"
check "forecast of every pond names them" grep -q '^pond c3' "$HS_TMP/all.txt"
"$HS" plan --config "$cfg" --from c3 --to x1 --target-density 1215 --from-density 1230 \
    --to-level 0.2 --to-density 1212 --json >"$pl"
rc=$?
check "plan --config runs (exit $rc)" test "$rc" -le 1
check "plan --config names both ponds" test "$(field "$pl" 'd["from"] + ">" + d["to"]')" = "c3>x1"
refuse 2 "no pond 'c9'" forecast --config "$cfg" --pond c9
refuse 2 "name both ponds" plan --config "$cfg" --from c3 --target-density 1200
cp "$HS_TMP/bad.csv" "$HS_TMP/p.csv"
refuse 78 "site.ini:[0-9]+: stage_storage: .*p.csv:4: level_m must increase" forecast --config "$cfg" --pond x1 --level 0.3 \
    --density 1225 --temperature 25 --rate-mm-day 5
"$HS_BUILD/halostaged" --config "$cfg" --check >/dev/null 2>"$HS_TMP/chk.err"
rc=$?
check "halostaged --check refuses the non-monotone table (exit $rc) with both files' lines" \
    grep -qE "site.ini:[0-9]+: stage_storage: .*p.csv:4: level_m must increase" "$HS_TMP/chk.err"
echo "[site]" >"$HS_TMP/broken.ini"
refuse 78 "broken.ini" forecast --config "$HS_TMP/broken.ini"
hs_finish
