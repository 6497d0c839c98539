"""Benchmark of the inviscid panel method against a dense linear solve of the same size.

Run as a script (``python benchmarks/bench_inviscid.py``) or call :func:`run` for the table rows.
For each panel count, with and without the ground, it reports the median time of
``solve_inviscid`` on an ellipse (b/a = 0.4) and, in the same run, the median time of
``numpy.linalg.solve`` on a random, diagonally dominant (well-conditioned) matrix of the same
size, and their ratio. Target: within 10x of the dense solve at 300 panels with the ground.
"""

from __future__ import annotations

import time

import numpy as np

from profilebench.flow import solve_inviscid

PANEL_COUNTS = (150, 300, 600, 1200)


def _median_time(func, repeats: int) -> float:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        func()
        times.append(time.perf_counter() - t0)
    return float(np.median(times))


def run(panel_counts=PANEL_COUNTS, repeats=None):
    """Time the solver; return a list of dict rows.

    Each row: ``panels``, ``ground``, ``solve_inviscid_ms``, ``dense_solve_ms``, ``ratio``,
    ``repeats`` (medians over ``repeats`` runs; by default more runs for small sizes).
    """
    rng = np.random.default_rng(2024)
    rows = []
    for n in panel_counts:
        reps = repeats if repeats is not None else max(5, int(6000 // n))
        eta = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
        points = np.column_stack([np.cos(eta), 0.4 * np.sin(eta) + 0.6])
        mat = rng.standard_normal((n, n)) + n * np.eye(n)
        rhs = rng.standard_normal(n)
        for ground in (False, True):
            solve_inviscid(points, ground=ground)  # warm-up
            t_panel = _median_time(lambda: solve_inviscid(points, ground=ground), reps)
            t_dense = _median_time(lambda: np.linalg.solve(mat, rhs), reps)
            rows.append(
                dict(
                    panels=n,
                    ground=ground,
                    solve_inviscid_ms=1e3 * t_panel,
                    dense_solve_ms=1e3 * t_dense,
                    ratio=t_panel / t_dense,
                    repeats=reps,
                )
            )
    return rows


def format_rows(rows) -> str:
    """The rows as a plain-text table."""
    lines = [
        f"{'panels':>7} {'ground':>7} {'solve_inviscid ms':>18} {'numpy solve ms':>15} {'ratio':>7} {'runs':>5}"
    ]
    for r in rows:
        lines.append(
            f"{r['panels']:>7d} {str(r['ground']):>7} {r['solve_inviscid_ms']:>18.3f} "
            f"{r['dense_solve_ms']:>15.3f} {r['ratio']:>7.2f} {r['repeats']:>5d}"
        )
    return "\n".join(lines)


if __name__ == "__main__":
    print(format_rows(run()))
