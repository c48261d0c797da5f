#!/bin/sh
# Time `renorm certify` and `renorm verify` for several orders and digit counts (not a test:
# speed lives here, never in timed assertions). Usage: bench/certify_scaling.sh [path/to/renorm]
set -u
R=${1:-build/apps/renorm}
OUT=$(mktemp -d)
run() {
    z=$1; d=$2
    f="$OUT/z${z}_d${d}.json"
    start=$(date +%s.%N)
    "$R" certify --order "$z" --digits "$d" --out "$f" --json > "$OUT/out.json"
    rc=$?
    mid=$(date +%s.%N)
    "$R" verify "$f" > /dev/null
    vrc=$?
    end=$(date +%s.%N)
    python3 - "$OUT/out.json" "$z" "$d" "$rc" "$vrc" "$start" "$mid" "$end" <<'PY'
import json, sys
j = json.load(open(sys.argv[1]))
z, d, rc, vrc = sys.argv[2:6]
t0, t1, t2 = map(float, sys.argv[6:9])
def g(k, f): return j.get(k, {}).get(f, "-")
print(f"z={z} digits={d} rc={rc} verify_rc={vrc} N={j.get('truncation')} disc={j.get('disc')} "
      f"alpha_radius={g('alpha','radius')} delta_radius={g('delta','radius')} "
      f"Y={g('fixed_point','Y')} Z={g('fixed_point','Z')} rho={g('fixed_point','rho')} "
      f"Y_eig={g('eigenpair','Y')} Z0_eig={g('eigenpair','Z0')} "
      f"certify_s={t1-t0:.1f} verify_s={t2-t1:.1f}")
PY
}
for d in 100 200 300; do run 2 "$d"; done
for z in 3.5 4 6; do run "$z" 50; done
rm -rf "$OUT"
