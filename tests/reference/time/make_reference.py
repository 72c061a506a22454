#!/usr/bin/python3
"""Reference values for PulseLadder's time-scale conversions, computed with astropy (ERFA).

Run with Debian's interpreter:  /usr/bin/python3 tests/reference/time/make_reference.py [output.json]
Default output: time_reference.json next to this script (committed; the C# tests read it).

For every star x date: the UTC Julian date is the input; astropy gives TT-UTC, TDB-TT, the barycentric and
heliocentric light travel times for the geocentre (light_travel_time, ephemeris 'builtin' = ERFA epv00), and from
them the values a user could have uploaded in each scale (jd_utc, mjd_utc, jd_tt, mjd_tt, hjd_utc, hjd_tt,
bjd_tdb, bmjd_tdb) together with the BJD_TDB they stand for. Convention (astropy's and the usual one):
HJD_UTC = JD_UTC + ltt_helio, HJD_TT = JD_TT + ltt_helio, BJD_TDB = JD_TDB + ltt_bary.
Also: TT-UTC at dates around the leap-second era boundaries (1950, 1960-1971 rubber seconds, 1972+).
No network access: astropy's bundled leap-second table is used (IERS auto-download disabled).
"""
import json
import os
import sys
import warnings

import numpy as np
import astropy
import erfa
from astropy import units as u
from astropy.coordinates import EarthLocation, SkyCoord
from astropy.time import Time
from astropy.utils import iers

iers.conf.auto_download = False
iers.conf.auto_max_age = None
warnings.simplefilter("ignore")

STARS = [
    # name, RA deg, Dec deg (ICRS/J2000)
    ("delta Cep", 337.29277083, 58.41519722),   # 22h29m10.265s +58d24m54.71s (SCIENCE.md CV-2)
    ("RR Lyr", 291.36630417, 42.78435833),      # 19h25m27.913s +42d47m03.69s (CV-3)
    ("l Car", 146.31171250, -62.50790278),      # 09h45m14.811s -62d30m28.45s (CV-4)
    ("ecliptic N pole", 270.0, 66.560709),      # CV-6
    ("OGLE-LMC-CEP-1344", 78.76917, -70.11944), # LMC, near the south ecliptic pole
    ("ecliptic/equator node", 0.0, 0.0),
    ("summer solstice point", 90.0, 23.4392911),
    ("south, RA 200", 200.0, -35.0),
]

DATES_UTC = [
    2441318.0,  # 1972-01-01.5 (HJD_UTC within ~8 min of a UTC step is ambiguous by the step: avoided)
    2444239.5,  # 1980-01-01
    2447892.5,  # 1990-01-01
    2450000.0,  # 1995-10-09.5
    2451545.0,  # 2000-01-01.5
    2453005.25, # 2004
    2455000.5,  # 2009-06-18
    2457205.0,  # 2015-07-01.5 (just after a leap second)
    2458849.5,  # 2020-01-01
    2459000.5,  # 2020-05-31
    2460310.5,  # 2024-01-01
    2461100.75, # 2026-03-01
]

TT_UTC_DATES = [
    2433282.5,  # 1950-01-01 (before UTC: TAI-UTC = 0 in ERFA, "dubious year")
    2436934.5,  # 1960-01-01
    2437512.5,  # 1961-08-01
    2438000.5,  # 1962-12
    2438761.5,  # 1965-01-01
    2439500.5,  # 1967-01
    2440587.5,  # 1970-01-01
    2441316.5,  # 1971-12-31
    2441317.5,  # 1972-01-01
    2441499.5,  # 1972-07-01
    2442048.5,  # 1974-01-01
    2457570.5,  # 2016-06-01 (CV-7: 68.184 s)
    2457935.5,  # 2017-06-01 (CV-7: 69.184 s)
    2461000.5,  # 2025-11
]

GEOCENTRE = EarthLocation.from_geocentric(0.0, 0.0, 0.0, unit=u.m)


def day(x):
    return float(x.to_value(u.day)) if hasattr(x, "to_value") else float(x)


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(os.path.abspath(__file__)), "time_reference.json")
    cases = []
    for name, ra, dec in STARS:
        c = SkyCoord(ra * u.deg, dec * u.deg, frame="icrs")
        for jd in DATES_UTC:
            t = Time(jd, format="jd", scale="utc", location=GEOCENTRE)
            tt = t.tt
            tdb = t.tdb
            ltt_b = t.light_travel_time(c, kind="barycentric", ephemeris="builtin")
            ltt_h = t.light_travel_time(c, kind="heliocentric", ephemeris="builtin")
            bjd = tdb + ltt_b
            hjd_utc = t.utc + ltt_h
            hjd_tt = tt + ltt_h
            bjd_val = bjd.jd1 + bjd.jd2
            inputs = {
                "jd_utc": jd,
                "mjd_utc": t.mjd,
                "jd_tt": tt.jd1 + tt.jd2,
                "mjd_tt": tt.mjd,
                "hjd_utc": hjd_utc.utc.jd1 + hjd_utc.utc.jd2,
                "hjd_tt": hjd_tt.tt.jd1 + hjd_tt.tt.jd2,
                "bjd_tdb": bjd_val,
                "bmjd_tdb": bjd.tdb.mjd,
            }
            cases.append({
                "star": name, "ra_deg": ra, "dec_deg": dec, "jd_utc": jd,
                "tt_minus_utc_s": float((tt.jd1 - t.jd1) * 86400.0 + (tt.jd2 - t.jd2) * 86400.0),
                "tdb_minus_tt_s": float((tdb.jd1 - tt.jd1) * 86400.0 + (tdb.jd2 - tt.jd2) * 86400.0),
                "ltt_bary_s": day(ltt_b) * 86400.0,
                "ltt_helio_s": day(ltt_h) * 86400.0,
                "bjd_tdb": bjd_val,
                "inputs": inputs,
            })
    tt_utc = []
    for jd in TT_UTC_DATES:
        t = Time(jd, format="jd", scale="utc")
        tt = t.tt
        tt_utc.append({"jd_utc": jd, "tt_minus_utc_s": float((tt.jd1 - t.jd1) * 86400.0 + (tt.jd2 - t.jd2) * 86400.0)})
    doc = {
        "generator": "tests/reference/time/make_reference.py",
        "astropy_version": astropy.__version__,
        "pyerfa_version": erfa.__version__,
        "numpy_version": np.__version__,
        "ephemeris": "builtin (ERFA epv00)",
        "observer": "geocentre",
        "conventions": "HJD_UTC = JD_UTC + ltt_helio; HJD_TT = JD_TT + ltt_helio; BJD_TDB = JD_TDB + ltt_bary",
        "cases": cases,
        "tt_minus_utc": tt_utc,
    }
    with open(out, "w", encoding="utf-8") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print("wrote", out, len(cases), "cases, astropy", astropy.__version__)


if __name__ == "__main__":
    main()
