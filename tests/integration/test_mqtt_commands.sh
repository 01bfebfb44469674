#!/usr/bin/env bash
# Inbound operator commands over a real broker: garbage, oversize payloads,
# wrong types and unknown ids are refused with a reply on the error topic;
# a real ack is applied once and a repeated ack says it changed nothing; a
# command without its id and time, a stale one, and a repeated request_id
# are answered and not applied; a retained shelve is never applied and is
# answered once, across a restart of the receiver too.
. "$(dirname "$0")/lib.sh"

AGENT="$HS_BUILD/tools/hs_outbox_agent"
PORT=$(hs_free_port)
hs_start_mosquitto "$PORT" "log_type all" || not_ok "broker starts"
LOG="$HS_TMP/mosquitto-$PORT.log"
DB="$HS_TMP/cmd.db"

# One alarm raised (event 1), then the agent listens for commands.
"$AGENT" --db "$DB" --uri "mqtt://127.0.0.1:$PORT" --alarms 1 --commands --keep-running \
    --timeout-s 60 >"$HS_TMP/agent.log" 2>&1 &
AGENT_PID=$!
HS_PIDS+=("$AGENT_PID")
hs_wait_file_line "$LOG" "hs-outbox-agent 1 halostage/demo/command/#" 10 ||
    not_ok "agent subscribes to commands"

mosquitto_sub -h 127.0.0.1 -p "$PORT" -q 1 -v -i cmd-watch -t halostage/demo/reply \
    -t halostage/demo/error -C 12 -W 20 >"$HS_TMP/replies.txt" 2>/dev/null &
SUB_PID=$!
HS_PIDS+=("$SUB_PID")
hs_wait_file_line "$LOG" "cmd-watch 1 halostage/demo/error" 10

pub() { mosquitto_pub -h 127.0.0.1 -p "$PORT" -q 1 -t "halostage/demo/command/$1" -m "$2"; }
pub ack 'this is not json'
pub ack "{\"event_id\":1,\"operator\":\"ana\",\"note\":\"$(head -c 5000 /dev/zero | tr '\0' x)\"}"
pub ack '{"event_id":"1","operator":"ana"}'
pub shelve '{"pond":"east-1","rule":"band","duration_s":"1h","operator":"ana"}'
now=$(date -u +%Y-%m-%dT%H:%M:%SZ)
pub ack "{\"event_id\":4242,\"operator\":\"ana\",\"request_id\":\"u-1\",\"time\":\"$now\"}"
pub ack "{\"pond\":\"west-9\",\"operator\":\"ana\",\"request_id\":\"u-2\",\"time\":\"$now\"}"
pub reboot '{}'
pub ack "{\"event_id\":1,\"operator\":\"ana\",\"request_id\":\"r-1\",\"time\":\"$now\"}"
pub ack "{\"event_id\":1,\"operator\":\"ana\",\"request_id\":\"r-2\",\"time\":\"$now\"}"
pub ack '{"event_id":1,"operator":"ana"}'
pub ack '{"event_id":1,"operator":"ana","request_id":"r-3","time":"2020-01-01T00:00:00Z"}'
pub ack "{\"event_id\":1,\"operator\":\"ana\",\"request_id\":\"r-1\",\"time\":\"$now\"}"
wait "$SUB_PID"

