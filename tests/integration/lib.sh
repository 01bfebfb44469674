# Shared helpers for integration scripts tests/integration/test_*.sh (sourced, not run).
# Rules: servers start on free loopback ports, are waited for by polling (never a
# fixed sleep) and are stopped by PID. Results are TAP-style lines:
#   ok - what       /  not ok - what
# HS_BUILD names the build folder (build or build/san).

HS_BUILD=${HS_BUILD:-build}
HS_TMP=$(mktemp -d "${TMPDIR:-/tmp}/hs-it.XXXXXX")
HS_PIDS=()
hs_failed=0

hs_cleanup() {
    local pid
    for pid in "${HS_PIDS[@]}"; do
        kill "$pid" 2>/dev/null
    done
    for pid in "${HS_PIDS[@]}"; do
        wait "$pid" 2>/dev/null
    done
    rm -rf "$HS_TMP"
}
trap hs_cleanup EXIT

ok()     { echo "ok - $*"; }
not_ok() { echo "not ok - $*"; hs_failed=1; }
# check DESCRIPTION COMMAND...: runs the command, prints ok/not ok.
check()  { local d=$1; shift; if "$@"; then ok "$d"; else not_ok "$d"; fi; }
hs_finish() { exit "$hs_failed"; }

# A free TCP port on 127.0.0.1, chosen by the kernel.
hs_free_port() {
    /usr/bin/python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1]); s.close()'
}

# hs_wait_port PORT [SECONDS]: poll until something listens on 127.0.0.1:PORT.
hs_wait_port() {
    local port=$1 limit=${2:-10} i
    for ((i = 0; i < limit * 20; i++)); do
        if (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null; then return 0; fi
        sleep 0.05
    done
    return 1
}

# hs_wait_file_line FILE REGEX [SECONDS]: poll until a line matching REGEX appears.
hs_wait_file_line() {
    local file=$1 re=$2 limit=${3:-10} i
    for ((i = 0; i < limit * 20; i++)); do
        grep -qE "$re" "$file" 2>/dev/null && return 0
        sleep 0.05
    done
    return 1
}

# hs_start_mosquitto PORT [EXTRA_CONF_LINES]: a private broker on loopback.
# Sets HS_MOSQ_PID. Runs as root when started by root (it drops to the mosquitto user otherwise).
hs_start_mosquitto() {
    local port=$1 extra=${2:-} conf="$HS_TMP/mosquitto-$1.conf"
    {
        echo "listener $port 127.0.0.1"
        echo "allow_anonymous true"
        echo "persistence false"
        [ "$(id -u)" -eq 0 ] && echo "user root"
        [ -n "$extra" ] && printf '%s\n' "$extra"
    } >"$conf"
    mosquitto -c "$conf" >"$HS_TMP/mosquitto-$port.log" 2>&1 &
    HS_MOSQ_PID=$!
    HS_PIDS+=("$HS_MOSQ_PID")
    hs_wait_port "$port" 10
}
