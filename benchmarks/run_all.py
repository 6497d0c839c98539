"""Run every benchmark script and print one table of medians and ratios.

Each script in this folder with an importable ``run()`` is loaded by path and run in turn:
``bench_inviscid`` (panel method vs a dense numpy solve by panel count), ``bench_boundary_layer``
(the march with free transition and fully turbulent), ``bench_analyze`` (full analyze per sample),
``bench_radius_search`` (the smallest-attached-radius search per sample, cold and warm, against
one analyze), ``bench_sweep`` (a 15-point radius sweep per sample, cold: wall time and first
point), ``bench_fit`` (the outline fit of each sample digitised, and its radius ranges' share)
and ``bench_gui`` (editor drag latency, offscreen Qt). A script
that is missing or fails is skipped with a note; the others still run.

Run: ``python benchmarks/run_all.py`` or ``profilebench bench``. Never used to time unit tests.
"""

from __future__ import annotations

import argparse
import importlib.util
import math
import sys
import traceback
from pathlib import Path

HERE = Path(__file__).resolve().parent
SCRIPTS = (
    "bench_inviscid",
    "bench_boundary_layer",
    "bench_analyze",
    "bench_radius_search",
    "bench_sweep",
    "bench_fit",
    "bench_gui",
)
COLUMNS = ("benchmark", "case", "median", "unit", "ratio", "note")

__all__ = ["SCRIPTS", "load", "collect", "format_table", "main"]


