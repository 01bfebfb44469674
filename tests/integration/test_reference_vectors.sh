#!/usr/bin/env bash
# The committed gsw reference vectors are what the script generates with
# the installed TEOS-10 gsw (catches a hand edit or a stale table).
. "$(dirname "$0")/lib.sh"
if ! /usr/bin/python3 -c 'import gsw' 2>/dev/null; then
    not_ok "python3-gsw is missing (make deps installs it)"
    hs_finish
fi
gen=$HS_TMP/gsw_vectors.h
/usr/bin/python3 tests/reference/gen_gsw_vectors.py >"$gen"
check "generator runs" test -s "$gen"
# The first line names the gsw version; compare the numbers only.
check "committed vectors match a fresh run of gen_gsw_vectors.py" \
    cmp -s <(tail -n +3 "$gen") <(tail -n +3 tests/reference/gsw_vectors.h)
hs_finish
