#!/usr/bin/env bash
# Builds the libFuzzer targets (clang, -fsanitize=fuzzer,address,undefined) in build-fuzz/ and
# runs each for SECONDS (default 20) from its seed corpus tests/fuzz/corpus/<target>/ (new inputs
# go to build-fuzz/corpus/<target>/, so the seeds in the tree stay as they are). Prints the number
# of executions per target; exits 1 if a target finds a crash (the input is in
# build-fuzz/artifacts/).
# Usage: bash scripts/fuzz.sh [SECONDS] [TARGET...]   targets: certificate expression cli
set -euo pipefail
cd "$(dirname "$0")/.."
seconds="${1:-20}"
shift || true
targets=("$@")
((${#targets[@]})) || targets=(certificate expression cli)
dir=build-fuzz
# Tests and the command are configured too (scripts/sanitize.sh runs them from this build) but
# only the fuzz targets are built here.
CXX=clang++ cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DRENORM_BUILD_FUZZ=ON \
    -DRENORM_BUILD_TESTS=ON -DRENORM_BUILD_APPS=ON -DRENORM_BUILD_PYTHON=OFF >/dev/null
cmake --build "$dir" -j"$(nproc)" --target $(printf 'renorm_fuzz_%s ' "${targets[@]}")
mkdir -p "$dir/artifacts"
status=0
for t in "${targets[@]}"; do
    mkdir -p "$dir/corpus/$t"
    log="$dir/fuzz_$t.log"
    if "$dir/tests/fuzz/renorm_fuzz_$t" -max_total_time="$seconds" -timeout=20 -rss_limit_mb=2048 \
        -print_final_stats=1 -artifact_prefix="$dir/artifacts/$t-" \
        "$dir/corpus/$t" "tests/fuzz/corpus/$t" >"$log" 2>&1; then
        result="ok"
    else
        result="FAILED (see $log and $dir/artifacts/)"
        status=1
    fi
    runs=$(grep -o 'stat::number_of_executed_units: *[0-9]*' "$log" | grep -o '[0-9]*$' || echo "?")
    echo "fuzz $t: $runs executions in ${seconds} s: $result"
done
exit $status
