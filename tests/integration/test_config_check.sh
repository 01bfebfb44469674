#!/usr/bin/env bash
# halostaged --check on the shipped files and on broken copies of the demo.
source "$(dirname "$0")/lib.sh"
D="$HS_BUILD/halostaged"

check "demo.ini passes --check" "$D" --config config/demo.ini --check
check "reference.ini passes --check" "$D" --config config/reference.ini --check

# broken_copy LINE_REGEX REPLACEMENT: the demo with the first matching line replaced.
broken_copy() {
    local out="$HS_TMP/broken.ini"
    awk -v re="$1" -v rep="$2" '!done && $0 ~ re { print rep; done = 1; next } { print }' \
        config/demo.ini >"$out"
    echo "$out"
}

# expect_fail FILE LINE TEXT: exit 78 and "FILE:LINE: ...TEXT..." on stderr.
expect_fail() {
    local f=$1 line=$2 text=$3 rc
    "$D" --config "$f" --check >"$HS_TMP/out" 2>"$HS_TMP/err"
    rc=$?
    if [ "$rc" -eq 78 ] && grep -qF "$f:$line: " "$HS_TMP/err" && grep -qF "$text" "$HS_TMP/err"; then
        ok "broken demo fails at line $line ($text)"
    else
        not_ok "broken demo: rc=$rc, wanted 78 and $f:$line: $text; got: $(cat "$HS_TMP/err")"
    fi
}

line_of() { grep -n -m1 -E "$1" config/demo.ini | cut -d: -f1; }

n=$(line_of '^port = 15021')
expect_fail "$(broken_copy '^port = 15021' 'port = 99999')" "$n" "above the maximum 65535"
n=$(line_of '^next = c3')
expect_fail "$(broken_copy '^next = c3' 'next = c9')" "$n" "no [pond c9]"
n=$(line_of '^address = 41')
expect_fail "$(broken_copy '^address = 41' 'address = 40')" "$n" "overlap"
n=$(line_of '^baume_modulus')
expect_fail "$(broken_copy '^baume_modulus' 'baume_modlus = 145')" "$n" "unknown key 'baume_modlus'"

"$D" --config "$HS_TMP/none.ini" --check 2>"$HS_TMP/err"
rc=$?
check "a missing file exits 78 naming it" test "$rc" -eq 78 -a -n "$(grep -F "$HS_TMP/none.ini: cannot open" "$HS_TMP/err")"
hs_finish
