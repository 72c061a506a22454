"""Reference values for Fitzpatrick (1999) A_lambda/A_V, generated with scipy's natural CubicSpline.

Run: /usr/bin/python3 f99_reference.py   (scipy 1.10.1, numpy 1.24.2 on Debian)
The anchor values are those of Fitzpatrick 1999 (PASP 111, 63) as reproduced by several public implementations;
what this script checks independently is the spline (scipy) and the evaluation of the FM90 UV form.
"""
import numpy as np
from scipy.interpolate import CubicSpline


def f99_a_over_ebv(lam_um, rv):
    x0, gamma, c3, c4 = 4.596, 0.99, 3.23, 0.41
    c2 = -0.824 + 4.717 / rv
    c1 = 2.030 - 3.007 * c2

    def uv(x):
        x = np.asarray(x, dtype=float)
        d = x**2 / ((x**2 - x0**2) ** 2 + x**2 * gamma**2)
        f = np.where(x >= 5.9, 0.5392 * (x - 5.9) ** 2 + 0.05644 * (x - 5.9) ** 3, 0.0)
        return c1 + c2 * x + c3 * d + c4 * f + rv

    xk = np.array([0, 1 / 2.65, 1 / 1.22, 1 / 0.60, 1 / 0.547, 1 / 0.467, 1 / 0.411, 1 / 0.27, 1 / 0.26])
    yk = np.array([
        0.0, 0.26469 * rv / 3.1, 0.82925 * rv / 3.1,
        -0.422809 + 1.00270 * rv + 2.13572e-4 * rv**2,
        -5.13540e-2 + 1.00216 * rv - 7.35778e-5 * rv**2,
        0.700127 + 1.00184 * rv - 3.32598e-5 * rv**2,
        1.19456 + 1.01707 * rv - 5.46959e-3 * rv**2 + 7.97809e-4 * rv**3 - 4.45636e-5 * rv**4,
        float(uv(xk[7])), float(uv(xk[8])),
    ])
    spline = CubicSpline(xk, yk, bc_type="natural")
    x = 1.0 / lam_um
    return float(uv(x)) if x >= xk[7] else float(spline(x))


if __name__ == "__main__":
    for rv in (3.1, 2.5, 5.0):
        for lam in (0.15, 0.22, 0.365, 0.44, 0.5495, 0.64, 0.80, 1.235, 2.159, 3.0):
            print(f"[InlineData({lam}, {rv}, {f99_a_over_ebv(lam, rv) / rv:.6f})]")
