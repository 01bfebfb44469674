#!/usr/bin/env bash
# The manual pages render without warnings and cover what the code defines:
# every config key of the key tables (plugin/hs_conf_*.c) in its section of
# halostage.conf(5), every CLI subcommand (plugin/cli/commands.c) and its
# --help options in halostage(1), every halostaged option in halostaged(8).
# A key, command or option added later without documentation fails here.
source "$(dirname "$0")/lib.sh"

P1=plugin/cli/halostage.1
P5=config/halostage.conf.5
P8=plugin/host/halostaged.8

# --- rendering: no warnings from groff (all classes) nor from man ---------
for page in "$P1" "$P5" "$P8"; do
    if [ ! -f "$page" ]; then
        not_ok "$page exists"
        continue
    fi
    groff -man -ww -z "$page" >"$HS_TMP/g.out" 2>"$HS_TMP/g.err"
    if [ $? -eq 0 ] && [ ! -s "$HS_TMP/g.err" ]; then
        ok "$page: groff -man -ww renders without warnings"
    else
        not_ok "$page: groff warnings: $(head -5 "$HS_TMP/g.err")"
    fi
    LC_ALL=C.UTF-8 MANWIDTH=80 man --warnings -l "$page" >"$HS_TMP/m.out" 2>"$HS_TMP/m.err"
    if [ $? -eq 0 ] && [ ! -s "$HS_TMP/m.err" ] && [ -s "$HS_TMP/m.out" ]; then
        ok "$page: man --warnings renders without warnings"
    else
        not_ok "$page: man warnings: $(head -5 "$HS_TMP/m.err")"
    fi
done

# --- configuration keys ---------------------------------------------------
# section_text KIND: the roff source of `.SH [KIND` up to the next .SH.
section_text() {
    awk -v k="$1" '/^\.SH / { on = (index($0, ".SH [" k) == 1) ; next } on' "$P5"
}
# documented TEXT KEY: KEY as a word on a .B/.BR/.BI line (a term, not prose).
documented() {
    grep -E '^\.(B|BR|BI|IR|RB) ' <<<"$1" | grep -qw -- "$2"
}

n_keys=0
missing_keys=""
n_files=0
for src in plugin/hs_conf_*.c; do
    kind=$(grep -oE '\.kind = "[a-z_]+"' "$src" | head -1 | sed -E 's/.*"(.*)"/\1/')
    [ -n "$kind" ] || continue
    n_files=$((n_files + 1))
    text=$(section_text "$kind")
    if [ -z "$text" ]; then
        not_ok "$P5 has a section for [$kind] ($src)"
        continue
    fi
    # Keys: the first string of a KEY_*/ION( table macro, or `.name = "..."`.
    keys=$(grep -oE '(KEY_[A-Z0-9_]+|ION)\("[a-z0-9_]+"|\.name = "[a-z0-9_]+"' "$src" |
        sed -E 's/.*"([a-z0-9_]+)"$/\1/' | sort -u)
    for key in $keys; do
        n_keys=$((n_keys + 1))
        documented "$text" "$key" || missing_keys="$missing_keys [$kind] $key"
    done
done
if [ "$n_files" -ge 8 ] && [ "$n_keys" -ge 100 ]; then
    ok "found $n_keys keys in $n_files key tables"
else
    not_ok "key extraction found only $n_keys keys in $n_files tables (parser out of date?)"
fi
if [ -z "$missing_keys" ]; then
    ok "$P5 documents every config key in its section"
else
    not_ok "$P5 lacks:$missing_keys"
fi

# Every section kind the parser knows has a heading.
for kind in $(grep -ohE '\.kind = "[a-z_]+"' plugin/hs_conf_*.c | sed -E 's/.*"(.*)"/\1/'); do
    grep -q "^\.SH \[$kind" "$P5" || not_ok "$P5 has no .SH [$kind"
done

# The example in halostage.conf(5) is a valid configuration.
sed -n '/^\.SH EXAMPLES/,/^\.SH /p' "$P5" | sed -n '/^\.nf/,/^\.fi/p' | sed '1d;$d' |
    sed 's/\\-/-/g' >"$HS_TMP/example.ini"
if [ -s "$HS_TMP/example.ini" ] &&
    "$HS_BUILD/halostaged" --config "$HS_TMP/example.ini" --check >/dev/null 2>"$HS_TMP/ex.err"; then
    ok "the example of $P5 passes halostaged --check"
else
    not_ok "the example of $P5 fails --check: $(head -3 "$HS_TMP/ex.err")"
fi

# --- CLI subcommands and their options -------------------------------------
cmds=$(grep -oE '^\s*\{"[a-z-]+", hs_cmd_' plugin/cli/commands.c | sed -E 's/.*\{"([a-z-]+)".*/\1/')
n_cmds=$(wc -w <<<"$cmds")
if [ "$n_cmds" -ge 9 ]; then
    ok "found $n_cmds subcommands in commands.c"
else
    not_ok "found only $n_cmds subcommands in commands.c (parser out of date?)"
fi
# The page source writes "-" as "\-"; compare on the plain text.
plain1=$(sed 's/\\-/-/g' "$P1")
for cmd in $cmds; do
    if ! grep -qx "\.SS $cmd" <<<"$plain1"; then
        not_ok "$P1 has no .SS $cmd"
        continue
    fi
    # Every long option that `halostage CMD --help` names appears in the page.
    "$HS_BUILD/halostage" "$cmd" --help >"$HS_TMP/help" 2>&1
    opts=$(grep -oE -- '--[a-z][a-z0-9-]*' "$HS_TMP/help" | sort -u)
    missing=""
    for o in $opts; do
        grep -qE -- "$o([^a-z0-9-]|\$)" <<<"$plain1" || missing="$missing $o"
    done
    if [ -z "$missing" ] && [ -n "$opts" ]; then
        ok "$P1 documents $cmd and its options"
    else
        not_ok "$P1: $cmd lacks:${missing:- (no options found in --help)}"
    fi
done

# --- halostaged options ----------------------------------------------------
plain8=$(sed 's/\\-/-/g' "$P8")
"$HS_BUILD/halostaged" --help >"$HS_TMP/dhelp" 2>&1
dopts=$(grep -oE -- '--[a-z][a-z0-9-]*' "$HS_TMP/dhelp" | sort -u)
missing=""
for o in $dopts; do
    grep -qE -- "$o([^a-z0-9-]|\$)" <<<"$plain8" || missing="$missing $o"
done
if [ -z "$missing" ] && [ -n "$dopts" ]; then
    ok "$P8 documents every halostaged option"
else
    not_ok "$P8 lacks:${missing:- (no options found in --help)}"
fi
for word in SIGHUP SIGTERM READY=1 WATCHDOG=1 78 69 actuate; do
    grep -qF -- "$word" <<<"$plain8" || not_ok "$P8 does not mention $word"
done

hs_finish
