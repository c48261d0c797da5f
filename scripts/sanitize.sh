#!/usr/bin/env bash
# Runs the test suite under AddressSanitizer + UndefinedBehaviorSanitizer. It uses the clang
# build of scripts/fuzz.sh (build-fuzz/): there the library is compiled with
# -fsanitize=address,undefined (plus the fuzzer's coverage instrumentation, inert outside a
# fuzzer) and so are the test programs and the command (tests/fuzz/CMakeLists.txt), so one build
# serves both jobs. UBSan halts on the first report; any report fails the run.
# Left out, and why:
#   package.*  the consumer project links the installed library without the sanitizer runtime;
#   python.*   the module is not built here (the interpreter is not instrumented);
#   tests labelled `slow`.
# (For a gcc build with the sanitizers instead: cmake -DRENORM_SANITIZE="address;undefined".)
# Usage: bash scripts/sanitize.sh [extra ctest arguments, e.g. -R Solve]
set -euo pipefail
cd "$(dirname "$0")/.."
dir=build-fuzz
CXX=clang++ cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DRENORM_BUILD_FUZZ=ON \
    -DRENORM_BUILD_TESTS=ON -DRENORM_BUILD_APPS=ON -DRENORM_BUILD_PYTHON=OFF >/dev/null
cmake --build "$dir" -j"$(nproc)"
export ASAN_OPTIONS="${ASAN_OPTIONS:-detect_leaks=1:abort_on_error=1}"
export UBSAN_OPTIONS="${UBSAN_OPTIONS:-halt_on_error=1:print_stacktrace=1}"
ctest --test-dir "$dir" --output-on-failure -j"$(nproc)" -E '^(package|python)\.' -LE slow \
    --timeout 900 "$@"
