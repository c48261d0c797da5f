#!/usr/bin/env bash
# Installs the dependencies (Debian packages), configures and builds renorm in ./build.
# Extra arguments go to cmake's configure step (e.g. -DRENORM_WERROR=ON).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release \
    -DPython_EXECUTABLE="$(python3 -c 'import sys; print(sys.executable)')" "$@"
cmake --build build -j"$(nproc)"
# The Python module: importable by this `python3` (a renorm.pth file in its site-packages).
if [[ -d build/python/renorm ]]; then bash scripts/install-python.sh build; fi
