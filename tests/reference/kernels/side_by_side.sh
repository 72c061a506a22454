#!/bin/sh
# Runs astropy and PulseLadder on the same synthetic data in one run and prints times, ratios and max errors.
# Usage (from the repository root): tests/reference/kernels/side_by_side.sh [quick]
#   quick: only the two smaller cases. Needs /usr/bin/python3 with python3-astropy and the .NET SDK.
# Figures and conditions are recorded in docs/PERFORMANCE.md ("## Periodogram kernels").
set -eu
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../../.." && pwd)
py=/usr/bin/python3
"$py" -c 'import astropy.timeseries' 2>/dev/null || { echo "side_by_side.sh: astropy not installed at $py"; exit 1; }
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
dotnet build -c Release "$root/tests/PulseLadder.Benchmarks" >/dev/null
bench="$root/tests/PulseLadder.Benchmarks/bin/Release/net10.0/PulseLadder.Benchmarks.dll"
cases="3000:100000 300:1000000 30000:1000000"
[ "${1:-}" = quick ] && cases="3000:100000 300:1000000"
"$py" - "$work" "$bench" $cases <<'PY'
import subprocess, sys, time
import numpy as np
import astropy
from astropy.timeseries import LombScargle

work, bench, specs = sys.argv[1], sys.argv[2], sys.argv[3:]
print(f"astropy {astropy.__version__}, numpy {np.__version__}; grid f = 0.01 + k*10/M c/d; data: 3000-d span, "
      "sinusoid + noise, errors 0.01-0.06")
rows = []
for spec in specs:
    n, m = (int(v) for v in spec.split(':'))
    rng = np.random.RandomState(n)
    t = np.sort(rng.uniform(-1500.0, 1500.0, n))
    dy = rng.uniform(0.01, 0.06, n)
    y = 12.0 + 0.3 * np.sin(2 * np.pi * 0.37 * t + 0.4) + dy * rng.randn(n)
    f0, df = 0.01, 10.0 / m
    f = f0 + df * np.arange(m)
    data = f"{work}/data_{n}_{m}.txt"
    np.savetxt(data, np.column_stack([t, y, dy]), fmt='%.17g')
    ls = LombScargle(t, y, dy, fit_mean=True, center_data=True, normalization='standard')

    # astropy approximate ('fast', Press & Rybicki), full grid, best of 3 (1 for the largest case)
    reps = 1 if n * m > 1e10 else 3
    best = 1e99
    for _ in range(reps):
        t0 = time.perf_counter(); p_fast = ls.power(f, method='fast', assume_regular_frequency=True); best = min(best, time.perf_counter() - t0)
    t_fast = best
    # astropy exact ('cython'): timed on a sub-grid of about 2e7 point-frequency evaluations, then scaled to the full grid
    sub = max(16, min(m, int(2e7 // n)))
    idx = np.linspace(0, m - 1, sub).astype(int)
    t0 = time.perf_counter(); p_cy = ls.power(f[idx], method='cython'); t_cy_sub = time.perf_counter() - t0
    t_cy = t_cy_sub * m / sub

    out = f"{work}/pl_{n}_{m}"
    res = subprocess.run(['dotnet', bench, 'side-by-side', data, '--f0', repr(f0), '--df', repr(df), '--m', str(m),
                          '--out', out, '--reps', '1' if n * m > 1e10 else '3'],
                         check=True, capture_output=True, text=True).stdout
    times = {}
    for line in res.splitlines():
        parts = line.split()
        if parts[:2] == ['pl', 'info']:
            info = ' '.join(parts[2:])
        elif parts and parts[0] == 'pl':
            times[parts[1]] = float(parts[2])
    pl_exact = np.fromfile(out + '.exact.f64', dtype='<f8')
    pl_nufft = np.fromfile(out + '.nufft.f64', dtype='<f8')
    err_fast = float(np.max(np.abs(p_fast - pl_exact)))
    err_nufft = float(np.max(np.abs(pl_nufft - pl_exact)))
    err_exact_vs_cython = float(np.max(np.abs(pl_exact[idx] - p_cy)))
    print(f"\nN={n} M={m}  ({info})")
    print(f"  astropy cython (exact)   {t_cy:10.4f} s  (timed on {sub} frequencies, scaled)  {n*m/t_cy:.3e} eval/s")
    print(f"  astropy fast (approx.)   {t_fast:10.4f} s  max|p - exact| = {err_fast:.2e}")
    for k in sorted(times):
        print(f"  PulseLadder {k:13s}{times[k]:10.4f} s  {n*m/times[k]:.3e} eval/s  astropy-fast/this = {t_fast/times[k]:7.2f}  astropy-exact/this = {t_cy/times[k]:8.1f}")
    print(f"  PulseLadder exact vs astropy cython (on the {sub} sub-grid): max|dp| = {err_exact_vs_cython:.2e}")
    print(f"  PulseLadder nufft vs PulseLadder exact: max|dp| = {err_nufft:.2e}; astropy fast error / nufft error = {err_fast/max(err_nufft,1e-300):.2e}")
PY
