#!/bin/sh
# Regenerates the astropy reference values and compares them with the committed astropy_reference.json.
# Exit 0: identical within 1e-9 relative (or astropy is not installed: nothing to check, says so).
# Exit 1: mismatch (the committed values no longer match what astropy computes).
set -eu
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3
if ! "$py" -c "import astropy, numpy" 2>/dev/null; then
    echo "verify.sh: $py has no astropy/numpy; nothing checked (install python3-astropy to verify)."
    exit 0
fi
tmp=$(mktemp)
trap 'rm -f "$tmp"' EXIT
"$py" "$here/make_reference.py" "$tmp" >/dev/null
"$py" - "$here/astropy_reference.json" "$tmp" <<'PY'
import json, math, sys
a = json.load(open(sys.argv[1])); b = json.load(open(sys.argv[2]))
bad = []
def cmp(x, y, path):
    if isinstance(x, dict):
        if set(x) != set(y): bad.append(path + ": keys differ"); return
        for k in x: cmp(x[k], y[k], path + "." + k)
    elif isinstance(x, list):
        if len(x) != len(y): bad.append(path + ": lengths differ"); return
        for i, (u, v) in enumerate(zip(x, y)): cmp(u, v, f"{path}[{i}]")
    elif isinstance(x, float) or isinstance(y, float):
        if not math.isclose(x, y, rel_tol=1e-9, abs_tol=1e-300): bad.append(f"{path}: {x} != {y}")
    elif x != y:
        bad.append(f"{path}: {x!r} != {y!r}")
cmp(a, b, "$")
if bad:
    print("verify.sh: MISMATCH against astropy " + b.get("astropy_version", "?"))
    for m in bad[:20]: print("  " + m)
    sys.exit(1)
print("verify.sh: committed reference matches astropy " + b["astropy_version"])
PY
