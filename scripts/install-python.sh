#!/usr/bin/env bash
# Makes the Python module built in BUILD_DIR (default: build) importable by the `python3` on
# PATH, by writing a renorm.pth file (one line: BUILD_DIR/python) into that interpreter's
# site-packages (or, when that is not writable, its user site-packages). Rebuilding updates
# the module in place; no copy goes stale.
set -euo pipefail
cd "$(dirname "$0")/.."
build_dir=$(cd "${1:-build}" && pwd)
py=${PYTHON:-python3}
if [[ ! -d "$build_dir/python/renorm" ]]; then
    echo "install-python: $build_dir/python/renorm does not exist (was the module built?)" >&2
    exit 1
fi
site=$("$py" - <<'PY'
import os, site, sysconfig
for d in [sysconfig.get_paths()["purelib"]] + list(getattr(site, "getsitepackages", lambda: [])()):
    if os.path.isdir(d) and os.access(d, os.W_OK):
        print(d)
        break
else:
    d = site.getusersitepackages()
    os.makedirs(d, exist_ok=True)
    print(d)
PY
)
echo "$build_dir/python" > "$site/renorm.pth"
echo "install-python: $site/renorm.pth -> $build_dir/python ($("$py" -c 'import sys; print(sys.executable)'))"
