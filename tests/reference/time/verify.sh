#!/bin/sh
# Regenerates the astropy reference values into a temporary file and compares them with the committed
# time_reference.json (numbers must agree to 1 microsecond / 1e-9 relative). Exit 1 on mismatch;
# exit 0 with a message when Debian's python3-astropy is not installed.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3
if ! [ -x "$py" ] || ! "$py" -c "import astropy, erfa, numpy" 2>/dev/null; then
    echo "verify.sh: astropy not available for $py; reference values not regenerated (nothing checked)."
    exit 0
fi
tmp=$(mktemp)
trap 'rm -f "$tmp"' EXIT
"$py" "$here/make_reference.py" "$tmp" >/dev/null
"$py" - "$here/time_reference.json" "$tmp" <<'PY'
import json, sys
a = json.load(open(sys.argv[1])); b = json.load(open(sys.argv[2]))
bad = []
def cmp(x, y, path):
    if isinstance(x, dict):
        if set(x) != set(y): bad.append(path + ": keys differ"); return
        for k in x: cmp(x[k], y[k], path + "." + k)
    elif isinstance(x, list):
        if len(x) != len(y): bad.append(path + ": lengths differ"); return
        for i, (p, q) in enumerate(zip(x, y)): cmp(p, q, "%s[%d]" % (path, i))
    elif isinstance(x, float) or isinstance(y, float):
        tol = 1e-6 if path.endswith("_s") else max(1e-11 * abs(x), 1e-11)  # seconds vs Julian dates (1e-11 rel ~ 2 us)
        if abs(x - y) > tol: bad.append("%s: committed %r, regenerated %r" % (path, x, y))
    elif x != y and not path.endswith("_version"):
        bad.append("%s: committed %r, regenerated %r" % (path, x, y))
cmp(a, b, "$")
if a.get("astropy_version") != b.get("astropy_version"):
    print("note: committed with astropy %s, regenerated with %s" % (a.get("astropy_version"), b.get("astropy_version")))
if bad:
    print("verify.sh: %d mismatches" % len(bad)); print("\n".join(bad[:20])); sys.exit(1)
print("verify.sh: reference values reproduced (%d cases)" % len(a["cases"]))
PY
