#!/bin/sh
# Install the Debian packages halostage needs, and only those that are missing.
# Idempotent: asks dpkg first; runs apt-get only when something is absent.
set -eu
PKGS="build-essential pkg-config
libmodbus-dev libpaho-mqtt-dev libsqlite3-dev sqlite3 libcmocka-dev libinih-dev
libjansson-dev libsystemd-dev libprotobuf-c-dev protobuf-c-compiler libmicrohttpd-dev libcrypt-dev
mosquitto mosquitto-clients socat openssl valgrind systemd
python3 python3-gsw python3-numpy python3-pymodbus python3-serial-asyncio
protobuf-compiler python3-protobuf
chromium chromium-driver python3-selenium fonts-dejavu-core
man-db groff-base
debhelper dpkg-dev lintian"
missing=""
for p in $PKGS; do
    st=$(dpkg-query -W -f='${Status}' "$p" 2>/dev/null || true)
    case "$st" in
        *"ok installed"*) ;;
        *) missing="$missing $p" ;;
    esac
done
if [ -z "$missing" ]; then
    echo "deps: all Debian packages present"
    exit 0
fi
echo "deps: installing:$missing"
if [ "$(id -u)" -ne 0 ]; then
    echo "deps: not root; install these packages first:$missing" >&2
    exit 1
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
# shellcheck disable=SC2086
apt-get install -y -qq --no-install-recommends $missing
# The Debian mosquitto package starts a system broker on port 1883; our tests
# start their own on free loopback ports and do not need it.
