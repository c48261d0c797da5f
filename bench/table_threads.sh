#!/usr/bin/env bash
# Wall time of `renorm table` on 1 and on 2 threads (same rows; the table itself must not change).
#   bash bench/table_threads.sh [RENORM] [ORDERS] [DIGITS]
# Defaults: build/apps/renorm, 1.5:6:0.5 (10 orders), 40 digits. Reports both times, the speed-up,
# and whether the two tables (without timing) are identical. The machine's other load matters:
# run it on an idle machine, or read the numbers as an upper bound on the cost.
set -euo pipefail
cd "$(dirname "$0")/.."
RENORM=${1:-build/apps/renorm}
ORDERS=${2:-1.5:6:0.5}
DIGITS=${3:-40}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
export SOURCE_DATE_EPOCH=0
declare -A secs
for t in 1 2; do
    start=$(date +%s.%N)
    "$RENORM" table --orders "$ORDERS" --digits "$DIGITS" --threads "$t" --quiet --out "$tmp/t$t.csv"
    end=$(date +%s.%N)
    secs[$t]=$(echo "$end - $start" | bc -l)
    printf 'threads %d: %.1f s\n' "$t" "${secs[$t]}"
done
printf 'speed-up 1 -> 2 threads: %.2f\n' "$(echo "${secs[1]} / ${secs[2]}" | bc -l)"
printf 'load average now: %s\n' "$(cut -d' ' -f1-3 /proc/loadavg)"
if cmp -s "$tmp/t1.csv" "$tmp/t2.csv"; then echo "tables identical"; else echo "TABLES DIFFER"; exit 1; fi
