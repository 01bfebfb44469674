#!/usr/bin/env bash
# Messages that help: "did you mean" for keys, sections, ponds, buses, signals
# and commands; the known names listed when nothing is close; quantities on
# the command line with the site file's units; likely unit slips explained;
# forecast without a site or a pond says what it needs.
. "$(dirname "$0")/lib.sh"

D="$HS_BUILD/halostaged"
H="$HS_BUILD/halostage"
# expect_msg DESCRIPTION EXIT REGEX COMMAND...: exit status and a stderr line.
expect_msg() {
    local d=$1 want=$2 re=$3; shift 3
    "$@" >"$HS_TMP/out" 2>"$HS_TMP/err"
    local rc=$?
    if [ "$rc" -eq "$want" ] && grep -qE -- "$re" "$HS_TMP/err"; then
        ok "$d"
    else
        not_ok "$d (exit $rc; stderr: $(head -c 300 "$HS_TMP/err"))"
    fi
}
variant() {  # NAME SED-EXPRESSION: a copy of the demo site with one slip
    sed "$2" config/demo.ini >"$HS_TMP/$1.ini"
    echo "$HS_TMP/$1.ini"
}

f=$(variant key 's/^latitude/lattitude/')
expect_msg "config: a misspelt key gets 'did you mean'" 78 \
    "key.ini:[0-9]+: unknown key 'lattitude' in \[site\] \(did you mean 'latitude'\?\)" "$D" --config "$f" --check
f=$(variant dash '0,/^side_slope/s//side-slope/')
expect_msg "config: '-' for '_' gets 'did you mean'" 78 "did you mean 'side_slope'" "$D" --config "$f" --check
f=$(variant section '0,/^\[pond c1\]/s//[pnod c1]/')
expect_msg "config: a misspelt section gets 'did you mean'" 78 \
    "unknown section \[pnod\] \(did you mean 'pond'\?\)" "$D" --config "$f" --check
first_next=$(sed -n 's/^next = \(.*\)/\1/p' config/demo.ini | head -n 1)
f=$(variant next "0,/^next = $first_next\$/s//next = ${first_next}x/")
expect_msg "config: a misspelt pond name gets 'did you mean'" 78 \
    "next: no \[pond ${first_next}x\] in this file \(did you mean '$first_next'\?\)" "$D" --config "$f" --check
f=$(variant next2 "0,/^next = $first_next\$/s//next = zzzz/")
expect_msg "config: a pond name far from any lists the ponds" 78 \
    "no \[pond zzzz\] in this file \(ponds: [a-z0-9, -]+\)" "$D" --config "$f" --check
first_bus=$(sed -n 's/^bus = \(.*\)/\1/p' config/demo.ini | head -n 1)
f=$(variant bus "0,/^bus = $first_bus\$/s//bus = ${first_bus}s/")
expect_msg "config: a misspelt bus gets 'did you mean'" 78 "did you mean '$first_bus'" "$D" --config "$f" --check

expect_msg "cli: a misspelt command gets 'did you mean'" 2 \
    "unknown command 'histroy' \(did you mean 'history'\?\)" "$H" histroy
"$H" calc --conductivity 53 --temperature 77F >"$HS_TMP/out" 2>&1
check "cli: 77F is read as 25 degC" grep -q "25.00 degC" "$HS_TMP/out"
"$H" calc --conductivity 53 --temperature 25 >"$HS_TMP/c25" 2>&1
"$H" calc --conductivity "53000 uS/cm" --temperature 25 >"$HS_TMP/cus" 2>&1
check "cli: '53000 uS/cm' equals 53 mS/cm" cmp -s "$HS_TMP/c25" "$HS_TMP/cus"
expect_msg "cli: a conductivity in uS/cm given bare is explained" 1 \
    "in uS/cm it is 53 mS/cm" "$H" calc --conductivity 53000 --temperature 25
expect_msg "cli: a density in g/cm3 given bare is explained" 1 \
    "as g/cm3 it is 1215 kg/m3" "$H" calc --density 1.215 --temperature 25
expect_msg "cli: an unknown unit lists the known ones" 2 \
    "unknown unit 'x' for a temperature \(use C, degC, F, degF\)" "$H" calc --conductivity 53 --temperature 25x
expect_msg "cli: a word where a quantity belongs names the unit" 2 \
    "'warm' is not a number \(a temperature in degC" "$H" calc --conductivity 53 --temperature warm
expect_msg "forecast with nothing says --config" 2 "give --config FILE" "$H" forecast
hs_finish
