#!/usr/bin/env bash
# Installs every build and test dependency of renorm from Debian's packages.
# Idempotent; run as root (or with sudo available) on Debian 12 or later.
set -euo pipefail
packages=(
    g++ cmake make git
    libflint-arb-dev libflint-dev libgmp-dev libmpfr-dev
    libeigen3-dev libspectra-dev
    libcli11-dev nlohmann-json3-dev
    libgtest-dev libbenchmark-dev
    python3 python3-mpmath time
    libopenmpi-dev openmpi-bin
    python3-dev pybind11-dev gnuplot-nox clang libclang-rt-14-dev
)
missing=()
for p in "${packages[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
    SUDO=""
    [[ $(id -u) -ne 0 ]] && SUDO="sudo"
    export DEBIAN_FRONTEND=noninteractive
    $SUDO apt-get update -qq
    $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi
