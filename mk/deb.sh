#!/usr/bin/env bash
# make deb: builds the Debian package from a copy of the source tree under
# build/deb (dpkg-buildpackage writes into the parent of the tree it builds),
# checks it with lintian, and leaves build/halostage_VERSION_ARCH.deb.
# Exit 0 with the package built and no lintian error; lintian's warnings are
# printed (the kept ones are listed in debian/README.source).
set -euo pipefail
cd "$(dirname "$0")/.."
version=$(sed -n '1s/^[^(]*(\([^)]*\)).*/\1/p' debian/changelog)
arch=$(dpkg-architecture -qDEB_HOST_ARCH)
work=build/deb
src="$work/halostage-$version"
rm -rf "$work"
mkdir -p "$src"
# The tree as it is (committed or not), without build products or git data.
tar --exclude=./build --exclude=./.git --exclude=./node_modules -cf - . | tar -xf - -C "$src"
(cd "$src" && dpkg-buildpackage -us -uc -b) >"$work/build.log" 2>&1 || {
    tail -n 40 "$work/build.log"
    echo "make deb: dpkg-buildpackage failed (whole log: $work/build.log)" >&2
    exit 1
}
deb="$work/halostage_${version}_${arch}.deb"
[ -f "$deb" ] || { echo "make deb: $deb was not produced" >&2; exit 1; }
cp "$deb" build/
echo "make deb: build/$(basename "$deb")"
# lintian: errors fail the build; warnings and notes are shown.
lintian --tag-display-limit 0 --display-info "$deb" >"$work/lintian.txt" 2>&1 || true
if [ -s "$work/lintian.txt" ]; then sed 's/^/lintian: /' "$work/lintian.txt"; fi
if grep -q '^E:' "$work/lintian.txt"; then
    echo "make deb: lintian reports errors" >&2
    exit 1
fi
echo "make deb: lintian errors: 0, warnings: $(grep -c '^W:' "$work/lintian.txt" || true)"
