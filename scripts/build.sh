#!/usr/bin/env bash
# Installs the dependencies (Debian packages), configures and builds renorm in ./build.
# Extra arguments go to cmake's configure step (e.g. -DRENORM_WERROR=ON).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release "$@"
cmake --build build -j"$(nproc)"
