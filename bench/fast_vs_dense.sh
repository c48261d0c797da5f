#!/usr/bin/env bash
# The fast path (Newton-Krylov) against the dense path (same Newton schedule, dense LU of the
# whole Jacobian) and the chord steps (one double LU, ~14 digits a step): alpha and delta at one
# truncation for z = 2, each run in its own process. A slow method is stopped after CAP times
# the fast path's time (default 5.5): its row then reads "> T" and the ratio "> CAP", which is
# a measured lower bound. Prints a markdown table and the fitted growth law of the fast path.
#
# Usage: bench/fast_vs_dense.sh [DIGITS...]        (default: 300 1000 3000)
#        CAP=3 METHODS="krylov dense" bench/fast_vs_dense.sh 300 1000
# Needs the bench programs: cmake -B build-bench -DRENORM_BUILD_BENCH=ON && cmake --build build-bench
set -euo pipefail
here="$(cd "$(dirname "$0")/.." && pwd)"
bin="${RENORM_BENCH_BIN:-$here/build-bench/bench/renorm_bench_fast_vs_dense}"
[[ -x "$bin" ]] || { echo "build the bench first: cmake -S $here -B $here/build-bench -DRENORM_BUILD_BENCH=ON && cmake --build $here/build-bench --target renorm_bench_fast_vs_dense" >&2; exit 2; }
digits=("$@")
[[ ${#digits[@]} -gt 0 ]] || digits=(300 1000 3000)
cap="${CAP:-5.5}"
methods="${METHODS:-krylov dense chord}"
fits=()
echo "machine: $(nproc) cores, load $(cut -d' ' -f1-3 /proc/loadavg), $(date -u +%Y-%m-%dT%H:%MZ), commit $(git -C "$here" rev-parse --short HEAD 2>/dev/null || echo unknown)"
echo
echo "| D | method | N | bits | wall s | peak MB | Newton steps | Krylov steps | time / fast |"
echo "|---:|---|---:|---:|---:|---:|---:|---:|---:|"
for d in "${digits[@]}"; do
    fast=""
    for m in $methods; do
        if [[ -z "$fast" ]]; then limit=0; else limit=$(awk -v f="$fast" -v c="$cap" 'BEGIN{printf "%d", f*c+5}'); fi
        start=$(date +%s.%N)
        if line=$(timeout "${limit}s" "$bin" "$m" "$d" 2>/dev/null); then
            read -r _ _ n bits secs mb steps ks _ _ <<<"$line"
            ratio="1"
            if [[ -z "$fast" ]]; then fast="$secs"; fits+=("$d $secs"); else ratio=$(awk -v s="$secs" -v f="$fast" 'BEGIN{printf "%.1f", s/f}'); fi
            echo "| $d | $m | $n | $bits | $secs | $mb | $steps | $ks | $ratio |"
        else
            code=$?
            took=$(awk -v s="$start" -v e="$(date +%s.%N)" 'BEGIN{printf "%.0f", e-s}')
            if [[ $code -eq 124 ]]; then
                echo "| $d | $m | | | > $took (stopped) | | | | > $cap |"
            else
                echo "| $d | $m | | | failed ($line) | | | | |"
            fi
        fi
    done
done
if [[ ${#fits[@]} -ge 2 ]]; then
    printf '%s\n' "${fits[@]}" | awk '{x=log($1); y=log($2); sx+=x; sy+=y; sxx+=x*x; sxy+=x*y; k++}
        END{b=(k*sxy-sx*sy)/(k*sxx-sx*sx); a=exp((sy-b*sx)/k);
            printf "\nfast path: wall seconds ~ %.3g * (D/1000)^%.2f (least squares over %d sizes)\n", a*1000^b, b, k}'
fi
