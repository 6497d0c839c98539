"""Benchmark of the smallest-attached-radius search: where one search's time goes, and the
search's median time per sample, cold and warm, against one ``analyze`` of the same profile.

Run as a script (``python benchmarks/bench_radius_search.py``; ``--split`` prints the per-solve
split too, ``--no-table`` leaves the per-sample table out) or call :func:`run` for the table rows and :func:`split` for the split.

:func:`split` runs cold searches of the test-body sample's front upper corner with the functions
of one solve wrapped in timers and reports, per solve, the median exclusive time of each phase:
building and validating the outline (``validate``), panelling (``panelize``: the outline pieces,
the density and the points), measuring (``measure``), the closed-body panel solve
(``solve_inviscid``, first call of a solve), its stagnation split and marches, the wake-model
panel solve (``solve_inviscid``, the later calls), its split and marches, the rest of the flow
code, and the corner assessment.

:func:`run` times, per sample, the search of every node corner whose search is FOUND at 250
panels: ``cold`` (a fresh outline, nothing cached), ``warm`` (after a 5 mm drag step of the next
node but one, started from the answer before the step, as the editor's drag does), each against
the median of ``analyze`` on the same outline timed beside it (radius searches cached).

:func:`closed_body_answers` (``--closed-body``) compares, on every node corner of the samples
with a FOUND search, the smallest attached radius on the closed-body verdict alone
(``closed_body_verdict``: a third of the cost per solve) with the search's own, and times a
verdict of each kind.
"""

from __future__ import annotations

import argparse
import contextlib
import time

import numpy as np

from profilebench.assess import radius_search
from profilebench.assess.analysis import analyze
from profilebench.assess.radius_search import (
    SearchCache,
    cached_radius_search,
    smallest_attached_radius,
)
from profilebench.assess.results import SearchStatus
from profilebench.flow import profile_flow
from profilebench.io import load_project
from profilebench.io.samples import sample_paths

PANELS = 250
REPEATS = 5

__all__ = ["split", "run", "closed_body_answers", "format_split", "format_rows"]


def _median(values) -> float:
    return float(np.median(np.asarray(values, dtype=float))) if len(values) else float("nan")


class _Timers:
    """Exclusive wall time of wrapped functions, by label (nested calls are subtracted)."""

    def __init__(self):
        self.totals = {}
        self.stack = []

    def wrap(self, label, fn):
        def timed(*args, **kwargs):
            t0 = time.perf_counter()
            self.stack.append(0.0)
            try:
                return fn(*args, **kwargs)
            finally:
                inner = self.stack.pop()
                dt = time.perf_counter() - t0
                name = label(args) if callable(label) else label
                self.totals[name] = self.totals.get(name, 0.0) + dt - inner
                if self.stack:
                    self.stack[-1] += dt

        return timed


@contextlib.contextmanager
def _patched(timers):
    """Wrap the phases of one solve of the search in ``timers``."""
    calls = {"inviscid": 0, "marched": 0}

    def per_solve(kind, first, later):
        def name(_args):
            calls[kind] += 1
            return first if calls[kind] == 1 else later

        return name

    def reset_counts(fn):
        def inner(*args, **kwargs):
            calls["inviscid"] = calls["marched"] = 0
            return fn(*args, **kwargs)

        return inner

    saved = []

    def patch(module, attr, label):
        saved.append((module, attr, getattr(module, attr)))
        setattr(module, attr, timers.wrap(label, getattr(module, attr)))

    patch(radius_search, "validate", "outline build + validate")
    patch(radius_search, "panelize", "panelize")
    patch(radius_search, "measure", "measure")
    patch(radius_search, "solve_flow", "flow: the rest")
    patch(
        profile_flow,
        "solve_inviscid",
        per_solve("inviscid", "closed-body panel solve", "wake panel solve(s)"),
    )
    patch(profile_flow, "split_surfaces", "stagnation split (both passes)")
    patch(
        profile_flow, "_marched", per_solve("marched", "closed-body marches", "wake-model marches")
    )
    patch(radius_search, "all_spans", "assessment")
    patch(radius_search, "corner_regions", "assessment")
    patch(radius_search, "surface_verdict", "assessment")
    original = radius_search.corner_verdict
    radius_search.corner_verdict = timers.wrap("verdict: the rest", reset_counts(original))
    saved.append((radius_search, "corner_verdict", original))
    try:
        yield
    finally:
        for module, attr, fn in reversed(saved):
            setattr(module, attr, fn)


def _sample(stem):
    return load_project(next(p for p in sample_paths() if p.stem == stem))


