#!/usr/bin/env bash
# Inbound operator commands over a real broker: garbage, oversize payloads,
# wrong types and unknown ids are refused with a reply on the error topic;
# a real ack is applied once and a repeated ack says it changed nothing.
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
    -t halostage/demo/error -C 9 -W 10 >"$HS_TMP/replies.txt" 2>/dev/null &
SUB_PID=$!
HS_PIDS+=("$SUB_PID")
hs_wait_file_line "$LOG" "cmd-watch 1 halostage/demo/error" 10

pub() { mosquitto_pub -h 127.0.0.1 -p "$PORT" -q 1 -t "halostage/demo/command/$1" -m "$2"; }
pub ack 'this is not json'
pub ack "{\"event_id\":1,\"operator\":\"ana\",\"note\":\"$(head -c 5000 /dev/zero | tr '\0' x)\"}"
pub ack '{"event_id":"1","operator":"ana"}'
pub shelve '{"pond":"east-1","rule":"band","duration_s":"1h","operator":"ana"}'
pub ack '{"event_id":4242,"operator":"ana"}'
pub ack '{"pond":"west-9","operator":"ana"}'
pub reboot '{}'
pub ack '{"event_id":1,"operator":"ana","request_id":"r-1"}'
pub ack '{"event_id":1,"operator":"ana","request_id":"r-2"}'
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
check "journal holds the raise and one ack only" \
    test "$(sqlite3 "$DB" "SELECT group_concat(to_state) FROM alarm_journal")" = "unacknowledged,acknowledged"
check "the ack names its operator" \
    test "$(sqlite3 "$DB" "SELECT actor FROM alarm_journal WHERE event_id = 2")" = ana
kill "$AGENT_PID"
wait "$AGENT_PID"
check "agent still healthy after the garbage (clean exit)" test $? -eq 0
[ "$hs_failed" = 0 ] || { cat "$HS_TMP/agent.log"; grep -v PING "$LOG" | head -60; }
hs_finish
