#!/usr/bin/env bash
# Times `renorm solve` (alpha and delta together, with the second truncation that checks the
# digits) at several digit counts and prints a table: D, N, precision, wall seconds, peak memory.
# Usage: bench/solve_scaling.sh [BUILD_DIR] [DIGITS...]   (default: build, 100 300 1000)
set -euo pipefail
build=${1:-build}
shift || true
digits=("$@")
((${#digits[@]})) || digits=(100 300 1000)
bin="$build/apps/renorm"
[[ -x $bin ]] || { echo "no $bin: build first" >&2; exit 2; }
command -v /usr/bin/time >/dev/null || { echo "needs GNU time (apt-get install time)" >&2; exit 2; }
printf "| D | N | N check | precision (bits) | wall (s) | peak memory (MB) | alpha digits | delta digits |\n"
printf "|---:|---:|---:|---:|---:|---:|---:|---:|\n"
for d in "${digits[@]}"; do
    out=$(mktemp)
    /usr/bin/time -f "%e %M" -o "$out.time" "$bin" solve --digits "$d" --eigenvalues 0 --json --quiet >"$out"
    read -r wall kb <"$out.time"
    python3 - "$out" "$d" "$wall" "$kb" <<'PY'
import json, sys
j = json.load(open(sys.argv[1]))
print(f"| {sys.argv[2]} | {j['N']} | {j['N_check']} | {j['precision_bits']} | {float(sys.argv[3]):.2f} | {int(sys.argv[4])/1024:.0f} | {j['alpha_digits']} | {j['delta_digits']} |")
PY
    rm -f "$out" "$out.time"
done