def _moved(profile, k: int):
    """A fresh profile (empty cache) with node 1 shifted by (k + 1) micrometres."""
    node = profile.nodes[1]
    return profile.moved(1, node.x + 1e-6 * (1 + k), node.y)


def _front_upper_corner(profile) -> int:
    ys = [n.y for n in profile.nodes]
    mid = 0.5 * (min(ys) + max(ys))
    cands = [i for i, n in enumerate(profile.nodes) if not n.smooth and n.radius > 0 and n.y > mid]
    return min(cands, key=lambda i: profile.nodes[i].x)


def split(repeats: int = REPEATS, panels: int = PANELS, stem: str = "kestrel_test_body"):
    """Per-solve median exclusive time (ms) of each phase of a cold search.

    Returns (rows, solves, search_ms): rows of (phase, ms per solve), the solves per search and
    the median wall time of the searches (timed without the wrappers).
    """
    project = _sample(stem)
    cond = project.conditions.replace(panels=panels)
    node = _front_upper_corner(project.profile)
    smallest_attached_radius(_moved(project.profile, 0), cond, node)  # warm-up
    plain = []
    for k in range(repeats):
        t0 = time.perf_counter()
        found = smallest_attached_radius(_moved(project.profile, 100 + k), cond, node)
        plain.append(time.perf_counter() - t0)
    per_phase = {}
    for k in range(repeats):
        timers = _Timers()
        with _patched(timers):
            found = smallest_attached_radius(_moved(project.profile, 200 + k), cond, node)
        for name, t in timers.totals.items():
            per_phase.setdefault(name, []).append(1e3 * t / found.solves)
    rows = sorted(((n, _median(v)) for n, v in per_phase.items()), key=lambda r: -r[1])
    return rows, found.solves, 1e3 * _median(plain)


def format_split(rows, solves, search_ms) -> str:
    total = sum(ms for _, ms in rows)
    lines = [f"{'phase (per solve)':<34} {'ms':>7} {'share':>6}"]
    for name, ms in rows:
        lines.append(f"{name:<34} {ms:>7.2f} {100 * ms / total:>5.0f}%")
    lines.append(f"{'sum':<34} {total:>7.2f}")
    lines.append(f"{solves} solves per search; search {search_ms:.1f} ms (median, unwrapped)")
    return "\n".join(lines)


def _searched_corners(profile, cond):
    """Node corners whose search finds an answer (FOUND)."""
    out = []
    for node, nd in enumerate(profile.nodes):
        if nd.smooth:
            continue
        if smallest_attached_radius(profile, cond, node).status is SearchStatus.FOUND:
            out.append(node)
    return out


def _step(profile, node, dx=0.005):
    j = (node + 2) % len(profile.nodes)
    return profile.moved(j, profile.nodes[j].x + dx, profile.nodes[j].y)


def run(repeats: int = REPEATS, panels: int = PANELS):
    """Rows (dict) per sample and searched corner: ``sample``, ``node``, ``label``,
    ``cold_ms``, ``warm_ms``, ``analyze_ms``, ``cold_ratio``, ``warm_ratio`` (search over the
    median analyze timed beside it), ``cold_solves``, ``warm_solves``, ``repeats``."""
    rows = []
    for path in sample_paths():
        project = load_project(path)
        cond = project.conditions.replace(panels=panels)
        analyze(_moved(project.profile, 0), cond)  # warm-up (imports, tables)
        for node in _searched_corners(project.profile, cond):
            cold, warm, ana, cold_n, warm_n = [], [], [], [], []
            for k in range(repeats):
                prof = _moved(project.profile, k + 1)
                analyze(prof, cond)  # fills the caches of this outline: the next one times it
                t0 = time.perf_counter()
                analyze(_moved(project.profile, k + 1), cond)
                ana.append(time.perf_counter() - t0)
                t0 = time.perf_counter()
                found = smallest_attached_radius(_moved(project.profile, k + 1), cond, node)
                cold.append(time.perf_counter() - t0)
                cold_n.append(found.solves)
                cache = SearchCache()
                cached_radius_search(prof, cond, node, cache=cache)
                after = _step(_moved(project.profile, k + 1), node)
                t0 = time.perf_counter()
                found = cached_radius_search(after, cond, node, cache=cache)
                warm.append(time.perf_counter() - t0)
                warm_n.append(found.solves)
            t_ana = _median(ana)
            rows.append(
                dict(
                    sample=path.stem,
                    node=node,
                    label=project.profile.nodes[node].label or f"node {node}",
                    cold_ms=1e3 * _median(cold),
                    warm_ms=1e3 * _median(warm),
                    analyze_ms=1e3 * t_ana,
                    cold_ratio=_median(cold) / t_ana,
                    warm_ratio=_median(warm) / t_ana,
                    cold_solves=_median(cold_n),
                    warm_solves=_median(warm_n),
                    panels=panels,
                    repeats=repeats,
                )
            )
    return rows


