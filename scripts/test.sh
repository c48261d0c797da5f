#!/usr/bin/env bash
# The README's test command (and CI's): install dependencies, build with warnings as errors, run
# the whole test suite, the Python check, 20 s of fuzzing per target and the suite under sanitizers.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh -DRENORM_WERROR=ON -DRENORM_WITH_MPI=ON
ctest --test-dir build --output-on-failure -j"$(nproc)"
# The README's Python line, from a fresh shell outside the tree (build.sh wrote renorm.pth).
(cd / && env -u PYTHONPATH python3 -c "import renorm, sys; d = renorm.solve(order=2, digits=30).delta; print('python: delta =', d); sys.exit(d != '4.66920160910299067185320382047')")
# Hardened inputs (one clang build, build-fuzz/): each libFuzzer target for 20 s, then the test
# suite under ASan + UBSan.
bash scripts/fuzz.sh 20
bash scripts/sanitize.sh
