#!/usr/bin/env bash
# Regenerates every table shipped in data/ with renorm itself. Each table's header records the
# renorm version and commit, the exact command, the date, and per row N, the working precision and
# whether the row is certified or estimated. data/README.md lists the files.
#
#   bash scripts/make-data.sh [all|orders|certified|z2-1000|z2-3000|z2-10000]   # default: all
#
# z2-10000 is not part of `all`: it takes hours. It saves its state to $CKPT (default
# build/alpha-delta-z2-10000.ckpt) after every Newton step; run the same command again after an
# interruption and it continues from there (a checkpoint of `renorm solve -z 2 -d 10000 -k 0` is
# accepted too).
#
# RENORM names the renorm binary (default build/apps/renorm; build it first). THREADS sets the
# rows computed at once (default: one per core). A table in which some row failed is still
# written (the row says why; `renorm table` exits 1 then) and this script goes on.
set -euo pipefail
cd "$(dirname "$0")/.."
RENORM=${RENORM:-build/apps/renorm}
THREADS=${THREADS:-0}
what=${1:-all}
[[ -x $RENORM ]] || { echo "make-data: $RENORM not found; build first (bash scripts/build.sh)" >&2; exit 2; }

# table FILE ARGS...: writes data/FILE with `renorm table ARGS... --out data/FILE --force`;
# exit code 1 (some row failed, kept in the table as a failed row) is not an error here.
table() {
    local file=$1; shift
    echo "make-data: data/$file" >&2
    local rc=0
    "$RENORM" table "$@" --threads "$THREADS" --out "data/$file" --force || rc=$?
    if ((rc != 0 && rc != 1)); then
        echo "make-data: data/$file failed (exit $rc)" >&2
        exit "$rc"
    fi
}
# render CSV FILE FORMAT: the same table in another format (same provenance and rows).
render() {
    "$RENORM" table --from "data/$1" --format "$3" --out "data/$2" --force || (($? == 1))
}

if [[ $what == all || $what == orders ]]; then
    table alpha-delta-orders.csv --orders 1.5:8:0.5,10,12,16,24,32 --digits 100 --fallback 30,10 --timing \
        --title "alpha(z) and delta(z) for z = 1.5 to 32, 100 digits requested"
    render alpha-delta-orders.csv alpha-delta-orders.md markdown
fi
if [[ $what == all || $what == certified ]]; then
    table alpha-delta-certified.csv --orders 1.5:6:0.5 --digits 50 --certify --timing \
        --title "alpha(z) and delta(z) for z = 1.5 to 6 with proved enclosures, 50 digits requested"
    render alpha-delta-certified.csv alpha-delta-certified.md markdown
fi
if [[ $what == all || $what == z2-1000 ]]; then
    table alpha-delta-z2-1000.csv --orders 2 --digits 1000 --timing \
        --title "alpha and delta for z = 2 (the quadratic case), 1000 digits requested"
fi
if [[ $what == z2-10000 ]]; then
    CKPT=${CKPT:-build/alpha-delta-z2-10000.ckpt}
    if [[ -f $CKPT ]]; then resume=(--resume "$CKPT"); else resume=(--checkpoint "$CKPT"); fi
    table alpha-delta-z2-10000.csv --orders 2 --digits 10000 --timing "${resume[@]}" \
        --title "alpha and delta for z = 2 (the quadratic case), 10000 digits requested"
fi
if [[ $what == all || $what == z2-3000 ]]; then
    table alpha-delta-z2-3000.csv --orders 2 --digits 3000 --timing \
        --title "alpha and delta for z = 2 (the quadratic case), 3000 digits requested"
fi
