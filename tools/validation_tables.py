"""Regenerate the measured tables of docs/validation.md in place.

Each table sits between two marker lines in the page::

    <!-- generated: NAME (python tools/validation_tables.py) -->
    ...
    <!-- end generated: NAME -->

and this script recomputes it on the current code and writes the page back (atomically: the page
is either the old one or the complete new one). The prose around the tables is written by hand
and quotes some of their numbers: read it again after a run that changes them.

Run from the repository: ``python tools/validation_tables.py`` (all tables, several minutes on a
2-core machine), ``--only NAME [NAME ...]`` for some, ``--check`` to write nothing and exit with
status 1 when a table on the page is not what the code gives now. Tables: ``samples-2d`` (the
samples' convergence with the side relief off), ``samples`` (with it, their default),
``boxes`` (a family of rounded boxes), ``radius-search`` (the samples' smallest attached radii
at 1x, 2x and 4x the default panels), ``published`` (two-dimensional sections against handbook
drag coefficients: tools/published_cases.py, where the sources are named).
"""

from __future__ import annotations

import argparse
import re
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import convergence_table  # noqa: E402
import published_cases  # noqa: E402

from profilebench import Conditions, analyze, load_project  # noqa: E402
from profilebench.assess.radius_search import smallest_attached_radius  # noqa: E402
from profilebench.assess.results import SearchStatus  # noqa: E402
from profilebench.geometry import rounded_box  # noqa: E402
from profilebench.io.atomic import atomic_write_text  # noqa: E402
from profilebench.io.samples import sample_paths  # noqa: E402

PAGE = Path(__file__).resolve().parent.parent / "docs" / "validation.md"

# (length, height, radii, clearance, speed): round the samples' sizes, from r/h 0.1 down to sharp
BOXES = (
    (4.0, 1.6, 0.2, 0.2, 25.0),
    (2.0, 0.5, 0.1, 0.05, 30.0),
    (5.0, 2.5, (0.3, 0.25, 0.25, 0.3), 0.3, 30.0),
    (4.5, 1.8, (0.4, 0.2, 0.2, 0.4), 0.25, 35.0),
    (4.6, 1.9, (0.06, 0.03, 0.03, 0.042), 0.25, 28.0),
    (4.0, 1.6, 0.05, 0.2, 25.0),
    (4.5, 1.5, 0.0, 0.15, 30.0),
)

# the corners whose smallest attached radius the samples' analyses search or a review argues over
SEARCHED = ("front bumper lower", "bonnet leading edge", "windscreen header", "front upper edge")


def _counts():
    n0 = Conditions().panels
    return (n0, 2 * n0, 4 * n0)


def _verdicts(a):
    return [(c.node, c.verdict) for c in a.corners]


def _radii(r):
    if isinstance(r, tuple):
        return "r = (" + ", ".join(f"{v:g}" for v in r) + ") m"
    return "sharp" if r == 0.0 else f"r = {r:g} m"


def box_lines():
    counts = _counts()
    lines = [
        "| box | "
        + " | ".join(f"Cd at {n}" for n in counts)
        + " | largest change | same verdicts |",
        "|---|" + "---|" * (len(counts) + 2),
    ]
    for length, height, radius, clearance, speed in BOXES:
        box = rounded_box(length, height, radius, clearance=clearance)
        runs = [analyze(box, Conditions(speed=speed, panels=n)) for n in counts]
        if not all(a.success for a in runs):
            cells = [f"{a.drag.cd:.4f}" if a.success else a.status.value for a in runs]
            change, same = "-", "-"
        else:
            cds = [a.drag.cd for a in runs]
            cells = [f"{c:.4f}" for c in cds]
            change = f"{max(abs(c - cds[0]) for c in cds[1:]) / cds[0] * 100.0:.1f} %"
            same = "yes" if all(_verdicts(a) == _verdicts(runs[0]) for a in runs) else "NO"
        lines.append(
            f"| {length:.1f} x {height:.1f} m, {_radii(radius)}, clearance {clearance:g} m, "
            f"{speed:g} m/s | " + " | ".join(cells) + f" | {change} | {same} |"
        )
    return lines


def radius_lines():
    counts = _counts()
    lines = [
        "| sample | corner | its radius (mm) | "
        + " | ".join(f"smallest attached at {n} (mm)" for n in counts)
        + f" | at {counts[0]} against {counts[-1]} |",
        "|---|---|---|" + "---|" * (len(counts) + 1),
    ]
    for path in sample_paths():
        project = load_project(path)
        for node, nd in enumerate(project.profile.nodes):
            if nd.smooth or nd.label not in SEARCHED:
                continue
            found = [
                smallest_attached_radius(
                    project.profile, project.conditions.replace(panels=n), node
                )
                for n in counts
            ]
            cells = [
                f"{f.radius * 1e3:.1f}" if f.status is SearchStatus.FOUND else f.status.value
                for f in found
            ]
            if found[0].status is found[-1].status is SearchStatus.FOUND:
                off = f"{(found[0].radius / found[-1].radius - 1.0) * 100.0:+.0f} %"
            else:
                off = "-"
            lines.append(
                f"| {path.stem} | {nd.label} | {nd.radius * 1e3:.0f} | "
                + " | ".join(cells)
                + f" | {off} |"
            )
    return lines


TABLES = {
    "samples-2d": lambda: convergence_table.sample_lines(relief=False, verdicts=False),
    "samples": lambda: convergence_table.sample_lines(relief=True, verdicts=False),
    "boxes": box_lines,
    "radius-search": radius_lines,
    "published": published_cases.table_lines,
}


def _begin(name):
    return f"<!-- generated: {name} (python tools/validation_tables.py) -->"


def _end(name):
    return f"<!-- end generated: {name} -->"


def replace_blocks(text, blocks):
    """``text`` with the lines between each table's two markers replaced by ``blocks[name]``
    (a list of lines). ValueError naming the tables whose markers are missing, doubled or out
    of order."""
    bad = []
    for name, lines in blocks.items():
        pattern = re.compile(
            r"^" + re.escape(_begin(name)) + r"\n(.*?)^" + re.escape(_end(name)) + r"$",
            re.S | re.M,
        )
        found = pattern.findall(text)
        if len(found) != 1:
            bad.append(name)
            continue
        body = "".join(line + "\n" for line in lines)
        text = pattern.sub(lambda m: _begin(name) + "\n" + body + _end(name), text)
    if bad:
        raise ValueError(
            "the page needs exactly one pair of markers for each table; missing or doubled for: "
            + ", ".join(bad)
            + f" (a table sits between '{_begin('NAME')}' and '{_end('NAME')}' lines)"
        )
    return text


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="+", choices=sorted(TABLES), help="tables to regenerate")
    parser.add_argument(
        "--check", action="store_true", help="write nothing; exit 1 if a table is out of date"
    )
    args = parser.parse_args(argv)
    names = args.only or list(TABLES)
    old = PAGE.read_text(encoding="utf-8")
    blocks = {}
    for name in names:
        print(f"computing {name} ...", file=sys.stderr, flush=True)
        blocks[name] = TABLES[name]()
    try:
        new = replace_blocks(old, blocks)
    except ValueError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    if args.check:
        if new != old:
            print("docs/validation.md is out of date: run python tools/validation_tables.py")
            return 1
        print("docs/validation.md is up to date")
        return 0
    if new != old:
        atomic_write_text(PAGE, lambda f: f.write(new))
        print(f"rewrote {', '.join(names)} in {PAGE.name}")
    else:
        print("no change")
    return 0


if __name__ == "__main__":
    sys.exit(main())
