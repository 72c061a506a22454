#!/usr/bin/python3
"""Reference values for PulseLadder's period search, computed with astropy's LombScargle.

Writes astropy_reference.json next to this script (or to the path given as the first argument):
  * Baluev (2008) false-alarm probabilities, LombScargle.false_alarm_probability(method='baluev'),
    for several data sets, maximum frequencies and peak powers;
  * the two-term (nterms=2) periodogram, standard normalisation, at a few frequencies.
The data sets are generated here with fixed seeds and stored in the JSON, so the C# test needs no random numbers.
Run with Debian's python3 (/usr/bin/python3) and python3-astropy.
"""
import json
import sys
from pathlib import Path

import numpy as np
import astropy
from astropy.timeseries import LombScargle

D30_T = [0.44233, 1.44484, 3.42126, 4.34569, 5.31465, 6.40263, 8.36602, 9.31831, 11.37428, 12.30516,
         13.43640, 15.33882, 16.39938, 17.34676, 19.37801, 24.38201, 25.32773, 26.44544, 27.41627, 29.44092,
         30.43422, 31.38968, 32.43828, 33.31327, 35.32940, 37.30678, 39.34880, 41.35830, 42.34070, 43.42431]
D30_Y = [8.1329, 8.3210, 7.6999, 7.6785, 7.9963, 8.3545, 7.9000, 7.6739, 8.2327, 8.3186,
         7.9462, 7.7611, 8.1153, 8.3356, 7.8105, 7.8784, 7.6813, 7.8561, 8.1903, 8.0278,
         7.7210, 7.7400, 8.1422, 8.3480, 7.9256, 7.8687, 8.2919, 7.6608, 7.7347, 8.2227]


def nightly(seed, n, period, amp, sigma_lo, sigma_hi):
    """Uneven nightly sampling over two seasons with a non-sinusoidal signal and heteroscedastic errors."""
    rng = np.random.RandomState(seed)
    nights = np.sort(rng.choice(np.arange(0, 500), size=n, replace=False)).astype(float)
    nights = nights[(nights % 365.25) < 220][: n]
    t = nights + 0.35 + rng.uniform(-0.08, 0.08, size=nights.size)
    ph = 2 * np.pi * t / period
    dy = rng.uniform(sigma_lo, sigma_hi, size=t.size)
    y = 12.0 + amp * (np.sin(ph) + 0.4 * np.sin(2 * ph + 1.0) + 0.15 * np.sin(3 * ph + 2.0)) + rng.normal(0, dy)
    return t, y, dy


def dataset(name, t, y, dy, fmax, powers, freqs):
    t = np.asarray(t, float); y = np.asarray(y, float); dy = np.asarray(dy, float)
    ls = LombScargle(t, y, dy)
    fap = ls.false_alarm_probability(np.asarray(powers), method='baluev', maximum_frequency=fmax)
    # false_alarm_probability puts fmax on astropy's own autofrequency grid; record the value it actually used.
    _, fmax_used = ls.autofrequency(maximum_frequency=fmax, return_freq_limits=True)
    ls2 = LombScargle(t, y, dy, nterms=2)
    p2 = ls2.power(np.asarray(freqs))
    return {
        "name": name,
        "t": t.tolist(), "y": y.tolist(), "dy": dy.tolist(),
        "fmax": fmax,
        "fmax_used": float(fmax_used),
        "baluev": [{"z": float(z), "fap": float(f)} for z, f in zip(powers, np.atleast_1d(fap))],
        "nterms2": [{"f": float(f), "power": float(p)} for f, p in zip(freqs, np.atleast_1d(p2))],
    }


def main():
    out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path(__file__).with_name("astropy_reference.json")
    sets = []
    sets.append(dataset("D30", D30_T, D30_Y, [0.03] * 30, 2.0,
                        [0.984427, 0.936135, 0.866635, 0.587307, 0.4, 0.3],
                        [0.05, 0.1, 0.1860514, 0.25, 0.3721, 0.5, 0.8140698, 1.0, 1.1861809]))
    t, y, dy = nightly(7, 90, 5.7, 0.3, 0.01, 0.04)
    sets.append(dataset("nightly90", t, y, dy, 1.5, [0.05, 0.1, 0.2, 0.3, 0.5, 0.8],
                        [0.02, 0.1, 1 / 5.7, 0.2, 2 / 5.7, 0.5, 1.0, 1 + 1 / 5.7, 1.4]))
    t, y, dy = nightly(11, 160, 0.61, 0.4, 0.02, 0.03)
    sets.append(dataset("rrl160", t, y, dy, 5.0, [0.1, 0.15, 0.25, 0.4, 0.7],
                        [0.5, 1.0, 1 / 0.61 - 1.0027379, 1 / 0.61, 2.5, 2 / 0.61, 4.9]))
    doc = {
        "generated_by": "tests/reference/period/make_reference.py",
        "astropy_version": astropy.__version__,
        "numpy_version": np.__version__,
        "normalization": "standard (fit_mean=True, center_data=True), weights 1/dy^2",
        "datasets": sets,
    }
    out.write_text(json.dumps(doc, indent=1) + "\n")
    print(f"wrote {out} with astropy {astropy.__version__}")


if __name__ == "__main__":
    main()
