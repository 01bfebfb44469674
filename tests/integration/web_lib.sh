# Shared by the web page's tests (sourced after lib.sh, not run): the demo
# site on free loopback ports with a [web] section, two logins, and two alarm
# rules that raise at once on the simulator (so there is something to
# acknowledge) and a week of invented history (tests/tools/hs_web_seed.c);
# starts the simulator and halostaged and waits for the page.
# Sets HS_WEB_URL, HS_WEB_CONF, HS_WEB_DAEMON_PID.

hs_web_site() {
    local dir=$HS_TMP/site dikes analysers web extra=${1:-}
    mkdir -p "$dir"
    dikes=$(hs_free_port)
    analysers=$(hs_free_port)
    web=$(hs_free_port)
    sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
        -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 2s/" \
        config/demo.ini >"$dir/site.ini"
    cat >>"$dir/site.ini" <<CONF

[web]
listen = 127.0.0.1:$web
users_file = users
$extra

; test rules: the simulated c2 and c3 are always deeper than 5 cm
[alarm web-test-depth]
kind = level-high
ponds = c2,c3
high = 0.05
on_delay = 0s
priority = high
CONF
    HS_WEB_CONF=$dir/site.ini
    HS_WEB_URL=http://127.0.0.1:$web
    printf 'operator-pass-1\n' | "$HS_BUILD/halostage" user --config "$HS_WEB_CONF" add ops --role operator >/dev/null || return 1
    printf 'viewer-pass-1\n' | "$HS_BUILD/halostage" user --config "$HS_WEB_CONF" add look --role viewer >/dev/null || return 1
    "$HS_BUILD/tools/hs_web_seed" --config "$HS_WEB_CONF" --days 7 >/dev/null || return 1
    "$HS_BUILD/halostage-sim" --config "$HS_WEB_CONF" --speed 600 >"$HS_TMP/sim.log" 2>&1 &
    HS_PIDS+=($!)
    hs_wait_port "$dikes" 20 && hs_wait_port "$analysers" 20 || return 1
    "$HS_BUILD/halostaged" --config "$HS_WEB_CONF" --log-level info 2>"$HS_TMP/halostaged.log" &
    HS_WEB_DAEMON_PID=$!
    HS_PIDS+=("$HS_WEB_DAEMON_PID")
    hs_wait_port "$web" 30
}

# Stops halostaged with SIGTERM and checks that it ended cleanly: exit 0 and
# no sanitizer report (ASan/UBSan/LSan builds) in its log.
hs_web_stop_daemon() {
    kill -TERM "$HS_WEB_DAEMON_PID" 2>/dev/null
    wait "$HS_WEB_DAEMON_PID"
    local rc=$?
    check "halostaged with [web] stops cleanly on SIGTERM (exit $rc, no sanitizer report)" \
        test "$rc" -eq 0 -a -z "$(grep -E 'Sanitizer|runtime error' "$HS_TMP/halostaged.log")"
}
