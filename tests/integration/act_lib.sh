# Helpers for the actuation matrix (sourced after lib.sh): a site of two
# ponds on one Modbus TCP device, build/tools/hs_act_device, which logs every
# write and can refuse, ignore, drop or stall them.
# Register map of the device (holding registers, unit 1):
#   0 feed density x0.1 kg/m3   1 feed temperature x0.1 C   2 feed level distance mm
#  10 crys density x0.1 kg/m3  11 crys temperature x0.1 C  12 crys level distance mm
#  20 pump run feedback (follows coil 5)   21 pump manual (0 remote, 1 local; >1 invalid)
#  30 PLC heartbeat (written by halostaged)
# Coil 5: the pump output. Level = 2.0 m - distance.
ACT_DEV="$HS_BUILD/tools/hs_act_device"
ACT_D="$HS_BUILD/halostaged"

# act_start_device: starts the device on a free port (ACT_PORT), its log in
# $HS_TMP/device.log, control FIFO $HS_TMP/ctl; sets the ponds ready to transfer.
act_start_device() {
    local dir=${ACT_DIR:-$HS_TMP}
    ACT_PORT=$(hs_free_port)
    ACT_LOG="$dir/device.log"
    ACT_CTL="$dir/ctl"
    rm -f "$ACT_CTL"
    mkfifo "$ACT_CTL"
    "$ACT_DEV" --port "$ACT_PORT" --log "$ACT_LOG" --control "$ACT_CTL" --seconds 600 &
    ACT_DEV_PID=$!
    HS_PIDS+=("$ACT_DEV_PID")
    hs_wait_port "$ACT_PORT" 10 || return 1
    exec 7>"$ACT_CTL"
    act_ctl "hr 0 12250"   # feed 1225.0 kg/m3: past the start density
    act_ctl "hr 1 250"
    act_ctl "hr 2 1000"    # feed level 1.0 m
    act_ctl "hr 3 22000"   # feed conductivity 220 mS/cm (when a site reads it)
    act_ctl "hr 10 12200"
    act_ctl "hr 11 250"
    act_ctl "hr 12 1800"   # crys level 0.2 m
    act_ctl "follow 5 20"
    act_ctl "hr 21 0"      # remote
    act_ctl "mark ready"
    hs_wait_file_line "$ACT_LOG" 'mark ready' 5
}

# act_ctl LINE: one control line to the device.
act_ctl() { printf '%s\n' "$1" >&7; }

# act_config FILE [EXTRA TRANSFER LINES...]: the site, with the transfer actuated.
act_config() {
    local f=$1
    shift
    cat >"$f" <<INI
[site]
name = act-test
latitude = 30
database = act.db
stale_after = 5s

[bus plc]
type = tcp
host = 127.0.0.1
port = $ACT_PORT
unit_ids = 1-2
response_timeout = 300ms
retries = 0
backoff_min = 100ms
backoff_max = 1s
poll_interval = 200ms

[pond feed]
role = brine-store
next = crys
density_in = 1190 kg/m3
density_out = 1215 kg/m3
level_min = 0.5 m
level_max = 1.8 m
freeboard = 2.2 m
area = 1 ha
distance_height = 2.0 m

[pond crys]
role = crystalliser
density_in = 1210 kg/m3
density_out = 1250 kg/m3
level_min = 0.05 m
level_max = 1.0 m
freeboard = 1.5 m
area = 1 ha
distance_height = 2.0 m

[signal feed.density]
bus = plc
address = 0
type = uint16
scale = 0.1
unit = kg/m3
valid_min = 900
valid_max = 1400
[signal feed.temperature]
bus = plc
address = 1
type = uint16
scale = 0.1
unit = C
[signal feed.level-distance]
bus = plc
address = 2
type = uint16
scale = 0.001
unit = m
[signal crys.density]
bus = plc
address = 10
type = uint16
scale = 0.1
unit = kg/m3
[signal crys.temperature]
bus = plc
address = 11
type = uint16
scale = 0.1
unit = C
[signal crys.level-distance]
bus = plc
address = 12
type = uint16
scale = 0.001
unit = m
[signal feed.pump-run]
bus = plc
address = 20
type = uint16
[signal feed.pump-manual]
bus = plc
address = 21
type = uint16
valid_max = 1

[transfer feed-to-crys]
source = feed
destination = crys
start_density = 1215 kg/m3
min_on = 0s
min_off = 1s
actuate = yes
bus = plc
unit_id = 1
output = coil
output_address = 5
heartbeat_address = 30
feedback = feed.pump-run
feedback_timeout = 3s
manual = feed.pump-manual
INI
    local line
    for line in "$@"; do echo "$line" >>"$f"; done
}

# act_coil_writes VALUE: how many writes of VALUE to coil 5 the device saw.
act_coil_writes() { grep -c " write coil 5 $1 " "$ACT_LOG"; }

# act_scenario NAME [EXTRA TRANSFER LINES...]: a fresh device, site (in its
# own folder, so its own history) and daemon (ACT_DPID, log ACT_DLOG), with
# the pump started and confirmed. Returns non-zero when it did not start.
act_scenario() {
    local name=$1
    shift
    ACT_DIR="$HS_TMP/$name"
    mkdir -p "$ACT_DIR"
    act_start_device || return 1
    ACT_CFG="$HS_TMP/$name/site.ini"
    act_config "$ACT_CFG" "$@"
    ACT_DLOG="$HS_TMP/$name/daemon.log"
    "$ACT_D" --config "$ACT_CFG" >"$ACT_DLOG" 2>&1 &
    ACT_DPID=$!
    HS_PIDS+=("$ACT_DPID")
    hs_wait_file_line "$ACT_DLOG" 'pump output RUN confirmed' 20
}

# act_scenario_end: stops the daemon (SIGTERM, waits) and the device.
act_scenario_end() {
    kill -TERM "$ACT_DPID" 2>/dev/null
    wait "$ACT_DPID" 2>/dev/null
    exec 7>&-
    kill -TERM "$ACT_DEV_PID" 2>/dev/null
    wait "$ACT_DEV_PID" 2>/dev/null
}

# act_mark TEXT: a mark in the device log; waits until it is there.
act_mark() { act_ctl "mark $1"; hs_wait_file_line "$ACT_LOG" "mark $1\$" 5; }

# act_t PATTERN: wall ms of the first device-log line matching PATTERN (ERE).
act_t() { grep -E "$1" "$ACT_LOG" | head -1 | cut -d' ' -f1; }