line() { sed -n "${1}p" "$HS_TMP/replies.txt"; }
has() { line "$1" | grep -q -- "$2"; }
check "garbage refused on the error topic" has 1 '^halostage/demo/error .*not JSON'
check "oversize payload refused" has 2 '^halostage/demo/error .*larger than 4096'
check "wrong type refused" has 3 '^halostage/demo/error .*event_id must be a positive integer'
check "duration as text refused" has 4 '^halostage/demo/error .*duration_s'
check "unknown event refused" has 5 '^halostage/demo/error .*unknown event_id 4242'
check "unknown pond refused" has 6 "^halostage/demo/error .*unknown pond 'west-9'"
check "unknown command refused" has 7 '^halostage/demo/error .*unknown command'
check "real ack accepted on the reply topic" has 8 '^halostage/demo/reply .*"request_id":"r-1".*"result":"acknowledged"'
check "repeated ack is a no-op that says so" has 9 '^halostage/demo/reply .*"request_id":"r-2".*"result":"already-acknowledged"'
check "a command without request_id and time is refused" has 10 "^halostage/demo/error .*missing key 'request_id'"
check "a stale command is refused" has 11 '^halostage/demo/error .*"request_id":"r-3".*stale: sent at 2020-01-01T00:00:00Z'
check "a repeated request_id gets its first answer again" has 12 '^halostage/demo/reply .*"request_id":"r-1".*"result":"acknowledged".*"repeat":true'
check "journal holds the raise and one ack only" \
    test "$(sqlite3 "$DB" "SELECT group_concat(to_state) FROM alarm_journal")" = "unacknowledged,acknowledged"
check "the ack names its operator" \
    test "$(sqlite3 "$DB" "SELECT actor FROM alarm_journal WHERE event_id = 2")" = ana
kill "$AGENT_PID"
wait "$AGENT_PID"
check "agent still healthy after the garbage (clean exit)" test $? -eq 0

# A retained shelve: never applied, answered once, and not again after the
# receiver restarts (the broker hands the retained message out again).
mosquitto_sub -h 127.0.0.1 -p "$PORT" -q 1 -v -i err-watch -t halostage/demo/error \
    -W 30 >"$HS_TMP/errors.txt" 2>/dev/null &
ERR_PID=$!
HS_PIDS+=("$ERR_PID")
hs_wait_file_line "$LOG" "err-watch 1 halostage/demo/error" 10
now=$(date -u +%Y-%m-%dT%H:%M:%SZ)
mosquitto_pub -h 127.0.0.1 -p "$PORT" -q 1 -r -t halostage/demo/command/shelve -m \
    "{\"pond\":\"east-1\",\"rule\":\"band\",\"duration_s\":3600,\"operator\":\"eve\",\"request_id\":\"k-1\",\"time\":\"$now\"}"
for round in 1 2; do
    "$AGENT" --db "$DB" --uri "mqtt://127.0.0.1:$PORT" --commands --keep-running \
        --timeout-s 60 >"$HS_TMP/agent$round.log" 2>&1 &
    AGENT_PID=$!
    HS_PIDS+=("$AGENT_PID")
    for ((i = 0; i < 200; i++)); do
        [ "$(grep -c "hs-outbox-agent 1 halostage/demo/command/#" "$LOG")" -ge $((round + 1)) ] && break
        sleep 0.05
    done
    # the retained message goes out right after the subscription; its answer
    # (if any) right after that: wait for the receiver to have taken it
    # The retained message goes out right after the subscription; a live
    # command after it is answered after it (one thread, one outbox): once
    # that answer is here, any answer to the retained one is here too.
    hs_wait_file_line "$LOG" "Sending PUBLISH to hs-outbox-agent \(d0, q1, r1, m[0-9]+, 'halostage/demo/command/shelve'" 10
    pub "marker$round" '{}'
    hs_wait_file_line "$HS_TMP/errors.txt" "\"command\":\"marker$round\"" 10 ||
        not_ok "round $round: the receiver answered the marker"
    kill "$AGENT_PID"
    wait "$AGENT_PID"
done
check "the retained shelve was delivered retained twice (two connects)" \
    test "$(grep -cE "Sending PUBLISH to hs-outbox-agent \(d0, q1, r1, m[0-9]+, 'halostage/demo/command/shelve'" "$LOG")" -ge 2
check "a retained shelve is never applied" \
    test "$(sqlite3 "$DB" "SELECT count(*) FROM alarm_journal WHERE cause LIKE 'shelve%'")" -eq 0
check "it is answered once on the error topic, saying why" \
    test "$(grep -c 'retained command is never executed' "$HS_TMP/errors.txt")" -eq 1
[ "$hs_failed" = 0 ] || { cat "$HS_TMP/agent.log"; grep -v PING "$LOG" | head -60; }
hs_finish
