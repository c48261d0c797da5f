#!/usr/bin/env bash
# The README's first command: build, then compute alpha and delta for z = 2 to 100 digits.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh
./build/apps/renorm solve --order 2 --digits 100
