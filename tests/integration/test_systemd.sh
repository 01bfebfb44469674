#!/usr/bin/env bash
# systemd/halostaged.service: `systemd-analyze verify` with nothing on stderr
# (it exits 0 even on unknown keys, systemd 252), and the exposure score of
# `systemd-analyze security` at 2.0 or below (--threshold is on a 0-100 scale).
. "$(dirname "$0")/lib.sh"

unit=systemd/halostaged.service.in
if ! command -v systemd-analyze >/dev/null; then
    not_ok "systemd-analyze is not installed (mk/deps.sh installs systemd)"
    hs_finish
fi
# verify resolves ExecStart; point it at the built program instead of the
# installed path so the check runs before `make install`.
bin=$(cd "$HS_BUILD" && pwd)
sed -e "s#@SBINDIR@#$bin#g" -e "s#@CONFDIR@#/etc/halostage#g" "$unit" >"$HS_TMP/halostaged.service"
# The unit's Documentation= names man pages; verify looks them up.
for s in 1:plugin/cli/halostage.1 5:config/halostage.conf.5 8:plugin/host/halostaged.8; do
    mkdir -p "$HS_TMP/man/man${s%%:*}" && cp "${s#*:}" "$HS_TMP/man/man${s%%:*}/"
done
MANPATH="$HS_TMP/man" systemd-analyze verify "$HS_TMP/halostaged.service" >"$HS_TMP/verify.out" 2>"$HS_TMP/verify.err"
rc=$?
cat "$HS_TMP/verify.err"
check "systemd-analyze verify exits 0 (got $rc)" test "$rc" -eq 0
check "systemd-analyze verify prints nothing on stderr" test ! -s "$HS_TMP/verify.err"

systemd-analyze security --offline=true --threshold=20 "$HS_TMP/halostaged.service" \
    >"$HS_TMP/security.out" 2>&1
rc=$?
score=$(sed -n 's/.*Overall exposure level for [^:]*: \([0-9.]*\).*/\1/p' "$HS_TMP/security.out")
echo "# exposure: $score"
check "exposure $score is at most 2.0" test "$rc" -eq 0 -a -n "$score"

for key in "Type=notify" "WatchdogSec=" "ExecReload=/bin/kill -HUP \$MAINPID" \
           "Restart=on-failure" "ProtectSystem=strict" "NoNewPrivileges=yes" \
           "StateDirectory=halostage" "ConfigurationDirectory=halostage" \
           "RestrictAddressFamilies=" "SystemCallFilter=@system-service"; do
    check "unit has $key" grep -qF "$key" "$unit"
done
check "serial devices reachable: no PrivateDevices" bash -c "! grep -q '^PrivateDevices=yes' $unit"
hs_finish
