#!/usr/bin/env bash
# The uncertainty `halostage calc` gives with a state, and the measurement
# it never replaces.
#  - PSS-78 state: u(density) and u(SG) against finite differences through
#    TEOS-10 gsw 3.6 (/usr/bin/python3, python3-gsw): SP_from_C, SA_from_SP,
#    rho_t_exact; independent terms in quadrature (GUM, JCGM 100:2008, eq. 10),
#    accuracy a as u = a / sqrt(3) (GUM 4.3.7). TEOS-10 and EOS-80 differ in
#    density by about 0.01 kg/m3 but hardly in slope: 3 % tolerance.
#  - A density given is reported as given, also past the evaporation path.
#  - Conductivity past the brine model gives no density at all.
. "$(dirname "$0")/lib.sh"
HS=$HS_BUILD/halostage
PY=/usr/bin/python3
field() { $PY -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }

out=$HS_TMP/pss.json
for c in 30 45 53; do
    "$HS" calc --conductivity $c --temperature 22 --accuracy 0.5% --temperature-accuracy 0.2 \
        --reference-temperature 20 --json >"$out"
    verdict=$($PY - "$out" $c <<'PY'
import json, sys, math
import gsw
d = json.load(open(sys.argv[1])); C = float(sys.argv[2]); t = 22.0
uC = 0.005 * C / math.sqrt(3); ut = 0.2 / math.sqrt(3)
def rho(C, t, tout):
    SA = gsw.SA_from_SP(gsw.SP_from_C(C, t, 0), 0, 0, 0)
    return gsw.rho_t_exact(SA, tout, 0)
def sg(C, t):
    return rho(C, t, 20.0) / gsw.rho_t_exact(0, 20.0, 0)
def u(f):
    a = (f(C + uC, t) - f(C - uC, t)) / 2
    b = (f(C, t + ut) - f(C, t - ut)) / 2
    return math.hypot(a, b)
# density at the sample temperature: t moves both the reading and the state
u_rho = u(lambda c, tt: rho(c, tt, tt))
u_sg = u(sg)
ok = abs(d["density_uncertainty_kg_m3"] - u_rho) <= 0.03 * u_rho and \
     abs(d["specific_gravity_uncertainty"] - u_sg) <= 0.03 * u_sg
print("%s ours %.4f gsw %.4f kg/m3; SG ours %.3e gsw %.3e" % ("ok" if ok else "bad",
      d["density_uncertainty_kg_m3"], u_rho, d["specific_gravity_uncertainty"], u_sg))
PY
)
    check "PSS-78 at $c mS/cm: uncertainty as gsw's finite differences ($verdict)" \
        test "${verdict%% *}" = ok
done

# The issue's example: a density past the end of the path stays the density.
for rho in 1340 1345 1500; do
    "$HS" calc --density $rho --temperature 25 --json >"$out"
    check "calc --density $rho reports $rho" \
        test "$(field "$out" 'd["density_kg_m3"]')" = "$rho.0"
    check "calc --density $rho: beyond-path, no concentration factor, last stage" \
        test "$(field "$out" '"beyond-path" in d["warnings"] and d["concentration_factor"] is None and d["stage"]')" = bischofite
    # SG from the measured density: at least the density over water's at 25 degC
    check "calc --density $rho: SG from the measurement" \
        test "$(field "$out" "d['specific_gravity'] > $rho / 997.1")" = True
done
table=$("$HS" calc --density 1340 --temperature 25)
check "table shows 1340.000 kg/m3" grep -qE 'density +1340\.000 kg/m3' <<<"$table"
check "table shows the density's uncertainty" grep -qE 'uncertainty +\+-0\.289 kg/m3' <<<"$table"

# Conductivity past the brine model: no density is invented.
"$HS" calc --conductivity 400 --temperature 25 --json >"$out"
check "conductivity beyond the model: density unknown, beyond-path" \
    test "$(field "$out" 'd["density_kg_m3"] is None and "beyond-path" in d["warnings"]')" = True

# Near halite the brine model's slope makes the density uncertain: said, large.
"$HS" calc --conductivity 245 --temperature 25 --json >"$out"
check "near halite from conductivity: u(density) above 10 kg/m3" \
    test "$(field "$out" 'd["density_uncertainty_kg_m3"] > 10')" = True

# refused CODE WHAT ARGS...: exit CODE (2 not a number, 1 out of range) and one line
refused() { local code=$1 what=$2; shift 2; "$HS" calc "$@" >/dev/null 2>"$HS_TMP/err"; local rc=$?
    check "$what: exit $code with one line" test $rc -eq "$code" -a "$(wc -l <"$HS_TMP/err")" -eq 1; }
refused 2 "--accuracy abc" --conductivity 50 --temperature 20 --accuracy abc
refused 1 "--accuracy -1" --conductivity 50 --temperature 20 --accuracy -1
refused 1 "--accuracy 100%" --conductivity 50 --temperature 20 --accuracy 100%
refused 1 "--temperature-accuracy 99" --conductivity 50 --temperature 20 --temperature-accuracy 99
hs_finish
