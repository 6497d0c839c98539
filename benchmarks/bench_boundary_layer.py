"""Benchmark of the boundary-layer march: two surfaces of 150 stations (300 panels in all).

Edge speeds are the exact potential-flow values at panel midpoints (circular cylinder:
Ue/V = 2 sin(phi); ellipse of axis ratio b/a: (1 + b/a) |sin eta| / sqrt(sin^2 eta + (b/a)^2
cos^2 eta)), with free transition at Re = 5e6 on the body length. Run as a script to print the
medians; :func:`run` returns the rows.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

from profilebench.flow import march_boundary_layer

NU = 1.46e-5
SPEED = 30.0
RE_LENGTH = 5e6


def surface(shape: str, n: int = 150):
    """Arc length (m) from the front stagnation point and Ue/V at n panel midpoints of one side."""
    half_length = 0.5 * RE_LENGTH * NU / SPEED
    t = (np.arange(n + 1)) * np.pi / n  # panel end points, from the front stagnation point
    ratio = 1.0 if shape == "cylinder" else 0.25
    x = -half_length * np.cos(t)
    y = ratio * half_length * np.sin(t)
    edge = np.r_[0.0, np.cumsum(np.hypot(np.diff(x), np.diff(y)))]
    s = 0.5 * (edge[1:] + edge[:-1])
    tm = 0.5 * (t[1:] + t[:-1])
    ue = (1 + ratio) * np.abs(np.sin(tm)) / np.sqrt(np.sin(tm) ** 2 + ratio**2 * np.cos(tm) ** 2)
    return s, ue


def run(repeat: int = 50, transition="free"):
    """Median times (ms) of the march on each body's two surfaces; returns a list of dicts."""
    rows = []
    for shape in ("cylinder", "ellipse 4:1"):
        s, ue = surface("cylinder" if shape == "cylinder" else "ellipse")
        # upper and lower surfaces are mirror images: march both, as the analysis does
        times = []
        for _ in range(repeat):
            t0 = time.perf_counter()
            upper = march_boundary_layer(s, ue, nu=NU, speed=SPEED, transition=transition)
            lower = march_boundary_layer(s, ue, nu=NU, speed=SPEED, transition=transition)
            times.append(time.perf_counter() - t0)
        sep = upper.separation
        rows.append(
            dict(
                body=shape,
                stations=2 * s.size,
                transition=transition,
                median_ms=1e3 * statistics.median(times),
                events=", ".join(f"{e.kind}@{e.s:.3g}m" for e in upper.events),
                separation_s=None if sep is None else sep.s,
                success=upper.success and lower.success,
            )
        )
    return rows


def main():
    print(f"boundary-layer march, 2 surfaces x 150 stations, Re_L = {RE_LENGTH:.0e}")
    for transition in ("free", "turbulent"):
        for row in run(transition=transition):
            print(
                f"{row['body']:<12} {row['transition']:<9} {row['stations']:>4} stations  "
                f"median {row['median_ms']:6.2f} ms  success={row['success']}  {row['events']}"
            )


if __name__ == "__main__":
    main()
