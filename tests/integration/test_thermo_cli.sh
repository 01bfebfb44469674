#!/usr/bin/env bash
# `halostage brine`, `halostage path` and `halostage calc` beyond seawater, as
# a lab technician and a brine master run them. Sources beside each check:
# [S] published, [C] computed with HMW84 (not itself published), [M] from memory.
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
PY=/usr/bin/python3
field() { $PY -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
out=$HS_TMP/out.json

# --- brine ---------------------------------------------------------------
"$HS" brine --molality Na=6,Cl=6 --json >"$out"
check "brine --json exits 0" test $? -eq 0
# NaCl 6 mol/kg, 25 degC: gamma+- 0.986, phi 1.271 (Robinson & Stokes 1959;
# Hamer & Wu 1972) [M]; HMW84 gives 0.987 / 1.273 [C].
check "NaCl 6 m: mean activity coefficient near 0.986" \
    test "$(field "$out" 'abs(d["mean_activity_coefficient"] - 0.986) < 0.005')" = True
check "NaCl 6 m: osmotic coefficient near 1.271" \
    test "$(field "$out" 'abs(d["osmotic_coefficient"] - 1.271) < 0.005')" = True
check "NaCl 6 m: ionic strength 6" test "$(field "$out" 'd["ionic_strength"]')" = 6.0
for f in density_kg_m3 specific_gravity baume saturation_index water_activity \
         activity_coefficient method warnings; do
    [ "$(field "$out" "'$f' in d")" = True ] || not_ok "brine JSON lacks $f"
done
ok "brine JSON carries the state fields and the activity fields"
# Just under halite saturation (6.10 mol/kg with HMW84 [C]): SI slightly negative.
check "NaCl 6 m is just undersaturated in halite" \
    test "$(field "$out" '-0.05 < d["saturation_index"]["halite"] < 0')" = True
"$HS" brine --molality Na=6.2,Cl=6.2 --json >"$out"
check "NaCl 6.2 m is supersaturated in halite, stage halite" \
    test "$(field "$out" 'd["saturation_index"]["halite"] > 0 and d["stage"] == "halite"')" = True
table=$("$HS" brine --molality Ca=0.0153,SO4=0.0153)
# Gypsum solubility in water 0.0153 mol/kg with HMW84 [C]; 0.0152-0.0155 measured [M].
check "gypsum-saturated water reads saturated" grep -qE 'gypsum +-?0\.00[0-9] +saturated' <<<"$table"

refuse() {  # CODE PATTERN ARGS...: exit CODE and one stderr line matching PATTERN
    local code=$1 pat=$2 err=$HS_TMP/err
    shift 2
    "$HS" "$@" >/dev/null 2>"$err"
    local rc=$?
    if [ "$rc" -eq "$code" ] && [ "$(wc -l <"$err")" -eq 1 ] && grep -qE -- "$pat" "$err"; then
        ok "refused ($rc): $*"
    else
        not_ok "$* gave rc=$rc: $(cat "$err")"
    fi
}
refuse 2 'cannot be negative' brine --molality Na=-1,Cl=1
refuse 2 "unknown ion 'Xx'" brine --molality Xx=1,Cl=1
refuse 2 "'abc' is not a number" brine --molality Na=abc,Cl=1
refuse 2 'should be ION=VALUE' brine --molality Na
refuse 2 'given twice' brine --molality Na=1,Na=2,Cl=1
refuse 2 'ends with a comma' brine --molality Na=1,Cl=1,
refuse 2 'at least one ion' brine --molality Na=0
refuse 2 'required' brine --temperature 25
refuse 1 'outside -5..80' brine --molality Na=1,Cl=1 --temperature 95
refuse 1 'ionic strength' brine --molality Na=45,Cl=45
refuse 2 'unknown option' brine --molality Na=1,Cl=1 --colour red

# Charge balance (conservation of charge, sum z m = 0): far from it the model
# has no solution and is refused; within 5 % the missing charge is made up
# with Cl or Na and said in the JSON; phi < 0 or a_w > 1 is never printed.
refuse 1 'charges do not balance' brine --molality Mg=4
refuse 1 'charges do not balance' brine --molality Na=1,CO3=0.2
"$HS" brine --molality Na=1,Cl=0.97 --json >"$out"
check "brine: 3 % out of balance is balanced with Cl, and said (conservation)" test "$(field "$out" \
    'd["charge_balanced_with"]["ion"] == "Cl" and abs(d["molality"]["Cl"] - 1.0) < 1e-12 and any(w.startswith("charge-balanced") for w in d["warnings"]) and d["osmotic_coefficient"] > 0 and d["water_activity"] <= 1')" = True
# The pure-water limit: phi = 1, a_w = 1, gamma = 1 (Debye-Hueckel limiting
# law, Pitzer 1991 ch. 3) [S]; SG 1 and 0 deg Be by definition.
"$HS" brine --molality Na=1e-300,Cl=1e-300 --json >"$out"
check "brine: the pure-water limit works (Na=Cl=1e-300)" test "$(field "$out" \
    'd["osmotic_coefficient"] == 1 and d["water_activity"] == 1 and d["activity_coefficient"]["Na"] == 1 and d["specific_gravity"] == 1 and d["baume"] == 0')" = True
# Density from the real anions: 0.5 mol/kg Na2CO3 (5.03 %) is about 1049
# kg/m3 at 25 degC (CRC Handbook, concentrative properties: 5 % Na2CO3
# 1.0502 g/cm3 at 20 degC) [M], not 1 m NaCl's 1036.4; the stated surrogate
# (hc_brine_density.h) lands within 0.8 %.
"$HS" brine --molality Na=1,CO3=0.5 --json >"$out"
check "brine: Na2CO3 has its own density, not NaCl's" test "$(field "$out" \
    'abs(d["density_kg_m3"] - 1049) < 8 and d["density_kg_m3"] > 1036.4 + 5')" = True

# Seawater speciated at the air's pCO2: pH 8.1-8.3 on the activity scale
# (Zeebe & Wolf-Gladrow 2001) [M]; alkalinity kept as given (definition).
"$HS" brine --molality Na=0.486,K=0.0106,Mg=0.0547,Ca=0.0107,Cl=0.5668,SO4=0.0293,HCO3=0.00178,CO3=0.00025 \
    --pco2-log -3.4 --json >"$out"
check "brine --pco2-log: seawater pH 8.1-8.3, alkalinity kept" test "$(field "$out" \
    '8.1 < d["ph"] < 8.3 and abs(d["alkalinity_eq_kg"] - 0.00228) < 1e-9')" = True
refuse 1 'outside -8..0' brine --molality Na=1,Cl=1 --pco2-log 2

# --- path ----------------------------------------------------------------
"$HS" path --json >"$out"
check "path --json exits 0" test $? -eq 0
# The README's figure: at SG 1.25 (15/15 degC) on the 25 degC fractional path
# the model has evaporated 96.6 % of the water and deposited 74.6 % of the
# sodium as halite [C] (Usiglio's seawater: 96.5 % and 77 % [S], as quoted
# there); conservation: deposited Na <= the feed's.
"$HS" path --all-steps --json >"$HS_TMP/all.json"
$PY - "$HS_TMP/all.json" <<'PY'
import json, sys
d = json.load(open(sys.argv[1]))
steps, feed = d["steps"], d["feed"]
k = next(i for i, s in enumerate(steps) if s["specific_gravity"] >= 1.25)
a, b = steps[k - 1], steps[k]
x = (1.25 - a["specific_gravity"]) / (b["specific_gravity"] - a["specific_gravity"])
def at(get):
    return get(a) + x * (get(b) - get(a))
evaporated = 100 * at(lambda s: s["water_removed_fraction"])
na_feed = feed["molality"]["Na"] * feed["water_mass_fraction"]  # mol per kg feed
deposited = 100 * at(lambda s: s["precipitated_mol_per_kg_feed"]["halite"]) / na_feed
sys.exit(0 if abs(evaporated - 96.6) < 0.05 and abs(deposited - 74.6) < 0.1
         and d["reference_temperature_c"] == 15 and d["temperature_c"] == 25 else 1)
PY
check "README: at SG 1.25, 96.6 % evaporated and 74.6 % of the NaCl deposited" test $? -eq 0
check "path reaches bischofite" test "$(field "$out" 'd["complete"]')" = True
# Stage sequence from carbonate (aragonite, field onset CF 1.5-2, DOMAIN 7
# [S]) and gypsum through halite into the magnesium and potash salts to
# bischofite (stage order of hc_state.h; HMW84 fractional path [C]).
check "stage sequence carbonate..bischofite" test "$(field "$out" \
    '" ".join(dict.fromkeys(s["stage"] for s in d["steps"]))')" = \
    "seawater carbonate gypsum halite magnesium-sulfate potash bischofite"
check "path: feed pH at the air's pCO2 8.1-8.3 (seawater, activity scale) [M]" \
    test "$(field "$out" '8.1 < d["steps"][0]["ph"] < 8.3 and d["caco3_phase"] == "aragonite"')" = True
"$HS" path --no-carbonate --json >"$out"
check "path --no-carbonate: no carbonate stage, no pH" test "$(field "$out" \
    '"carbonate" not in [s["stage"] for s in d["steps"]] and d["steps"][0]["ph"] is None')" = True
refuse 1 'outside -8..-0.1' path --pco2-log 1
"$HS" path --json >"$out"
# Onsets: gypsum CF 3.4, halite 10.65 (HMW84 fractional [C]); halite at
# 26.0 deg Be (Baseggio 1974) [S].
check "gypsum onset CF 3.2-4.1" test "$(field "$out" \
    '[3.2 < o["concentration_factor"] < 4.1 for o in d["onsets"] if o["mineral"] == "gypsum"]')" = "[True]"
check "halite onset near 26 deg Be" test "$(field "$out" \
    '[abs(o["baume"] - 26.0) < 0.5 for o in d["onsets"] if o["mineral"] == "halite"]')" = "[True]"
check "steps carry water removed and precipitated amounts" test "$(field "$out" \
    '"water_removed_fraction" in d["steps"][-1] and d["steps"][-1]["precipitated_mol_per_kg_feed"]["halite"] > 0.4')" = True
"$HS" path --mode equilibrium --temperature 20 --json >"$out"
check "equilibrium path at 20 degC runs" test "$(field "$out" 'd["mode"] + " " + str(d["temperature_c"])')" = "equilibrium 20.0"
table=$("$HS" path)
check "path table lists onsets" grep -qE '^  halite +10\.[0-9]+' <<<"$table"
# A site feed given as an analysis (invented lagoon water, demo only).
"$HS" path --feed-analysis Na=12,Cl=21.5,Mg=1.4,SO4=3,Ca=0.45,K=0.43 --json >"$out"
check "site feed: chloride adjustment reported" \
    test "$(field "$out" '"chloride_adjustment_mol_kg" in d["feed"] and d["feed"]["practical_salinity"] is None')" = True
refuse 2 'use fractional or equilibrium' path --mode sideways
refuse 2 'unknown feed' path --feed lagoon
refuse 1 'outside 2..42' path --feed-salinity 60
refuse 2 'cannot be negative' path --feed-analysis Na=-3,Cl=1
refuse 1 'outside -5..80' path --temperature 99
refuse 2 'needs --feed-analysis' path --feed-unit mg/L

# --- calc over the whole range -------------------------------------------
"$HS" calc --density 1225 --temperature 25 --json >"$out"
# 1225 kg/m3 at 25 degC is past halite saturation (1211-1213 [C]) and below
# the magnesium sulfates (SG about 1.30, Usiglio as reported later [S]).
check "calc 1225 kg/m3: halite stage" test "$(field "$out" 'd["stage"]')" = halite
check "calc 1225 kg/m3: next stage magnesium-sulfate near 1300 kg/m3" test "$(field "$out" \
    'd["next_stage"] == "magnesium-sulfate" and 1285 < d["next_stage_density_kg_m3"] < 1310')" = True
table=$("$HS" calc --density 1225 --temperature 25)
check "calc table names the next stage and its density" \
    grep -qE 'next stage +magnesium-sulfate at 1[23][0-9]{2}\.[0-9] kg/m3' <<<"$table"
"$HS" calc --conductivity 250 --temperature 25 --json >"$out"
check "calc: conductivity near halite warns and prefers density" test "$(field "$out" \
    '"conductivity-weak" in d["warnings"] and "density-source-preferred" in d["warnings"]')" = True
"$HS" calc --conductivity 53.07 --temperature 25 --json >"$out"
check "calc: seawater keeps PSS-78 and gains its next stage" test "$(field "$out" \
    'd["method"] + " " + d["stage"] + " " + d["next_stage"]')" = "pss78 seawater carbonate"
# Br and Sr in a feed analysis count as Cl and Ca mole for mole (the lumping of
# the Na-K-Mg-Ca-Cl-SO4 model): the same feed with them folded in by hand (molar
# masses 79.904 Br, 35.453 Cl, 87.62 Sr, 40.078 Ca; IUPAC) gives the same moles
# per kg of solution.
"$HS" path --json --feed-analysis Na=10.78,Cl=19.35,Mg=1.284,SO4=2.712,Ca=0.412,K=0.399,Br=0.0673,Sr=0.0079 \
    >"$HS_TMP/brsr.json" 2>&1
check "path --feed-analysis accepts Br and Sr" test $? -eq 0
"$HS" path --json --feed-analysis Na=10.78,Cl=19.379860669,Mg=1.284,SO4=2.712,Ca=0.415613515,K=0.399 \
    >"$HS_TMP/folded.json" 2>&1
check "Br and Sr are lumped into Cl and Ca mole for mole" /usr/bin/python3 -c '
import json, sys
fa, fb = json.load(open(sys.argv[1]))["feed"], json.load(open(sys.argv[2]))["feed"]
# per kg of solution: the two analyses differ in solute mass, so in water
a = {k: v * fa["water_mass_fraction"] for k, v in fa["molality"].items()}
b = {k: v * fb["water_mass_fraction"] for k, v in fb["molality"].items()}
sys.exit(0 if all(abs(a[k] - b[k]) <= 1e-6 * b[k] for k in b) else 1)' "$HS_TMP/brsr.json" "$HS_TMP/folded.json"
hs_finish