# (heading, width, how a row shows in it) of the per-sample table
_COLUMNS = (
    ("sample", -26, lambda r: r["sample"]),
    ("corner", -22, lambda r: r["label"][:22]),
    ("cold ms", 8, lambda r: f"{r['cold_ms']:.1f}"),
    ("x an.", 6, lambda r: f"{r['cold_ratio']:.2f}"),
    ("solves", 6, lambda r: f"{r['cold_solves']:.0f}"),
    ("warm ms", 8, lambda r: f"{r['warm_ms']:.1f}"),
    ("x an.", 6, lambda r: f"{r['warm_ratio']:.2f}"),
    ("solves", 6, lambda r: f"{r['warm_solves']:.0f}"),
    ("analyze", 8, lambda r: f"{r['analyze_ms']:.1f}"),
)


def format_rows(rows) -> str:
    """The per-sample rows as a plain-text table (ratios to one analyze: "x an.")."""

    def line(cells):
        return " ".join(
            str(c).ljust(-w) if w < 0 else str(c).rjust(w) for c, (_, w, _) in zip(cells, _COLUMNS)
        )

    body = [line([show(r) for _, _, show in _COLUMNS]) for r in rows]
    return "\n".join([line([head for head, _, _ in _COLUMNS])] + body)


def closed_body_answers(panels: int = PANELS, repeats: int = REPEATS):
    """Rows (dict) per sample corner with a FOUND search: ``sample``, ``node``, ``label``,
    ``radius_mm`` (the search's answer), ``closed_mm`` (the same bisection on
    ``closed_body_verdict``; None where it finds no radius), ``ratio`` (radius / closed),
    ``full_ms`` and ``closed_ms`` (median time of one verdict of each kind at the answer)."""
    rows = []
    for path in sample_paths():
        project = load_project(path)
        cond = project.conditions.replace(panels=panels)
        profile = project.profile
        for node in _searched_corners(profile, cond):
            found = smallest_attached_radius(profile, cond, node)
            r_max = found.largest_fitting

            def closed_attached(r, node=node):
                v = radius_search.closed_body_verdict(profile.with_radius(node, r), cond, node)
                return v is not None and not v.separated

            closed = radius_search._bisected(closed_attached, r_max)
            times = {"full": [], "closed": []}
            for k in range(repeats):
                for kind, fn in (
                    ("full", radius_search.corner_verdict),
                    ("closed", radius_search.closed_body_verdict),
                ):
                    prof = profile.with_radius(node, found.radius * (1.0 + 1e-6 * (k + 1)))
                    t0 = time.perf_counter()
                    fn(prof, cond, node)
                    times[kind].append(time.perf_counter() - t0)
            closed_r = closed[1] if isinstance(closed, tuple) else None
            rows.append(
                dict(
                    sample=path.stem,
                    node=node,
                    label=profile.nodes[node].label or f"node {node}",
                    radius_mm=1e3 * found.radius,
                    closed_mm=None if closed_r is None else 1e3 * closed_r,
                    closed_status=closed if isinstance(closed, str) else "found",
                    ratio=None if not closed_r else found.radius / closed_r,
                    full_ms=1e3 * _median(times["full"]),
                    closed_ms=1e3 * _median(times["closed"]),
                )
            )
    return rows


def format_closed_body(rows) -> str:
    lines = [
        f"{'sample':<26} {'corner':<22} {'radius mm':>9} {'closed-body mm':>14} {'ratio':>6}"
        f" {'verdict ms':>10} {'closed ms':>9}"
    ]
    for r in rows:
        closed = f"{r['closed_mm']:.1f}" if r["closed_mm"] is not None else r["closed_status"]
        ratio = f"{r['ratio']:.2f}" if r["ratio"] is not None else "-"
        lines.append(
            f"{r['sample']:<26} {r['label'][:22]:<22} {r['radius_mm']:>9.1f} {closed:>14}"
            f" {ratio:>6} {r['full_ms']:>10.1f} {r['closed_ms']:>9.1f}"
        )
    return "\n".join(lines)


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--split", action="store_true", help="print the per-solve split")
    p.add_argument(
        "--closed-body", action="store_true", help="print the closed-body verdict's answers"
    )
    p.add_argument("--no-table", action="store_true", help="leave the per-sample table out")
    args = p.parse_args(argv)
    if args.split:
        print(format_split(*split()))
    if args.closed_body:
        print(format_closed_body(closed_body_answers()))
    if not args.no_table:
        print(format_rows(run()))


if __name__ == "__main__":
    main()
