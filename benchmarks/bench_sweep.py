"""Benchmark of a screening study: a 15-point radius sweep at 250 panels, cold, per sample.

Run as a script (``python benchmarks/bench_sweep.py``) or call :func:`run` for the table rows.

For each sample project it sweeps the radius of one corner (the sample's first convex corner
whose verdict is a corner bubble, else its first rounded corner) from sharp to the largest that
fits in 15 points with ``profilebench.studies.radius_sweep`` on two worker processes forked from
the study's fork server (as the editor runs them), and reports the median over the runs of the
wall time and of the time to the first point reported. Each run is cold: a fresh point cache,
and workers forked from a server that has never analysed anything, so that no radius search
is cached in them. The targets of the study work: under 1.5 s wall, the first point within
0.3 s, on this project's 2-core machine.
"""

from __future__ import annotations

import statistics

REPEATS = 3
PANELS = 250
POINTS = 15
WORKERS = 2


def _corner(project):
    """The node swept on ``project``: its first corner with a bubble, else its first rounded
    corner (analysed in this process only to choose, before any worker exists)."""
    from profilebench.assess.analysis import analyze
    from profilebench.assess.results import Verdict

    a = analyze(project.profile, project.conditions.replace(panels=PANELS))
    for c in a.corners:
        if c.verdict is Verdict.BUBBLE_REATTACHES:
            return c.node, c.label
    c = next(c for c in a.corners if c.radius > 0.0)
    return c.node, c.label


def run(repeats: int = REPEATS):
    """Rows: sample, corner label, median wall (s), median first point (s), runs, failures."""
    from profilebench.io import load_project
    from profilebench.io.samples import sample_paths
    from profilebench.studies import PointCache, radius_sweep
    from profilebench.studies.runner import start_worker_server

    # the server is forked before this process analyses anything: its workers start cold
    server = start_worker_server()
    method = "forkserver" if server else "spawn"
    projects = [load_project(p) for p in sample_paths()]
    rows = []
    for path, project in zip(sample_paths(), projects):
        node, label = _corner(project)
        walls, firsts, failed = [], [], 0
        for _ in range(repeats):
            table = radius_sweep(
                project.profile,
                project.conditions.replace(panels=PANELS),
                corner=node,
                points=POINTS,
                workers=WORKERS,
                cache=PointCache(),
                start_method=method,
            )
            walls.append(table.stats.seconds)
            firsts.append(table.stats.first_point_seconds)
            failed += sum(1 for s in table.status if s.value != "success")
        rows.append(
            dict(
                sample=path.stem,
                corner=label,
                wall_s=statistics.median(walls),
                first_s=statistics.median(firsts),
                runs=repeats,
                failed=failed,
                method=method,
            )
        )
    return rows


def main():
    print(f"{'sample':28s} {'corner':24s} {'wall s':>7s} {'first s':>8s} runs failed")
    for r in run():
        print(
            f"{r['sample']:28s} {r['corner'][:24]:24s} {r['wall_s']:7.2f} {r['first_s']:8.2f} "
            f"{r['runs']:4d} {r['failed']:6d}"
        )


if __name__ == "__main__":
    main()
