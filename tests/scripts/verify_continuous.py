#!/usr/bin/env python3
"""Independent check of Tourwright's continuous n-body trajectory.

Reads the CCSDS OEM that `tourwright fidelity FILE --continuous --oem OUT` writes and the JSON of
the same run (`--json`, for the GM values and the bodies of the model), and re-integrates the
trajectory from each of its own states to the next one under the Sun and the same bodies as point
masses, their positions read from the DE421 kernel with jplephem, with scipy's DOP853 (rtol 1e-12,
atol 1e-6 km and 1e-9 km/s). Every re-integrated position must agree with the next state of the
file to `--tol-km` (1 km). Prints the largest difference and exits 1 when it is over.

Tested with: Python 3.11, numpy 2.1.3, scipy 1.14.1, jplephem 2.22, DE421 from the PyPI package
skyfield-data 7.0.0 (the same file the Rust tests read through TOURWRIGHT_DE421).

Usage: verify_continuous.py RUN.json RUN.oem de421.bsp [--tol-km 1.0] [--every N]
"""

import argparse
import datetime
import json
import sys

import numpy as np
from jplephem.spk import SPK
from scipy.integrate import solve_ivp

J2000 = datetime.datetime(2000, 1, 1, 12, 0, 0)

# NAIF chains from the solar-system barycentre (0) to each body, as DE421 stores them.
CHAINS = {
    "Sun": [(0, 10)],
    "Mercury": [(0, 1), (1, 199)],
    "Venus": [(0, 2), (2, 299)],
    "Earth": [(0, 3), (3, 399)],
    "Moon": [(0, 3), (3, 301)],
    "Mars": [(0, 4), (4, 499)],
    "Jupiter": [(0, 5)],
    "Saturn": [(0, 6)],
    "Uranus": [(0, 7)],
    "Neptune": [(0, 8)],
    "Pluto": [(0, 9)],
}


def tdb_seconds(text):
    """Seconds past J2000 TDB of an OEM epoch (TDB calendar, uniform days)."""
    dt = datetime.datetime.strptime(text[:26].ljust(26, "0"), "%Y-%m-%dT%H:%M:%S.%f")
    return (dt - J2000).total_seconds()


def read_oem(path):
    """Segments of the OEM: lists of (t, state[6]) in EME2000, km and km/s."""
    segments, current, in_meta = [], None, False
    with open(path) as f:
        for line in f:
            line = line.strip()
            if not line or line.startswith("COMMENT"):
                continue
            if line == "META_START":
                in_meta = True
                current = []
                segments.append(current)
                continue
            if line == "META_STOP":
                in_meta = False
                continue
            if in_meta or "=" in line or current is None:
                continue
            parts = line.split()
            current.append((tdb_seconds(parts[0]), np.array([float(x) for x in parts[1:7]])))
    return segments


class Model:
    def __init__(self, report, kernel):
        self.spk = SPK.open(kernel)
        self.mu_sun = report["model"]["gm_sun_km3_s2"]
        self.bodies = []
        for b in report["model"]["bodies"]:
            if b["gm_km3_s2"] > 0.0:
                if b["name"] not in CHAINS:
                    sys.exit(f"no NAIF chain for {b['name']}")
                self.bodies.append((b["name"], b["gm_km3_s2"]))

    def ssb(self, name, jd):
        return sum(self.spk[a, b].compute(jd) for a, b in CHAINS[name])

    def accel(self, t, r):
        jd = 2451545.0 + t / 86400.0
        sun = self.ssb("Sun", jd)
        a = -self.mu_sun * r / np.linalg.norm(r) ** 3
        for name, mu in self.bodies:
            rj = self.ssb(name, jd) - sun
            d = rj - r
            a += mu * (d / np.linalg.norm(d) ** 3 - rj / np.linalg.norm(rj) ** 3)
        return a


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("report")
    ap.add_argument("oem")
    ap.add_argument("kernel")
    ap.add_argument("--tol-km", type=float, default=1.0)
    ap.add_argument("--every", type=int, default=1, help="check every Nth pair of states")
    args = ap.parse_args()
    with open(args.report) as f:
        report = json.load(f)
    if not report["converged"]:
        sys.exit("the run did not converge; nothing to verify")
    model = Model(report, args.kernel)

    def rhs(t, y):
        return np.concatenate([y[3:], model.accel(t, y[:3])])

    worst, worst_at, pairs = 0.0, None, 0
    for seg in read_oem(args.oem):
        for i in range(0, len(seg) - 1, args.every):
            (t0, y0), (t1, y1) = seg[i], seg[i + 1]
            sol = solve_ivp(rhs, (t0, t1), y0, method="DOP853", rtol=1e-12,
                            atol=[1e-6] * 3 + [1e-9] * 3)
            if not sol.success:
                sys.exit(f"scipy failed at t={t0}: {sol.message}")
            err = float(np.linalg.norm(sol.y[:3, -1] - y1[:3]))
            pairs += 1
            if err > worst:
                worst, worst_at = err, t0
    print(f"pairs checked: {pairs}; largest position difference: {worst:.4f} km "
          f"(from TDB {worst_at} s)")
    if worst > args.tol_km:
        print(f"FAIL: over {args.tol_km} km")
        sys.exit(1)
    print("OK")


if __name__ == "__main__":
    main()
