#!/usr/bin/env bash
# Interim `make demo`: runs `halostage calc` over an invented sample set
# (mk/demo_samples.csv) until the daemon can run the whole demo site.
# Samples beyond seawater are refused on purpose: they show what the
# calculator says when a brine needs the brine model.
set -u
cd "$(dirname "$0")/.."
hs=${1:-build}/halostage
while IFS=, read -r pond kind value temp; do
    case "$pond" in ''|'#'*) continue ;; esac
    echo "== $pond: $kind $value at $temp degC"
    "$hs" calc "--$kind" "$value" --temperature "$temp" || echo "   (refused, as it should be: see above)"
    echo
done < mk/demo_samples.csv
echo "== the same intake sample as JSON, Baume on the Gerlach scale at 60/60 degF"
"$hs" calc --conductivity 52.4 --temperature 23.8 --reference-temperature 60F --modulus 146.78 --json
