#!/usr/bin/env bash
# Garbage numbers and options to every halostage subcommand: each value of a
# valid command line in turn replaced by text that is not a number, an
# overflow, NaN/infinity, an option, invalid UTF-8, a format string or a very
# long string; then a value missing, an unknown option, and random argument
# lists (seeded). Each must exit non-zero (below 128: no signal) with a
# one-line message on stderr, and never print a sanitizer report.
source "$(dirname "$0")/lib.sh"
H="$HS_BUILD/halostage"
PY=/usr/bin/python3

cfg="$HS_TMP/site.ini"
sed -e 's/^port = 15020/port = 9/' -e 's/^port = 15021/port = 9/' config/demo.ini >"$cfg"
mkdir "$HS_TMP/dir.ini"
printf '[site]\nname = \xff\xfe\n\x00\n' >"$HS_TMP/bad.ini"

$PY - "$H" "$cfg" "$HS_TMP" <<'PYEOF'
import random, re, subprocess, sys
H, CFG, TMP = sys.argv[1], sys.argv[2], sys.argv[3]
rnd = random.Random(424242)

GARBAGE = ["", "abc", "1e999", "-1e999", "nan", "inf", "-inf", "12abc", "1,5", "--json",
           "-", "\udcff\udcfe", "%s%n%n", "A" * 5000, "1e99999", "1e300", "-1e300", "0.5.5"]
FEWER = ["", "abc", "1e999", "nan", "12abc", "--json", "\udcff", "%n", "A" * 5000]

# (base argv, options whose value is replaced, garbage list)
CASES = [
    (["calc", "--conductivity", "50", "--temperature", "25"],
     ["--conductivity", "--temperature"], GARBAGE),
    (["calc", "--conductivity", "50", "--temperature", "25", "--pressure", "1",
      "--modulus", "145", "--reference-temperature", "20", "--feed-salinity", "35"],
     ["--pressure", "--reference-temperature", "--feed-salinity"], GARBAGE),
    (["calc", "--density", "1100", "--temperature", "25"], ["--density"], GARBAGE),
    (["brine", "--molality", "Na=6.0,Cl=6.0", "--temperature", "25"],
     ["--molality", "--temperature"],
     GARBAGE + ["Na=", "Na=abc", "=6", "Xx=1,Cl=1", "Na=6,,Cl=6", "Na=-1,Cl=-1",
                "Na=1e999,Cl=1", "Na=6;Cl=6", "Na=6,Cl"]),
    (["path", "--temperature", "25", "--mode", "fractional"], ["--temperature", "--mode"], GARBAGE),
    (["path", "--feed-salinity", "35", "--pco", "1"], ["--feed-salinity", "--pco"], FEWER),
    (["status", "--config", CFG], ["--config"],
     FEWER + [TMP + "/dir.ini", TMP + "/bad.ini", TMP + "/none.ini"]),
    (["history", "--config", CFG, "--pond", "c1", "--since", "1d", "--limit", "10"],
     ["--since", "--limit"], FEWER + ["-5", "0", "99999999999999999999"]),
    (["history", "--config", CFG, "--pond", "c1", "--since", "1d", "--step", "1h", "--until", "now"],
     ["--step", "--until"], FEWER + ["0s", "-1h", "2026-13-45T99:00Z"]),
    (["export", "--csv", "--config", CFG, "--since", "30d", "--what", "states"],
     ["--since", "--what"], FEWER + ["2026-02-30T06:00Z", "states,alarms"]),
    (["ack", "--config", CFG, "--event", "1", "--wait", "1s"], ["--event"],
     FEWER + ["0", "-1", "1.5", "99999999999999999999"]),
    (["ack", "--config", CFG, "--pond", "c1", "--rule", "bittern", "--shelve", "1h", "--wait", "1s"],
     ["--shelve", "--wait"], FEWER + ["0s", "-1h", "1y"]),
    (["forecast", "--level", "0.5", "--density", "1100", "--temperature", "25",
      "--area", "10000", "--rate-mm-day", "5"],
     ["--level", "--density", "--temperature", "--area", "--rate-mm-day"], FEWER),
    (["plan", "--from", "c1", "--to", "c2", "--target-density", "1100", "--config", CFG],
     ["--target-density"], FEWER),
]

def run(argv):
    p = subprocess.run([H] + argv, capture_output=True, timeout=60)
    return p.returncode, p.stderr

ran = bad = 0
def judge(argv, rc, err, strict):
    global bad
    text = err.decode("utf-8", "replace")
    lines = [l for l in text.splitlines() if l.strip()]
    # A configuration with several problems names each one as FILE:LINE:.
    if len(lines) > 1 and all(re.match(r"^/\S*:\d+: ", l) for l in lines):
        lines = lines[:1]
    crash = rc < 0 or rc >= 128 or "Sanitizer" in text or "runtime error" in text
    wrong = crash or (strict and (rc == 0 or len(lines) != 1))
    if wrong:
        bad += 1
        if bad <= 80:
            shown = [a if len(a) < 40 else a[:20] + "...(%d)" % len(a) for a in argv]
            print("# bad: %r -> exit %d, stderr %d lines: %s" % (shown, rc, len(lines), lines[0][:150] if lines else ""))

for base, opts, garbage in CASES:
    for opt in opts:
        i = base.index(opt)
        for g in garbage:
            argv = base[:i + 1] + [g] + base[i + 2:]
            rc, err = run(argv)
            ran += 1
            judge(argv, rc, err, True)
        # the value missing: option last
        argv = base[:i] + base[i + 2:] + [opt]
        rc, err = run(argv)
        ran += 1
        judge(argv, rc, err, True)
    argv = base + ["--no-such-option"]
    rc, err = run(argv)
    ran += 1
    judge(argv, rc, err, True)
strict_runs = ran

# Random argument lists: options of the command and garbage in any order.
for base, opts, garbage in CASES:
    words = [w for w in base[1:] if w.startswith("--")] + opts + ["--json", "--help"]
    for k in range(12):
        argv = [base[0]] + [rnd.choice(words + garbage) for _ in range(rnd.randrange(1, 9))]
        rc, err = run(argv)
        ran += 1
        judge(argv, rc, err, False)
print("# %d command lines run (%d with one bad value), %d wrong" % (ran, strict_runs, bad))
sys.exit(1 if bad else 0)
PYEOF
rc=$?
check "every subcommand refuses garbage with one line and no crash" test "$rc" -eq 0
hs_finish
