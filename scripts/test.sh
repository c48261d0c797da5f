#!/usr/bin/env bash
# The README's test command: build with warnings as errors, then run the whole test suite.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh -DRENORM_WERROR=ON
ctest --test-dir build --output-on-failure -j"$(nproc)"