def load(name: str):
    """Import ``benchmarks/<name>.py`` by path; None if the file is missing."""
    path = HERE / f"{name}.py"
    if not path.is_file():
        return None
    spec = importlib.util.spec_from_file_location(f"_profilebench_bench_{name}", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _num(value, fmt=".3f"):
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "n/a"
    return format(value, fmt) if isinstance(value, float) else str(value)


def _rows_inviscid(mod):
    for r in mod.run():
        yield (
            "inviscid solve",
            f"{r['panels']} panels, ground {'on' if r['ground'] else 'off'}",
            _num(r["solve_inviscid_ms"]),
            "ms",
            f"{r['ratio']:.2f}x dense",
            f"numpy.linalg.solve {r['dense_solve_ms']:.3f} ms; {r['repeats']} runs",
        )


def _rows_boundary_layer(mod):
    for transition in ("free", "turbulent"):
        for r in mod.run(transition=transition):
            yield (
                "boundary-layer march",
                f"{r['body']}, {transition}, {r['stations']} stations",
                _num(r["median_ms"]),
                "ms",
                "",
                f"success={r['success']}",
            )


def _rows_analyze(mod):
    for r in mod.run():
        note = (
            f"geometry {_num(r['geometry_ms'], '.1f')}, flow {_num(r['flow_ms'], '.1f')}, "
            f"search {_num(r['radius_search_ms'], '.1f')}, assess {_num(r['assess_ms'], '.1f')} "
            f"ms; with {r['searches']} radius search(es) run {_num(r['cold_ms'], '.1f')} ms; "
            f"{r['status']}"
        )
        yield (
            "analyze",
            str(r["sample"]),
            _num(r["total_ms"], ".1f"),
            "ms",
            f"{r['ratio']:.1f}x dense",
            note,
        )


def _rows_radius_search(mod):
    for r in mod.run():
        for kind in ("cold", "warm"):
            yield (
                "radius search",
                f"{r['sample']}, {r['label']}, {kind}",
                _num(r[f"{kind}_ms"], ".1f"),
                "ms",
                f"{r[f'{kind}_ratio']:.2f}x analyze",
                f"{r[f'{kind}_solves']:.0f} solves; analyze {r['analyze_ms']:.1f} ms at "
                f"{r['panels']} panels; {r['repeats']} runs",
            )


def _rows_sweep(mod):
    for r in mod.run():
        yield (
            "radius sweep, 15 points",
            f"{r['sample']}, {r['corner']}",
            _num(r["wall_s"], ".2f"),
            "s",
            f"first point {r['first_s']:.2f} s",
            f"cold, 2 workers ({r['method']}); {r['runs']} runs; {r['failed']} points failed",
        )


def _rows_gui(mod):
    for r in mod.run():
        target = "" if r.get("target") is None else f"target <= {r['target']:g}"
        ok = "" if r.get("ok") is None else ("ok" if r["ok"] else "OVER TARGET")
        yield (
            "GUI drag",
            r["metric"],
            _num(r["value"], ".1f"),
            r.get("unit", ""),
            "",
            " ".join(x for x in (target, ok) if x),
        )


def _rows_fit(mod):
    for r in mod.run():
        yield (
            "outline fit",
            f"{r['sample']} digitised ({r['points']} points)",
            _num(r["fit_ms"], ".0f"),
            "ms",
            _num(r["ratio"], ".2f"),
            f"ratio: the radius ranges ({r['ranges_ms']:.0f} ms) over the rest of the fit; "
            f"{r['open']} of {r['corners']} radii open",
        )


def _rows_generic(mod):
    for r in mod.run():
        yield (mod.__name__, ", ".join(f"{k}={v}" for k, v in r.items()), "", "", "", "")


ADAPTERS = {
    "bench_inviscid": _rows_inviscid,
    "bench_boundary_layer": _rows_boundary_layer,
    "bench_analyze": _rows_analyze,
    "bench_radius_search": _rows_radius_search,
    "bench_sweep": _rows_sweep,
    "bench_fit": _rows_fit,
    "bench_gui": _rows_gui,
}


def collect(names=SCRIPTS, out=sys.stderr):
    """Run the named benchmarks; return (rows, notes). A missing or failing script is a note."""
    rows, notes = [], []
    for name in names:
        try:
            mod = load(name)
        except Exception as exc:  # a broken script must not stop the others
            notes.append(f"{name}: skipped, import failed ({type(exc).__name__}: {exc})")
            continue
        if mod is None:
            notes.append(f"{name}: skipped, benchmarks/{name}.py is missing")
            continue
        if not callable(getattr(mod, "run", None)):
            notes.append(f"{name}: skipped, it has no run()")
            continue
        print(f"running {name} ...", file=out, flush=True)
        try:
            rows.extend(list(ADAPTERS.get(name, _rows_generic)(mod)))
        except Exception as exc:
            notes.append(f"{name}: skipped, run() failed ({type(exc).__name__}: {exc})")
            traceback.print_exc(file=out)
    return rows, notes


def format_table(rows) -> str:
    """Rows of (benchmark, case, median, unit, ratio, note) as a plain-text table."""
    table = [COLUMNS, *rows]
    widths = [max(len(str(r[i])) for r in table) for i in range(len(COLUMNS))]
    lines = []
    for k, r in enumerate(table):
        cells = [
            str(c).ljust(w) if i in (0, 1, 3, 5) else str(c).rjust(w)
            for i, (c, w) in enumerate(zip(r, widths))
        ]
        lines.append("  ".join(cells).rstrip())
        if k == 0:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines)


def build_parser():
    p = argparse.ArgumentParser(prog="run_all.py", description=__doc__.splitlines()[0])
    p.add_argument(
        "--only",
        nargs="+",
        choices=SCRIPTS,
        metavar="NAME",
        help=f"run only these benchmarks ({', '.join(SCRIPTS)})",
    )
    p.add_argument(
        "--skip",
        nargs="+",
        choices=SCRIPTS,
        default=(),
        metavar="NAME",
        help="leave these benchmarks out",
    )
    return p


def main(argv=None) -> int:
    """Run the benchmarks and print the table (stdout) and the notes; return 0."""
    args = build_parser().parse_args(argv)
    names = [n for n in (args.only or SCRIPTS) if n not in args.skip]
    rows, notes = collect(names)
    print(
        "Medians of repeated runs on this machine (ratios against a dense numpy solve of the "
        "same size where given)"
    )
    print(format_table(rows))
    for n in notes:
        print(f"note: {n}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
