"""Benchmark of the analysis hot path: ``analyze`` at 300 panels on every sample profile.

Run as a script (``python benchmarks/bench_analyze.py``) or call :func:`run` for the table rows.

For each sample project it reports the median time of ``profilebench.assess.analysis.analyze``
with ``conditions.replace(panels=300)``, each call on a fresh, slightly moved profile (one node
shifted by a few micrometres, a new Profile with an empty cache) so that the geometry caches do
not hide the cost of building, validating, panelling and measuring the outline, as in an editor
drag. Every moved profile is analysed twice, each time as a new Profile object:

* ``cold``: the first call, which also runs the smallest-attached-radius search of every corner
  the solver finds with a corner bubble (``Analysis.radius_searches``; the van has one);
* ``total``: the second call, whose searches come from the search cache, so it times the
  analysis itself (the searches are timed on their own in the last row).

The split comes from ``Analysis.timings`` of the second call (geometry, flow, radius search
phase, assessment). In the same run it times ``numpy.linalg.solve`` on a well-conditioned
300 x 300 matrix and reports the median over the runs of each analysis's time divided by
the dense solve timed just before it (median of 15 solves), as the machine's speed drifts (target
from the issues: analyze within 15x of that dense solve).

The smallest-attached-radius search is timed on its own, per sample, cold and warm, by
``bench_radius_search.py``.

``--base-from MODEL`` (``run(base_model=...)``) times the analyses with that base-pressure model
(``Conditions.base_model``); ``--compare-base MODEL`` times the samples' own conditions and
that model in turns, call by call (the machine's drift hits both alike), and prints each
one's median and their ratio (the issue's limit: at most 1.2 with the base pressure from the
layer).
"""

from __future__ import annotations

import time

import numpy as np

from profilebench.assess.analysis import analyze
from profilebench.io import load_project
from profilebench.io.samples import sample_paths

PANELS = 300
REPEATS = 21
_SPLIT = ("geometry", "flow", "radius_search", "assess")


def _median(values) -> float:
    return float(np.median(np.asarray(values, dtype=float)))


def dense_solve_time(n: int = PANELS, repeats: int = 200) -> float:
    """Median time (s) of ``numpy.linalg.solve`` on a diagonally dominant n x n system."""
    mat, rhs = _dense_system(n)
    np.linalg.solve(mat, rhs)
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        np.linalg.solve(mat, rhs)
        times.append(time.perf_counter() - t0)
    return _median(times)


def _dense_system(n: int):
    rng = np.random.default_rng(2024)
    return rng.standard_normal((n, n)) + n * np.eye(n), rng.standard_normal(n)


def _moved(profile, k: int):
    """A fresh profile with node 1 shifted by (k + 1) micrometres: a new position for every k, empty cache."""
    node = profile.nodes[1]
    dx = 1e-6 * (1 + k)
    return profile.moved(1, node.x + dx, node.y)


