"""Print the convergence table of docs/validation.md: every sample at 1x, 2x and 4x the default
panel count (Cd and each corner's verdict), and its invariance to the start node and direction.

Run from the repository: ``python tools/convergence_table.py``; its output replaces the table
of the underbody side relief in docs/validation.md (the samples' conditions, the relief on);
with ``--no-side-relief`` the 2D section's, the first table there.
"""

from __future__ import annotations

import sys

from profilebench import Conditions, Profile, analyze, load_project
from profilebench.io.samples import sample_paths


def _reordered(profile, start, reverse):
    idx = list(range(len(profile.nodes)))
    if reverse:
        idx = idx[::-1]
    idx = idx[start:] + idx[:start]
    te = profile.trailing_edge
    return Profile(
        tuple(profile.nodes[i] for i in idx),
        name=profile.name,
        trailing_edge=None if te is None else idx.index(te),
    )


def _conditions(project, relief=True):
    if not relief:
        return project.conditions.replace(side_relief=False)
    return project.conditions


def sample_lines(relief=True, verdicts=True):
    """The convergence table of the samples (markdown lines), then (``verdicts``) each sample's
    corner verdicts at the default count; ``relief`` False: the 2D sections'."""
    n0 = Conditions().panels
    counts = (n0, 2 * n0, 4 * n0)
    lines = [
        "| sample | "
        + " | ".join(f"Cd at {n}" for n in counts)
        + " | largest change | verdicts at 1x = 2x = 4x | Cd spread over start nodes and directions"
        + " | Cl at "
        + " / ".join(str(n) for n in counts)
        + " |",
        "|---|" + "---|" * (len(counts) + 4),
    ]
    for path in sample_paths():
        project = load_project(path)
        cond = _conditions(project, relief)
        runs = [analyze(project.profile, cond.replace(panels=n)) for n in counts]
        cds = [a.drag.cd for a in runs]
        named = [[(c.label or f"node {c.node}", c.verdict.value) for c in a.corners] for a in runs]
        same = named[1] == named[0] and named[2] == named[0]
        change = max(abs(c - cds[0]) for c in cds[1:]) / cds[0] * 100.0
        others = [
            analyze(_reordered(project.profile, k, rev), cond).drag.cd
            for rev in (False, True)
            for k in range(len(project.profile.nodes))
        ]
        spread = (max(others) - min(others)) / min(others) * 100.0
        lines.append(
            f"| {path.stem} | "
            + " | ".join(f"{c:.4f}" for c in cds)
            + f" | {change:.1f} % | {'yes' if same else 'NO'} | {spread:.2f} % | "
            + " / ".join(f"{a.drag.cl:.3f}" for a in runs)
            + " |"
        )
    if verdicts:
        lines.append("")
        for path in sample_paths():
            project = load_project(path)
            a = analyze(project.profile, _conditions(project, relief))
            lines.append(
                f"- **{path.stem}** ({n0} panels): "
                + "; ".join(
                    f"{c.label or 'node %d' % c.node}: {c.verdict.value}" for c in a.corners
                )
            )
    return lines


def main():
    print("\n".join(sample_lines(relief="--no-side-relief" not in sys.argv[1:])))


if __name__ == "__main__":
    main()
