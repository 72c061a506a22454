#!/usr/bin/python3
"""Reference values for PulseLadder's internal FFT (src/PulseLadder.Kernels/Fft.cs), computed with numpy.fft.

Usage: /usr/bin/python3 make_fft_reference.py [output.json]   (default: fft_reference.json next to this script)

The FFT uses the positive exponent without scaling, A_k = sum_m a_m exp(+2 pi i k m / n), which is
n * numpy.fft.ifft(a). The input is defined by integer formulas so the C# test rebuilds it bit for bit
(k / p is one correctly rounded division in both languages, - 0.5 is exact):
    re_m = ((7 m^2 + 13 m + 5) mod 1031) / 1031 - 0.5,   im_m = ((3 m^2 + 17 m + 11) mod 1009) / 1009 - 0.5.
Stored per size: the rms of all output values (re and im together) and the output at selected bins (all bins for
the smallest size; for the others the first and last 16 and an evenly spread set), so the file stays small.
"""
import json
import os
import sys

import numpy as np

SIZES = [1 << 10, 1 << 14, 1 << 15, 1 << 17]
SPREAD = 300


def signal(n):
    m = np.arange(n, dtype=np.int64)
    re = ((7 * m * m + 13 * m + 5) % 1031) / 1031.0 - 0.5
    im = ((3 * m * m + 17 * m + 11) % 1009) / 1009.0 - 0.5
    return re + 1j * im


def bins(n):
    if n <= 1024:
        return list(range(n))
    k = set(range(16)) | set(range(n - 16, n)) | {(b * n) // SPREAD + b for b in range(SPREAD)}
    return sorted(x % n for x in k)


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(os.path.abspath(__file__)), 'fft_reference.json')
    cases = []
    for n in SIZES:
        a = n * np.fft.ifft(signal(n))
        ks = bins(n)
        rms = float(np.sqrt(np.mean(a.real ** 2 + a.imag ** 2) / 2))
        cases.append({'n': n, 'rms': rms, 'bins': ks,
                      're': [float(a[k].real) for k in ks], 'im': [float(a[k].imag) for k in ks]})
    doc = {'source': 'numpy.fft.ifft(a) * n', 'numpy_version': np.__version__, 'cases': cases}
    with open(out, 'w') as f:
        json.dump(doc, f, separators=(',', ':'))
        f.write('\n')
    print(f'wrote {out}: numpy {np.__version__}, sizes {SIZES}')


if __name__ == '__main__':
    main()
