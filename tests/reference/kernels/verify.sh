#!/bin/sh
# Regenerates the astropy GLS reference values into a temporary directory and compares them numerically with the
# committed gls_reference.json. Exit 0 when they agree (or when astropy is not installed, with a message),
# non-zero on mismatch. Called by the CI test script; usage: tests/reference/kernels/verify.sh
set -eu
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3
if ! [ -x "$py" ] || ! "$py" -c 'import astropy.timeseries, numpy' 2>/dev/null; then
  echo "verify.sh: astropy (python3-astropy) not installed at $py; GLS reference comparison skipped."
  exit 0
fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$py" "$here/make_gls_reference.py" "$tmp/gls_reference.json" >/dev/null
"$py" - "$here/gls_reference.json" "$tmp/gls_reference.json" <<'PY'
import json, sys
a = json.load(open(sys.argv[1])); b = json.load(open(sys.argv[2]))
tol = 1e-9
bad = 0
if [c['name'] for c in a['cases']] != [c['name'] for c in b['cases']]:
    print('case lists differ'); sys.exit(1)
worst = 0.0
for ca, cb in zip(a['cases'], b['cases']):
    for key in ('t', 'y', 'dy', 'power'):
        if len(ca[key]) != len(cb[key]):
            print(f"{ca['name']}: {key} lengths differ"); bad += 1; continue
        d = max((abs(x - y) for x, y in zip(ca[key], cb[key])), default=0.0)
        worst = max(worst, d)
        if d > tol:
            print(f"{ca['name']}: {key} differs by {d:.3e} (> {tol:g})"); bad += 1
print(f"verify.sh: committed astropy {a['astropy_version']} / numpy {a['numpy_version']}, "
      f"regenerated astropy {b['astropy_version']} / numpy {b['numpy_version']}; max |diff| = {worst:.3e}; "
      + ('MISMATCH' if bad else 'OK'))
sys.exit(1 if bad else 0)
PY
