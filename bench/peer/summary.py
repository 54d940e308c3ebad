#!/usr/bin/env python3
"""The script a careful analyst would write instead of Calmcrest's analyzer, for the bench's paired comparison.

Plain pandas/numpy, vectorised: read a native DIMM log (time_utc, var_long_arcsec2, var_trans_arcsec2, zenith_deg,
flux), drop rows that cannot be used, reduce both variances to seeing at zenith and 500 nm with the Tokovinin 2002
Z-tilt response coefficients (the same formula and constants as the analyzer: eps = 0.98 lambda (lambda^2 D^-1/3 K)^-3/5
(sigma^2 cos z)^3/5, axes averaged), apply the standard filters (zenith angle <= 60 deg, sun below -18 deg by a
low-precision solar position, axes within a ratio of 1.3, plausible seeing 0.05-10 arcsec), then print as JSON: the
type-7 percentiles (numpy's default "linear"), mean, log-normal moments (sigma with divisor n), the monthly medians
and the number of nights (date of local solar time - 12 h). No bootstrap, no KS distance, no hourly table.

Usage: python3 bench/peer/summary.py LOG --aperture-mm 60 --baseline-mm 200 --site-lat -27.42 --site-lon -70.15
Peak resident memory (ru_maxrss) and CPU time (user + system) are printed on stderr as {"maxRssKb": N, "cpuMs": N}.
"""
import argparse
import json
import resource
import sys

import numpy as np
import pandas as pd

ARCSEC_PER_RADIAN = 180 * 3600 / np.pi
SEEING_CONSTANT = 0.98


def z_tilt(baseline_ratio):
    """Tokovinin 2002 (PASP 114, 1156) Z-tilt coefficients K_l, K_t for b = B/D, as the analyzer's responseCoefficients."""
    cube_root = baseline_ratio ** (-1 / 3)
    seven_thirds = baseline_ratio ** (-7 / 3)
    return (0.364 * (1 - 0.532 * cube_root - 0.024 * seven_thirds), 0.364 * (1 - 0.798 * cube_root + 0.018 * seven_thirds))


def sun_altitude_deg(time_ms, latitude_deg, longitude_deg):
    """Low-precision solar altitude (about 0.01 deg; the Astronomical Almanac's approximate formulas)."""
    days = time_ms / 86_400_000.0 - 10957.5  # days since J2000.0
    mean_longitude = np.radians((280.460 + 0.9856474 * days) % 360)
    anomaly = np.radians((357.528 + 0.9856003 * days) % 360)
    ecliptic = mean_longitude + np.radians(1.915) * np.sin(anomaly) + np.radians(0.020) * np.sin(2 * anomaly)
    obliquity = np.radians(23.439 - 0.0000004 * days)
    right_ascension = np.arctan2(np.cos(obliquity) * np.sin(ecliptic), np.cos(ecliptic))
    declination = np.arcsin(np.sin(obliquity) * np.sin(ecliptic))
    sidereal = np.radians((280.46061837 + 360.98564736629 * days + longitude_deg) % 360)
    hour_angle = sidereal - right_ascension
    latitude = np.radians(latitude_deg)
    return np.degrees(np.arcsin(np.sin(latitude) * np.sin(declination) + np.cos(latitude) * np.cos(declination) * np.cos(hour_angle)))


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("log")
    parser.add_argument("--aperture-mm", type=float, required=True)
    parser.add_argument("--baseline-mm", type=float, required=True)
    parser.add_argument("--wavelength-nm", type=float, default=500.0)
    parser.add_argument("--site-lat", type=float, required=True)
    parser.add_argument("--site-lon", type=float, required=True)
    args = parser.parse_args()

    frame = pd.read_csv(args.log, comment="#", dtype={"time_utc": str}, low_memory=False)
    read = len(frame)
    time = pd.to_datetime(frame["time_utc"], format="%Y-%m-%dT%H:%M:%SZ", errors="coerce", utc=True)
    var_long = pd.to_numeric(frame["var_long_arcsec2"], errors="coerce").to_numpy(dtype=float)
    var_trans = pd.to_numeric(frame["var_trans_arcsec2"], errors="coerce").to_numpy(dtype=float)
    zenith = pd.to_numeric(frame["zenith_deg"], errors="coerce").to_numpy(dtype=float)
    time_ms = time.to_numpy(dtype="datetime64[ms]").astype("int64").astype(float)
    usable = (~time.isna().to_numpy()) & (var_long > 0) & (var_trans > 0) & (zenith >= 0) & (zenith < 90)
    time_ms, var_long, var_trans, zenith = time_ms[usable], var_long[usable], var_trans[usable], zenith[usable]

    wavelength_m = args.wavelength_nm * 1e-9
    aperture_m = args.aperture_mm * 1e-3
    to_reference = (500.0 / args.wavelength_nm) ** (-1 / 5)

    def axis_factor(coefficient):
        return SEEING_CONSTANT * wavelength_m * (wavelength_m * wavelength_m * aperture_m ** (-1 / 3) * coefficient) ** (-3 / 5) * ARCSEC_PER_RADIAN ** (1 - 6 / 5) * to_reference

    k_long, k_trans = z_tilt(args.baseline_mm / args.aperture_mm)
    cos_zenith = np.cos(np.radians(zenith))
    seeing_long = axis_factor(k_long) * (var_long * cos_zenith) ** (3 / 5)
    seeing_trans = axis_factor(k_trans) * (var_trans * cos_zenith) ** (3 / 5)
    seeing = (seeing_long + seeing_trans) / 2
    ratio = np.maximum(seeing_long, seeing_trans) / np.minimum(seeing_long, seeing_trans)
    keep = (seeing >= 0.05) & (seeing <= 10) & (zenith <= 60 + 1e-5) & (ratio <= 1.3)
    keep &= sun_altitude_deg(time_ms, args.site_lat, args.site_lon) <= -18
    seeing, time_ms = seeing[keep], time_ms[keep]

    # Nights and months: the date of (local solar time - 12 h), local solar time = UTC + longitude / 15 h.
    local = pd.to_datetime(time_ms + (args.site_lon / 15 - 12) * 3_600_000, unit="ms")
    night = local.normalize()
    month = np.asarray(local.year * 100 + local.month)
    by_month = pd.Series(seeing).groupby(month).median()

    logs = np.log(seeing)
    p10, p25, p50, p75, p90 = np.percentile(seeing, [10, 25, 50, 75, 90])
    report = {
        "read": read,
        "accepted": int(seeing.size),
        "seeing": {"mean": float(seeing.mean()), "p10": p10, "p25": p25, "median": p50, "p75": p75, "p90": p90},
        "lognormal": {"mu": float(logs.mean()), "sigma": float(logs.std(ddof=0))},
        "nights": int(night.nunique()),
        "monthly": [{"month": f"{key // 100:04d}-{key % 100:02d}", "median": float(value)} for key, value in by_month.items()],
    }
    json.dump(report, sys.stdout)
    sys.stdout.write("\n")
    usage = resource.getrusage(resource.RUSAGE_SELF)
    sys.stderr.write(json.dumps({"maxRssKb": usage.ru_maxrss, "cpuMs": (usage.ru_utime + usage.ru_stime) * 1000}) + "\n")


if __name__ == "__main__":
    main()
