#!/usr/bin/env bash
# The Debian package, installed for real: `make deb` builds it with no lintian
# error; dpkg -i puts every file on Debian's paths, creates the service user
# and /var/lib/halostage, ships the annotated reference as a conffile and an
# enabled unit that waits for the site file; the shipped example passes
# --check, the daemon finds its plugin, calc answers; a reinstall keeps the
# history; purge leaves nothing but, when the site asked for it, the history.
# It changes the machine, so it runs only as root on a disposable machine
# (CI, or HS_DEB_TEST=1), and once (with the plain build).
. "$(dirname "$0")/lib.sh"

if [ "$(id -u)" -ne 0 ] || [ -z "${CI:-}${HS_DEB_TEST:-}" ]; then
    echo "# skipped: installs a package; runs as root with CI or HS_DEB_TEST set"
    hs_finish
fi
if [ "$HS_BUILD" != build ]; then
    echo "# the package is checked once, with the plain build"
    hs_finish
fi
version=$(sed -n '1s/^[^(]*(\([^)]*\)).*/\1/p' debian/changelog)
arch=$(dpkg-architecture -qDEB_HOST_ARCH)
multi=$(dpkg-architecture -qDEB_HOST_MULTIARCH)
deb=build/halostage_${version}_${arch}.deb
purge() { dpkg --purge halostage >/dev/null 2>&1 || true; }
purge
rm -rf /var/lib/halostage

bash mk/deb.sh >"$HS_TMP/deb.out" 2>&1
rc=$?
sed 's/^/# /' "$HS_TMP/deb.out" | tail -n 8
check "make deb builds $deb" test "$rc" -eq 0 -a -f "$deb"
check "lintian reports no error" bash -c "! grep -q '^lintian: E:' '$HS_TMP/deb.out'"
check "the package is named after debian/changelog's version ($version)" \
    test "$(dpkg-deb -f "$deb" Version)" = "$version"

dpkg -i "$deb" >"$HS_TMP/install.out" 2>&1
check "dpkg -i installs it" test $? -eq 0
sed 's/^/# /' "$HS_TMP/install.out" | tail -n 3
check "the CLI is /usr/bin/halostage" test -x /usr/bin/halostage
check "the daemon is /usr/sbin/halostaged" test -x /usr/sbin/halostaged
check "the plugin is under /usr/lib/$multi/halostage" test -f "/usr/lib/$multi/halostage/halostage.so"
check "the unit is installed" test -f /lib/systemd/system/halostaged.service
check "the unit names the installed daemon" grep -q '^ExecStart=/usr/sbin/halostaged ' \
    /lib/systemd/system/halostaged.service
check "the unit waits for the site file" grep -q '^ConditionPathExists=/etc/halostage/halostage.ini' \
    /lib/systemd/system/halostaged.service
check "the unit is enabled" test -L /etc/systemd/system/multi-user.target.wants/halostaged.service
check "the service user exists" getent passwd halostage
check "/var/lib/halostage belongs to it (0750)" \
    test "$(stat -c '%U:%G %a' /var/lib/halostage)" = "halostage:halostage 750"
check "the annotated reference is a conffile" \
    bash -c "dpkg-query -W -f='\${Conffiles}' halostage | grep -q /etc/halostage/reference.ini"
check "the site's group reads the reference, others do not" \
    test "$(stat -c '%G %a' /etc/halostage/reference.ini)" = "halostage 640"
check "man pages are installed" bash -c "man -w halostage && man -w 8 halostaged && man -w 5 halostage.conf" 
check "halostaged --version says $version" test "$(/usr/sbin/halostaged --version)" = "halostaged $version"
/usr/sbin/halostaged --config /etc/halostage/reference.ini --check >"$HS_TMP/check.out" 2>&1
check "the shipped example passes --check" test $? -eq 0
/usr/bin/halostage calc --conductivity 53.0 --temperature 25 --json >"$HS_TMP/calc.out" 2>&1
check "halostage calc answers" grep -q '"practical_salinity"' "$HS_TMP/calc.out"

# The daemon finds its plugin where the package put it, and writes its history
# where the example says.
port=$(hs_free_port)
cat >"$HS_TMP/site.ini" <<CONF
[site]
name = deb-works
latitude = 10
database = /var/lib/halostage/halostage.db
[bus plc]
type = tcp
host = 127.0.0.1
port = $port
[pond east-1]
role = concentrator
area = 2 ha
[signal east-1.temperature]
bus = plc
address = 10
type = int16
unit = C
CONF
timeout 60 /usr/sbin/halostaged --config "$HS_TMP/site.ini" --run-for 2 >"$HS_TMP/run.out" 2>&1
rc=$?
sed 's/^/# /' "$HS_TMP/run.out" | head -n 5
check "the installed daemon loads its plugin and runs (exit $rc)" test "$rc" -eq 0
check "its history is in /var/lib/halostage" test -f /var/lib/halostage/halostage.db
rows_before=$(sqlite3 /var/lib/halostage/halostage.db "SELECT count(*) FROM sqlite_master")

dpkg -i "$deb" >/dev/null 2>&1
check "a reinstall (upgrade path) keeps the history" \
    test "$(sqlite3 /var/lib/halostage/halostage.db "SELECT count(*) FROM sqlite_master")" = "$rows_before"

# Purge with keep-on-purge: only the history (and the user owning it) stays.
files=$(dpkg -L halostage | while read -r f; do [ -f "$f" ] && echo "$f"; done)
touch /var/lib/halostage/keep-on-purge
dpkg --purge halostage >"$HS_TMP/purge.out" 2>&1
check "purge succeeds" test $? -eq 0
left=""
for f in $files; do [ -e "$f" ] && left="$left $f"; done
check "purge removes every file of the package${left:+ (left:$left)}" test -z "$left"
check "purge removes /etc/halostage" test ! -e /etc/halostage
check "purge removes the unit's enablement" test ! -e /etc/systemd/system/multi-user.target.wants/halostaged.service
check "keep-on-purge keeps the history" test -f /var/lib/halostage/halostage.db
check "purge says it kept the history" grep -q "keeping the history" "$HS_TMP/purge.out"

# Purge without it: nothing at all is left.
dpkg -i "$deb" >/dev/null 2>&1
rm -f /var/lib/halostage/keep-on-purge
dpkg --purge halostage >/dev/null 2>&1
check "a plain purge removes the history" test ! -e /var/lib/halostage
check "a plain purge removes the service user" bash -c "! getent passwd halostage"
check "nothing of the package is left in dpkg's database" \
    bash -c "! dpkg-query -W -f='\${Status}' halostage 2>/dev/null | grep -q installed"
hs_finish
