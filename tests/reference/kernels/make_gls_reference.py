#!/usr/bin/python3
"""Reference values for PulseLadder's exact GLS kernels, computed with astropy.

Usage: /usr/bin/python3 make_gls_reference.py [output.json]   (default: gls_reference.json next to this script)

Every data set is generated deterministically (numpy RandomState) and stored in the JSON together with the power
from astropy.timeseries.LombScargle(t, y, dy, fit_mean=True, center_data=True, normalization='standard') on the
grid f_k = f0 + k df, so the C# test needs no random generator of its own. The D30 light curve is the table of
SCIENCE.md section 7.1 (errors 0.030 mag). The 'slow' method is run as well and its largest difference from
'cython' is recorded, as a check on the library itself.
"""
import json
import os
import sys

import numpy as np
import astropy
from astropy.timeseries import LombScargle

D30_T = [0.44233, 1.44484, 3.42126, 4.34569, 5.31465, 6.40263, 8.36602, 9.31831, 11.37428, 12.30516,
         13.43640, 15.33882, 16.39938, 17.34676, 19.37801, 24.38201, 25.32773, 26.44544, 27.41627, 29.44092,
         30.43422, 31.38968, 32.43828, 33.31327, 35.32940, 37.30678, 39.34880, 41.35830, 42.34070, 43.42431]
D30_MAG = [8.1329, 8.3210, 7.6999, 7.6785, 7.9963, 8.3545, 7.9000, 7.6739, 8.2327, 8.3186,
           7.9462, 7.7611, 8.1153, 8.3356, 7.8105, 7.8784, 7.6813, 7.8561, 8.1903, 8.0278,
           7.7210, 7.7400, 8.1422, 8.3480, 7.9256, 7.8687, 8.2919, 7.6608, 7.7347, 8.2227]


def synthetic(seed, n, span, freq, amp, t_offset=0.0, clumped=False):
    rng = np.random.RandomState(seed)
    if clumped:
        # Nightly clumps (seasonal gaps and one-day aliases), as ground-based surveys sample.
        nights = np.sort(rng.choice(int(span), size=(n + 2) // 3, replace=False)).astype(float)
        t = np.sort(np.repeat(nights, 3)[:n] + rng.uniform(0.0, 0.3, n))
    else:
        t = np.sort(rng.uniform(0.0, span, n))
    dy = rng.uniform(0.01, 0.06, n)
    y = 12.0 + amp * np.sin(2 * np.pi * freq * t + 0.7) + 0.3 * amp * np.sin(4 * np.pi * freq * t) + dy * rng.randn(n)
    return t + t_offset, y, dy


def power(t, y, dy, f0, df, m, method):
    f = f0 + df * np.arange(m)
    ls = LombScargle(t, y, dy, fit_mean=True, center_data=True, normalization='standard')
    return ls.power(f, method=method)


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(os.path.abspath(__file__)), 'gls_reference.json')
    cases = []
    specs = [
        # name, t, y, dy, f0, df, m
        ('D30', np.array(D30_T), np.array(D30_MAG), np.full(30, 0.03), 0.02, 0.00232656, 852),
    ]
    t, y, dy = synthetic(1, 200, 500.0, 0.3719, 0.25)
    specs.append(('uniform-200', t, y, dy, 0.005, 0.0031, 700))
    t, y, dy = synthetic(2, 601, 2900.0, 1.7342, 0.05, clumped=True)
    specs.append(('clumped-601', t, y, dy, 0.001, 0.00017, 1500))
    t, y, dy = synthetic(3, 9, 30.0, 0.21, 0.4)
    specs.append(('small-9', t, y, dy, 0.01, 0.011, 97))
    t, y, dy = synthetic(4, 120, 365.0, 2.0029, 0.1, t_offset=-180.0)
    specs.append(('centred-120', t, y, dy, 0.05, 0.0101, 500))
    max_slow_diff = 0.0
    for name, t, y, dy, f0, df, m in specs:
        p = power(t, y, dy, f0, df, m, 'cython')
        ps = power(t, y, dy, f0, df, m, 'slow')
        max_slow_diff = max(max_slow_diff, float(np.max(np.abs(p - ps))))
        cases.append({
            'name': name, 'f0': f0, 'df': df, 'm': m,
            't': [float(v) for v in t], 'y': [float(v) for v in y], 'dy': [float(v) for v in dy],
            'power': [float(v) for v in p],
        })
    doc = {
        'generator': 'tests/reference/kernels/make_gls_reference.py',
        'library': 'astropy.timeseries.LombScargle(t, y, dy, fit_mean=True, center_data=True, '
                   "normalization='standard').power(f0 + df*arange(m), method='cython')",
        'astropy_version': astropy.__version__,
        'numpy_version': np.__version__,
        'python_version': sys.version.split()[0],
        'max_abs_diff_cython_vs_slow': max_slow_diff,
        'cases': cases,
    }
    with open(out, 'w') as fh:
        json.dump(doc, fh, indent=1)
        fh.write('\n')
    print(f'wrote {out}: {len(cases)} cases, astropy {astropy.__version__}, numpy {np.__version__}, '
          f'max |cython - slow| = {max_slow_diff:.3e}')


if __name__ == '__main__':
    main()
