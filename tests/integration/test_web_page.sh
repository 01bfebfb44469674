#!/usr/bin/env bash
# The operators' page in a real headless Chromium (Debian's chromium and
# chromium-driver, driven by python3-selenium) against the simulator: every
# view renders with every pond, an operator acknowledges an alarm through the
# page and the journal shows it, a viewer's acknowledgement is refused, a
# wrong password is refused, a cross-site POST is refused, and the page asks
# nothing of any host but the gateway. Screenshots go to build/screenshots/.
set -u
cd "$(dirname "$0")/../.."
. tests/integration/lib.sh
. tests/integration/web_lib.sh

if ! command -v chromedriver >/dev/null || ! /usr/bin/python3 -c 'import selenium' 2>/dev/null; then
    not_ok "chromium-driver and python3-selenium are installed (make deps)"
    hs_finish
fi
if ! hs_web_site; then
    not_ok "the simulator and halostaged with [web] start"
    tail -5 "$HS_TMP/halostaged.log"
    hs_finish
fi
shots=$HS_BUILD/screenshots
mkdir -p "$shots"
HS_WEB_URL=$HS_WEB_URL HS_WEB_SHOTS=$shots HS_WEB_TMP=$HS_TMP \
    timeout 300 /usr/bin/python3 tests/integration/web_browser.py
rc=$?
[ "$rc" -eq 0 ] || { hs_failed=1; tail -5 "$HS_TMP/halostaged.log"; }
hs_web_stop_daemon
hs_finish