def run(repeats: int = REPEATS, panels: int = PANELS, base_model: str | None = None):
    """Time ``analyze`` on each sample; return a list of dict rows.

    Analysis rows: ``sample``, ``total_ms`` (median wall time of analyze, radius searches
    cached), ``cold_ms`` (median wall time with the radius searches run), ``searches`` (radius
    searches per analysis), ``geometry_ms``, ``flow_ms``, ``radius_search_ms``, ``assess_ms``
    (medians of ``Analysis.timings``), ``dense_solve_ms``, ``ratio`` (median of each run's
    total / dense solve timed beside it),
    ``status``, ``repeats``. ``base_model``: the conditions' base-pressure model (None: the
    sample's own).
    """
    rows = []
    for path in sample_paths():
        project = load_project(path)
        cond = project.conditions.replace(panels=panels)
        if base_model is not None:
            cond = cond.replace(base_model=base_model)
        analyze(_moved(project.profile, 0), cond)  # warm-up (imports, table loading)
        totals, colds, ratios, denses, split = [], [], [], [], {k: [] for k in _SPLIT}
        status = ""
        searches = 0
        for k in range(repeats):
            # the dense solve is timed beside each analysis, so that the ratio compares the two
            # at the same moment of this shared machine (its speed drifts by tens of percent)
            t_dense_k = dense_solve_time(panels, repeats=15)
            # a new position each time: the first call finds no cached radius search
            t0 = time.perf_counter()
            first = analyze(_moved(project.profile, k + 1), cond)
            colds.append(time.perf_counter() - t0)
            searches = len(first.radius_searches)
            prof = _moved(project.profile, k + 1)  # the same outline, a new Profile (no cache)
            t0 = time.perf_counter()
            res = analyze(prof, cond)
            totals.append(time.perf_counter() - t0)
            denses.append(t_dense_k)
            ratios.append(totals[-1] / t_dense_k)
            status = res.status.name
            for key in _SPLIT:
                split[key].append(res.timings.get(key, 0.0))
        # timings["assess"] is measured from the start of the assessment including the search
        assess = [a - r for a, r in zip(split["assess"], split["radius_search"])]
        t_total = _median(totals)
        rows.append(
            dict(
                sample=path.stem,
                total_ms=1e3 * t_total,
                cold_ms=1e3 * _median(colds),
                searches=searches,
                geometry_ms=1e3 * _median(split["geometry"]),
                flow_ms=1e3 * _median(split["flow"]),
                radius_search_ms=1e3 * _median(split["radius_search"]),
                assess_ms=1e3 * _median(assess),
                dense_solve_ms=1e3 * _median(denses),
                ratio=_median(ratios),
                status=status,
                repeats=repeats,
            )
        )
    return rows


def format_rows(rows) -> str:
    """The rows as a plain-text table."""
    head = (
        f"{'sample':<36} {'total ms':>9} {'geom':>7} {'flow':>7} {'search':>7} {'assess':>7}"
        f" {'np.solve':>9} {'ratio':>7} {'cold ms':>8} {'runs':>5}  status"
    )
    lines = [head]
    for r in rows:
        lines.append(
            f"{r['sample']:<36} {r['total_ms']:>9.2f} {r['geometry_ms']:>7.2f} {r['flow_ms']:>7.2f}"
            f" {r['radius_search_ms']:>7.2f} {r['assess_ms']:>7.2f} {r['dense_solve_ms']:>9.3f}"
            f" {r['ratio']:>7.1f} {r['cold_ms']:>8.2f} {r['repeats']:>5d}  {r['status']}"
        )
    return "\n".join(lines)


def compare_base(model: str, repeats: int = REPEATS, panels: int = PANELS):
    """Rows of (sample, median ms with the sample's own conditions, median ms with the
    base-pressure model ``model``, ratio of the medians), the two timed in turns on the same
    fresh profiles (radius searches cached, as ``total`` of :func:`run`)."""
    rows = []
    for path in sample_paths():
        project = load_project(path)
        own = project.conditions.replace(panels=panels)
        conds = (own, own.replace(base_model=model))
        for c in conds:
            analyze(_moved(project.profile, 0), c)  # warm-up and the searches cached
        times = ([], [])
        for k in range(repeats):
            analyze(_moved(project.profile, k + 1), own)  # the searches of this position
            for i in (0, 1) if k % 2 == 0 else (1, 0):
                prof = _moved(project.profile, k + 1)
                t0 = time.perf_counter()
                analyze(prof, conds[i])
                times[i].append(time.perf_counter() - t0)
        a, b = _median(times[0]), _median(times[1])
        rows.append((path.stem, 1e3 * a, 1e3 * b, b / a))
    return rows


def main(argv=None):
    """Print the table (see the module docstring for the options)."""
    import argparse

    parser = argparse.ArgumentParser(description="time analyze on every sample")
    parser.add_argument("--base-from", metavar="MODEL", help="the base-pressure model to time")
    parser.add_argument(
        "--compare-base", metavar="MODEL", help="time the samples' own and MODEL in turns"
    )
    args = parser.parse_args(argv)
    if args.compare_base:
        print(f"{'sample':<36} {'own ms':>8} {args.compare_base + ' ms':>10} {'ratio':>7}")
        for name, a, b, ratio in compare_base(args.compare_base):
            print(f"{name:<36} {a:>8.2f} {b:>10.2f} {ratio:>7.3f}")
        return
    print(format_rows(run(base_model=args.base_from)))


if __name__ == "__main__":
    main()
