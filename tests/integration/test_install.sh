#!/usr/bin/env bash
# make install-files into a scratch root: every path the rendered unit names
# exists under that root for PREFIX=/usr and for the default /usr/local, the
# daemon lands in sbin, and the annotated reference keeps its history out of
# /etc (ProtectSystem=strict makes /etc read-only to the service).
. "$(dirname "$0")/lib.sh"

san=0
[ "$HS_BUILD" = build/san ] && san=1
for prefix in /usr /usr/local; do
    root="$HS_TMP/root$prefix"
    make --no-print-directory install-files SAN=$san DESTDIR="$root" PREFIX="$prefix" \
        >"$HS_TMP/install.out" 2>&1
    check "make install-files PREFIX=$prefix into a scratch root" test $? -eq 0
    unit="$root/etc/systemd/system/halostaged.service"
    check "the unit is installed ($prefix)" test -f "$unit"
    check "no placeholder is left in the unit ($prefix)" bash -c "! grep -q '@[A-Z]*DIR@' '$unit'"
    for p in $(sed -n 's/^Exec[A-Za-z]*=\([^ ]*\).*/\1/p' "$unit" | sort -u); do
        case "$p" in /bin/kill) continue ;; esac
        check "the unit's $p exists under the root" test -x "$root$p"
    done
    check "the daemon is in $prefix/sbin" test -x "$root$prefix/sbin/halostaged"
    check "the CLI is in $prefix/bin" test -x "$root$prefix/bin/halostage"
    check "the plugin is in $prefix/lib/halostage" test -f "$root$prefix/lib/halostage/halostage.so"
done
db=$(sed -n 's/^database *= *\([^ ;]*\).*/\1/p' config/reference.ini)
check "the reference's database is absolute under /var/lib/halostage ($db)" \
    bash -c "[[ '$db' == /var/lib/halostage/* ]]"
hs_finish
