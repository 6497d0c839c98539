"""Benchmark of the outline fit on digitised samples: the whole fit, and its share spent on the
ranges of radii the points allow (profilebench.geometry.radius_bounds).

Each sample's built outline is sampled every 5 mm with 1 mm of normal noise (seed 0), as a
digitised section would come, and fitted at the default 5 mm tolerance. Medians of a few runs;
the ratio is the ranges' time over the fit without them. Run as a script to print the medians;
:func:`run` returns the rows.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

from profilebench.geometry import build_outline
from profilebench.geometry.fit import fit_outline
from profilebench.geometry.radius_bounds import radius_ranges
from profilebench.io import load_project, sample_paths

RUNS = 5
STEP, NOISE, TOLERANCE = 0.005, 0.001, 0.005


def _digitised(profile):
    o = build_outline(profile)
    n = int(o.length / STEP)
    return o.sample(n) + np.random.default_rng(0).normal(0.0, NOISE, (n, 2))


def _median_ms(fn):
    times = []
    for _ in range(RUNS):
        t0 = time.perf_counter()
        out = fn()
        times.append((time.perf_counter() - t0) * 1e3)
    return statistics.median(times), out


def run():
    rows = []
    for path in sample_paths():
        pts = _digitised(load_project(path).profile)
        total, fit = _median_ms(lambda pts=pts: fit_outline(pts, tolerance=TOLERANCE))
        ranges, _ = _median_ms(lambda: radius_ranges(fit.profile, pts, TOLERANCE))
        rows.append(
            {
                "sample": path.stem,
                "points": len(pts),
                "fit_ms": total,
                "ranges_ms": ranges,
                "ratio": ranges / max(total - ranges, 1e-9),
                "open": len(fit.unresolved),
                "corners": len(fit.radius_ranges),
            }
        )
    return rows


def main():
    print(f"{'sample':28s} {'points':>6s} {'fit ms':>8s} {'ranges ms':>10s} {'ratio':>6s}  open")
    for r in run():
        print(
            f"{r['sample']:28s} {r['points']:6d} {r['fit_ms']:8.0f} {r['ranges_ms']:10.0f} "
            f"{r['ratio']:6.2f}  {r['open']} of {r['corners']}"
        )


if __name__ == "__main__":
    main()
