#!/usr/bin/env bash
# Regenerates the pictures in docs/images/ from real runs of `renorm plot` (needs gnuplot).
# Usage: bash scripts/make-figures.sh [BUILD_DIR]   (default: build; run scripts/build.sh first)
set -euo pipefail
cd "$(dirname "$0")/.."
renorm="${1:-build}/apps/renorm"
[[ -x "$renorm" ]] || { echo "make-figures: $renorm not found (build first)" >&2; exit 2; }
mkdir -p docs/images
"$renorm" plot fixed-point  --out docs/images/fixed-point.png
"$renorm" plot coefficients --out docs/images/coefficients.png --digits 60
"$renorm" plot spectrum     --out docs/images/spectrum.png --eigenvalues 12
"$renorm" plot cascade      --out docs/images/cascade.png --levels 12
"$renorm" plot bifurcation  --out docs/images/bifurcation.png --levels 6
"$renorm" plot spectrum     --out docs/images/spectrum-z4.png --order 4 --eigenvalues 12
"$renorm" plot cascade      --out docs/images/cascade-sine.png --family sine --levels 12
