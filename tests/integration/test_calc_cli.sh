#!/usr/bin/env bash
# `halostage calc` as operators run it: JSON fields, the table, and a
# one-line reason with a nonzero exit for every kind of bad input.
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
PY=/usr/bin/python3

# field FILE EXPR: evaluates a Python expression over the parsed JSON `d`.
field() { $PY -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }

out=$HS_TMP/std.json
"$HS" calc --conductivity 42.914 --temperature 15 --json >"$out"
check "calc --json exits 0 for standard seawater" test $? -eq 0
# Issue 2 "done when": within the ITS-90 shift of 35; gsw 3.6 gives 34.99677 [C].
check "practical_salinity within the ITS-90 shift of 35" \
    test "$(field "$out" 'abs(d["practical_salinity"] - 34.99677) < 1e-5')" = True
for f in practical_salinity salinity_g_kg density_kg_m3 temperature_c specific_gravity \
         reference_temperature_c baume concentration_factor stage next_stage \
         next_stage_density_kg_m3 saturation_index water_activity method warnings; do
    [ "$(field "$out" "'$f' in d")" = True ] || not_ok "JSON lacks $f"
done
ok "JSON carries every brine-state field"
check "method and stage by name" \
    test "$(field "$out" 'd["method"] + "/" + d["stage"]')" = "pss78/seawater"
# EOS-80 at S_P 34.99677, 15 degC (Millero & Poisson 1981) is 1025.9695 kg/m3 [C]
check "density from EOS-80" test "$(field "$out" 'round(d["density_kg_m3"], 3)')" = 1025.969

"$HS" calc --density 1025 --temperature 20 --reference-temperature 60F --modulus 146.78 \
    --json >"$out"
check "density input: method density" test "$(field "$out" 'd["method"]')" = density
check "60F reference temperature recorded" \
    test "$(field "$out" 'round(d["reference_temperature_c"], 4)')" = 15.5556
check "modulus recorded" test "$(field "$out" 'd["baume_modulus"]')" = 146.78

table=$("$HS" calc --conductivity 53.07 --temperature 25)
check "table names the degree Baume and modulus" grep -q 'deg Be (modulus 145)' <<<"$table"
check "table gives the practical salinity" grep -qE 'practical salinity +34\.99' <<<"$table"

# refuse CODE PATTERN ARGS...: nonzero exit CODE, one stderr line matching PATTERN.
refuse() {
    local code=$1 pat=$2 err=$HS_TMP/err
    shift 2
    "$HS" calc "$@" >/dev/null 2>"$err"
    local rc=$?
    if [ "$rc" -eq "$code" ] && [ "$(wc -l <"$err")" -eq 1 ] && grep -qE -- "$pat" "$err"; then
        ok "refused ($rc): $*"
    else
        not_ok "calc $* gave rc=$rc: $(cat "$err")"
    fi
}
# Beyond PSS-78/EOS-80 the evaporation path takes over (test_thermo_cli.sh
# checks its numbers); here only that it answers, and says how.
"$HS" calc --conductivity 200 --temperature 25 --json >"$out"
check "beyond PSS-78: brine conductivity model, flagged" \
    test "$(field "$out" 'd["method"] + " " + " ".join(d["warnings"])')" = \
    "brine-conductivity-model brine-conductivity-model"
"$HS" calc --density 1210 --temperature 25 --json >"$out"
check "beyond EOS-80: from density along the path" \
    test "$(field "$out" 'd["method"] + "/" + d["stage"]')" = "density/gypsum"
refuse 1 'below pure water' --density 990 --temperature 25
refuse 1 'cannot be negative' --conductivity -3 --temperature 25
refuse 1 '--temperature 50: outside' --conductivity 40 --temperature 50
refuse 1 '--temperature -5: outside' --conductivity 40 --temperature -5
refuse 1 '--pressure 20000: outside' --conductivity 40 --temperature 10 --pressure 20000
refuse 1 '--pressure -1: outside' --conductivity 40 --temperature 10 --pressure -1
refuse 2 "not a number" --conductivity nan --temperature 25
refuse 2 "not a number" --conductivity 40 --temperature abc
refuse 2 "unknown unit 'x' for a conductivity" --conductivity 40x --temperature 25
refuse 2 "exactly one of" --temperature 25
refuse 2 "exactly one of" --conductivity 40 --density 1025 --temperature 25
refuse 2 "required" --conductivity 40
refuse 2 "needs a value" --conductivity 40 --temperature
refuse 2 "unknown option" --conductivity 40 --temperature 25 --colour red
refuse 2 "unknown feed" --conductivity 40 --temperature 25 --feed lagoon
# numbers out of range exit 1 and text that is not a decimal number exits 2
# (halostage(1), EXIT STATUS)
refuse 1 "positive" --conductivity 40 --temperature 25 --modulus 0
refuse 1 "outside" --conductivity 40 --temperature 25 --reference-temperature 70
refuse 1 "more than any brine conducts" --conductivity 1e6 --temperature 25
refuse 2 "not a decimal number" --conductivity 0x10 --temperature 25
refuse 2 "not a decimal number" --conductivity 40 --temperature 0x19
refuse 2 "not a decimal number" --density 0x1p10 --temperature 25
# Continuity where PSS-78 hands over to the brine conductivity model (S_P
# 42): just below and just above the join, at every 5 degC from 0 to 40,
# density within 0.1 kg/m3 and CF within 0.1 %. The join's conductivity is
# PSS-78's own, from TEOS-10 gsw.C_from_SP (the reference library).
/usr/bin/python3 - "$HS" <<'PY' >"$HS_TMP/join.txt" 2>&1
import json, subprocess, sys
import gsw
worst_rho = worst_cf = 0.0
for t in range(0, 41, 5):
    c42 = float(gsw.C_from_SP(42.0, t, 0.0))
    side = []
    for c in (c42 * (1 - 1e-5), c42 * (1 + 1e-5)):
        r = subprocess.run([sys.argv[1], "calc", "--conductivity", "%.6f" % c, "--temperature",
                            str(t), "--json"], capture_output=True, text=True, check=True)
        side.append(json.loads(r.stdout))
    assert side[0]["method"] == "pss78" and side[1]["method"] == "brine-conductivity-model"
    worst_rho = max(worst_rho, abs(side[0]["density_kg_m3"] - side[1]["density_kg_m3"]))
    worst_cf = max(worst_cf, abs(side[0]["concentration_factor"] / side[1]["concentration_factor"] - 1))
print("worst jump %.3f kg/m3, %.3f %% in CF" % (worst_rho, 100 * worst_cf))
sys.exit(0 if worst_rho <= 0.1 and worst_cf <= 0.001 else 1)
PY
check "conductivity crosses S_P 42 continuously over 0-40 degC ($(tail -1 "$HS_TMP/join.txt"))" test $? -eq 0
"$HS" calc --help >/dev/null
check "--help exits 0" test $? -eq 0
hs_finish
