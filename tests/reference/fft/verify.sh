#!/bin/sh
# Regenerates the numpy FFT reference values into a temporary directory and compares them numerically with the
# committed fft_reference.json. Exit 0 when they agree (or when numpy is not installed, with a message), non-zero on
# mismatch. Usage: tests/reference/fft/verify.sh
set -eu
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3
if ! [ -x "$py" ] || ! "$py" -c 'import numpy' 2>/dev/null; then
  echo "verify.sh: numpy (python3-numpy) not installed at $py; FFT reference comparison skipped."
  exit 0
fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$py" "$here/make_fft_reference.py" "$tmp/fft_reference.json" >/dev/null
"$py" - "$here/fft_reference.json" "$tmp/fft_reference.json" <<'PY'
import json, sys
a = json.load(open(sys.argv[1])); b = json.load(open(sys.argv[2]))
bad = 0
worst = 0.0
if [c['n'] for c in a['cases']] != [c['n'] for c in b['cases']]:
    print('case lists differ'); sys.exit(1)
for ca, cb in zip(a['cases'], b['cases']):
    if ca['bins'] != cb['bins']:
        print(f"n={ca['n']}: bins differ"); bad += 1; continue
    tol = 1e-12 * ca['rms']   # numpy builds may differ in rounding, not beyond O(eps log n) of the rms
    for key in ('re', 'im'):
        d = max(abs(x - y) for x, y in zip(ca[key], cb[key]))
        worst = max(worst, d / ca['rms'])
        if d > tol:
            print(f"n={ca['n']}: {key} differs by {d:.3e} (> {tol:.3e})"); bad += 1
print(f"verify.sh: committed numpy {a['numpy_version']}, regenerated numpy {b['numpy_version']}; "
      f"max |diff| / rms = {worst:.3e}; " + ('MISMATCH' if bad else 'OK'))
sys.exit(1 if bad else 0)
PY
