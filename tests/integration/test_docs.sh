#!/usr/bin/env bash
# Docs that run: every example command of README.md and the man pages
# (extracted by tests/docs/doc_examples.py) runs against the pond-chain
# simulator and a scratch history, and must end with the status the text
# gives it (0 unless marked "(exit N)") and print every figure it states
# ("shows: TEXT"). Examples marked "(not run: REASON)" are listed, not run.
# The markers are described in tests/docs/doc_examples.py.
# Paths of the examples map onto the scratch site: site.ini, config/demo.ini,
# build/demo/demo.ini and /etc/halostage/halostage.ini are the demo site on
# free loopback ports; build/ is the build under test.
. "$(dirname "$0")/lib.sh"

B=$(cd "$HS_BUILD" && pwd)
S="$HS_TMP/site"
mkdir -p "$S"
dikes=$(hs_free_port)
analysers=$(hs_free_port)
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 2s/" \
    -e "s/^\[site\]/[site]\ncommit_interval = 1s\nstate_max_interval = 2s/" \
    config/demo.ini >"$S/demo.ini"
# (states committed every second and stored at least every 2 s: the history
# examples find rows within seconds, not after the default minutes)

/usr/bin/python3 tests/docs/doc_examples.py README.md plugin/cli/halostage.1 \
    plugin/host/halostaged.8 config/halostage.conf.5 >"$HS_TMP/examples.jsonl"
check "examples were found in the docs ($(wc -l <"$HS_TMP/examples.jsonl"))" \
    test "$(wc -l <"$HS_TMP/examples.jsonl")" -gt 20

"$B/halostage-sim" --config "$S/demo.ini" --speed 600 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
check "the simulator serves the demo site" bash -c "$(declare -f hs_wait_port); \
    hs_wait_port $dikes 30 && hs_wait_port $analysers 30"

# run_examples PHASE: 1 = before the daemon (calc, path, --check, --once ...),
# 2 = with the daemon running (the commands that read its history or ask it).
run_examples() {
    /usr/bin/python3 - "$1" "$HS_TMP/examples.jsonl" "$B" "$S" <<'PY'
import json, os, re, subprocess, sys
phase, path, build, site = int(sys.argv[1]), sys.argv[2], sys.argv[3], sys.argv[4]
conf = site + '/demo.ini'
for line in open(path):
    ex = json.loads(line)
    where = '%s:%d' % (ex['file'], ex['line'])
    cmd = ex['command']
    needs_daemon = re.match(r'^(build/)?halostage \w+.*--config', cmd) is not None
    if (phase == 2) != needs_daemon:
        continue
    if ex['skip']:
        if phase == 1 or needs_daemon:
            print('# %s: not run (%s): %s' % (where, ex['skip'], cmd))
        continue
    run = re.sub(r'^(?:build/)?(halostage-sim|halostaged|halostage)\b', build + r'/\1', cmd)
    for name in ('/etc/halostage/halostage.ini', 'build/demo/demo.ini', 'config/demo.ini',
                 'site.ini'):
        run = re.sub(r'(?<![\w/.-])' + re.escape(name) + r'(?![\w.-])', conf, run)
    run = run.replace('/var/backups/', site + '/')
    try:
        p = subprocess.run(['bash', '-c', run], cwd=site, capture_output=True, text=True,
                           timeout=120)
        rc, out = p.returncode, p.stdout + p.stderr
    except subprocess.TimeoutExpired:
        rc, out = -1, 'timed out after 120 s'
    fold = lambda t: ' '.join(t.split())
    missing = [s for s in ex['shows'] if fold(s) not in fold(out)]
    if rc in ex['exit'] and not missing:
        print('ok - %s: %s' % (where, cmd))
    else:
        why = 'exit %d, expected %s' % (rc, ex['exit']) if rc not in ex['exit'] else \
              'output lacks %r' % missing
        print('not ok - %s: %s (%s)' % (where, cmd, why))
        for l in out.strip().split('\n')[-6:]:
            print('#   ' + l)
PY
}
run_examples 1

# A whole site file shown in a man page (an .nf block with [site]) passes --check.
/usr/bin/python3 - "$HS_TMP" config/halostage.conf.5 <<'PY'
import re, sys
out, path = sys.argv[1], sys.argv[2]
blocks, cur = [], None
for line in open(path, encoding='utf-8'):
    if line.startswith('.nf'):
        cur = []
    elif line.startswith('.fi'):
        if cur and any(l.strip() == '[site]' for l in cur):
            blocks.append(cur)
        cur = None
    elif cur is not None and not line.startswith('.'):
        cur.append(line.replace('\\-', '-').replace('\\e', '\\'))
for i, b in enumerate(blocks):
    open('%s/man-site-%d.ini' % (out, i), 'w').write(''.join(b))
PY
for f in "$HS_TMP"/man-site-*.ini; do
    [ -e "$f" ] || { not_ok "halostage.conf(5) shows a whole site file"; break; }
    "$B/halostaged" --config "$f" --check >"$HS_TMP/mancheck.out" 2>&1
    check "the site file of halostage.conf(5) EXAMPLE passes --check" test $? -eq 0
    sed 's/^/#   /' "$HS_TMP/mancheck.out" | head -n 5
done

"$B/halostaged" --config "$S/demo.ini" --log-level notice >"$HS_TMP/daemon.log" 2>&1 &
daemon=$!
HS_PIDS+=("$daemon")
# The history examples need states of every pond.
for ((i = 0; i < 1200; i++)); do
    n=$(sqlite3 -cmd ".timeout 2000" "$S/demo.db" \
        "SELECT count(DISTINCT pond_id) >= 9 AND count(*) >= 50 FROM pond_state" 2>/dev/null)
    [ "$n" = 1 ] && break
    sleep 0.05
done
check "the daemon wrote states of every pond for the history examples" test "$n" = 1
run_examples 2
kill "$daemon" 2>/dev/null
wait "$daemon" 2>/dev/null
hs_finish
