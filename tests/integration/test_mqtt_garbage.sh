#!/usr/bin/env bash
# Garbage on the command topic of a running halostaged, over a real broker:
# random bytes, random JSON, invalid UTF-8, NUL bytes, oversize payloads and
# unknown verbs (seeded, so a failure repeats). The daemon must answer every
# one on the error topic, keep publishing pond states, and stop cleanly.
source "$(dirname "$0")/lib.sh"
D="$HS_BUILD/halostaged"
S="$HS_BUILD/halostage-sim"
PY=/usr/bin/python3
for tool in mosquitto mosquitto_sub mosquitto_pub; do
    command -v "$tool" >/dev/null || { not_ok "$tool is not installed (mk/deps.sh)"; hs_finish; }
done

mport=$(hs_free_port)
hs_start_mosquitto "$mport" || { not_ok "mosquitto did not start"; hs_finish; }
dikes=$(hs_free_port)
analysers=$(hs_free_port)
cfg="$HS_TMP/site.ini"
sed -e "s/^port = 15020/port = $dikes/" -e "s/^port = 15021/port = $analysers/" \
    -e "s/^poll_interval = 5s/poll_interval = 1s/" -e "s/^poll_interval = 10s/poll_interval = 1s/" \
    config/demo.ini >"$cfg"
printf '\n[mqtt]\nuri = mqtt://127.0.0.1:%s\nclient_id = garbage-gateway\n' "$mport" >>"$cfg"
T=halostage/demo-works

"$S" --config "$cfg" --speed 60 >"$HS_TMP/sim.log" 2>&1 &
HS_PIDS+=($!)
hs_wait_port "$dikes" 10 && hs_wait_port "$analysers" 10 || not_ok "simulator did not start"
mosquitto_sub -h 127.0.0.1 -p "$mport" -q 1 -v -t "$T/error" -t "$T/reply" \
    -t "$T/pond/intake/state" >"$HS_TMP/out.txt" 2>&1 &
HS_PIDS+=($!)
"$D" --config "$cfg" --log-level info >/dev/null 2>"$HS_TMP/daemon.log" &
dpid=$!
HS_PIDS+=("$dpid")
check "daemon publishes state before the garbage" \
    hs_wait_file_line "$HS_TMP/out.txt" "^$T/pond/intake/state " 30
hs_wait_file_line "$HS_TMP/mosquitto-$mport.log" "garbage-gateway" 5

# Seeded garbage, one message a file (mosquitto_pub -l loses lines of raw bytes).
$PY - "$HS_TMP" <<'PYEOF'
import json, os, random, sys
rnd = random.Random(20261201)
d = sys.argv[1]
def rbytes(n):
    return bytes(rnd.randrange(256) for _ in range(n))
def rjson(depth=0):
    k = rnd.randrange(8 if depth < 3 else 5)
    if k == 0: return rnd.randrange(-2**70, 2**70)
    if k == 1: return rnd.random() * 10 ** rnd.randrange(-300, 300)
    if k == 2: return rnd.choice([None, True, False])
    if k in (3, 4): return "".join(rnd.choice("ab\u00e9\u20ac\U0001F30A\"\\/ ") for _ in range(rnd.randrange(80)))
    if k == 5: return [rjson(depth + 1) for _ in range(rnd.randrange(4))]
    keys = ["event_id", "pond", "rule", "duration_s", "operator", "note", "request_id", "x", ""]
    return {rnd.choice(keys): rjson(depth + 1) for _ in range(rnd.randrange(5))}
msgs = []
for i in range(150):
    msgs.append(rbytes(rnd.randrange(1, 200)))
for i in range(150):
    doc = rjson()
    if isinstance(doc, dict):
        doc.pop("operator", None)  # never a valid command: every one must be refused
    t = json.dumps(doc, ensure_ascii=rnd.random() < 0.5).encode()
    if rnd.random() < 0.3 and len(t) > 1:
        t = t[: rnd.randrange(1, len(t))]
    msgs.append(t)
msgs += [b"\xff\xfe\xfd", b"{\"operator\":\"\xc3\"}", b"{\"pond\":\"\xed\xa0\x80\"}",
         b"\x00\x00{}", b"[" * 5000, b"{\"a\":" * 2000, b"null", b"0", b"\"\"" ]
os.mkdir(os.path.join(d, "garbage"))
for i, m in enumerate(msgs):
    with open(os.path.join(d, "garbage", "%03d" % i), "wb") as f:
        f.write(m)
with open(os.path.join(d, "big.bin"), "wb") as f:
    f.write(b"{\"operator\":\"" + b"x" * 200000 + b"\"}")
print(len(msgs), file=open(os.path.join(d, "count"), "w"))
PYEOF
n_garbage=$(cat "$HS_TMP/count")
for f in "$HS_TMP"/garbage/*; do
    mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t "$T/command/ack" -f "$f"
done
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t "$T/command/shelve" -f "$HS_TMP/big.bin"
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t "$T/command/reboot" -m '{}'
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t "$T/command/ack/deeper" -m '{"event_id":1}'
mosquitto_pub -h 127.0.0.1 -p "$mport" -q 1 -t "$T/command/unshelve" -n
# big.bin (200 kB) is beyond the Maximum Packet Size the daemon gave the
# broker (max_inbound + 64 KiB): the broker drops it, so it gets no answer;
# oversize payloads below that limit are answered (the "[" x 5000 one).
want=$((n_garbage + 3))
got=0
for ((i = 0; i < 600; i++)); do
    got=$(grep -c "^$T/error " "$HS_TMP/out.txt")
    [ "$got" -ge "$want" ] && break
    sleep 0.1
done
echo "# $want garbage commands sent, $got error replies"
check "every garbage command got an error reply ($got of $want)" test "$got" -eq "$want"
check "no garbage was accepted" test "$(grep -c "^$T/reply " "$HS_TMP/out.txt")" -eq 0
check "error replies are JSON with ok false and a reason" $PY - "$HS_TMP/out.txt" <<'PYEOF'
import json, sys
bad = 0
for line in open(sys.argv[1], "rb"):
    if not line.startswith(b"halostage/demo-works/error "):
        continue
    r = json.loads(line.split(b" ", 1)[1])
    if r.get("ok") is not False or not r.get("error"):
        bad += 1
        print(line[:200])
sys.exit(1 if bad else 0)
PYEOF
check "oversize payload refused as such" grep -q "^$T/error .*larger than 4096" "$HS_TMP/out.txt"
check "daemon still running after the garbage" kill -0 "$dpid"
states_before=$(grep -c "^$T/pond/intake/state " "$HS_TMP/out.txt")
check "pond states still published after the garbage" \
    hs_wait_file_line "$HS_TMP/out.txt" "^$T/pond/intake/state " 1
for ((i = 0; i < 100; i++)); do
    [ "$(grep -c "^$T/pond/intake/state " "$HS_TMP/out.txt")" -gt "$states_before" ] && break
    sleep 0.1
done
check "a new state arrives after the garbage" \
    test "$(grep -c "^$T/pond/intake/state " "$HS_TMP/out.txt")" -gt "$states_before"
kill -TERM "$dpid"
wait "$dpid"
rc=$?
check "SIGTERM after the garbage: exit 0 (got $rc)" test "$rc" -eq 0
check "no sanitizer report or crash in the daemon log" \
    bash -c "! grep -q 'Sanitizer\|runtime error\|Segmentation' '$HS_TMP/daemon.log'"
[ "$hs_failed" = 0 ] || tail -20 "$HS_TMP/daemon.log"
hs_finish
