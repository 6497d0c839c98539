"""The profilebench command line.

Subcommands::

    profilebench analyse FILE [--image OUT.png|.svg|.pdf] [--csv OUT.csv] [--json OUT.json]
                              [--speed KMH] [--no-ground] [--no-side-relief]
                              [--transition free|turbulent|METRES]
                              [--h-separation H] [--panels N] [--altitude M]
                              [--base-from constant|body|section]
                              [--area M2 | --width M] [--cp-min CP]
    profilebench compare BASELINE VARIANT [--same-conditions] [condition options]
    profilebench corners FILE [--smallest] [condition options]
    profilebench import OUTLINE.csv PROJECT.json [--simplify MM] [--units mm|m] [conditions]
    profilebench sweep PROJECT (--radius FIRST:LAST:N --corner LABEL [--speeds FIRST:LAST:N]
                                | --position NODE:DX:DY:N | --speeds FIRST:LAST:N)
                               [--corner LABEL] [--csv OUT.csv] [--image OUT.png] [--workers N]
    profilebench variants PROJECT [--baseline NAME] [--by force|cda|cd] [--csv OUT.csv]
                                  [--image OUT.png] [--workers N] [condition options]
    profilebench variants PROJECT --add NAME FILE [--note TEXT] [--units mm|m]
    profilebench samples
    profilebench bench [--only NAME ...] [--skip NAME ...]

FILE may be a project file (.json) or a CSV outline of x, y points (mm or m, see --units), which
is analysed with the default conditions and the options given. Without a subcommand the desktop
editor starts (``profilebench PROJECT.json`` opens that file in
it). Exit codes: 0 success, 1 an analysis did not
succeed (its message is printed), 2 bad input (the error's message is printed, no traceback),
130 interrupted (Ctrl-C). Output files are checked before any work: their folder must be
writable and none may be one of the input files. Text printed to the terminal has its control
characters (ANSI escapes in a label) and lone surrogates shown as escapes; a reader that stops
early (``| head``) only cuts the printed text short: the files asked for are still written.
"""

from __future__ import annotations

import argparse
import math
import os
import re
import sys
from pathlib import Path

import profilebench
from profilebench.errors import InputError, ProfileBenchError

__all__ = ["main", "build_parser", "EXIT_OK", "EXIT_FAILED", "EXIT_BAD_INPUT", "EXIT_INTERRUPTED"]

EXIT_OK = 0
EXIT_FAILED = 1
EXIT_BAD_INPUT = 2
EXIT_INTERRUPTED = 130  # 128 + SIGINT, as shells report a Ctrl-C
#: longest number echoed in a message (characters); longer ones are cut with "..."
SHOWN_NUMBER_CHARS = 24

#: the benchmark scripts ``profilebench bench`` runs, from benchmarks/ beside the package
BENCH_SCRIPTS = (
    "bench_inviscid",
    "bench_boundary_layer",
    "bench_analyze",
    "bench_radius_search",
    "bench_sweep",
    "bench_fit",
    "bench_gui",
)


class _Failed(Exception):
    """An analysis came back without success; carries the message to print."""


# control characters (but newline and tab), DEL, the C1 controls, and lone surrogates
_UNPRINTABLE = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\ud800-\udfff]")


def terminal_text(text: str) -> str:
    """``text`` safe to print: control characters and lone surrogates as escapes (``\\x1b``)."""
    return _UNPRINTABLE.sub(
        lambda m: m.group().encode("unicode_escape", "backslashreplace").decode("ascii"), text
    )


class _TerminalStream:
    """A text stream for the terminal: escapes what :func:`terminal_text` escapes, and a reader
    that closed the pipe (``| head``) silences the rest of the output instead of failing."""

    def __init__(self, stream):
        self.stream = stream
        self.broken = False

    def write(self, text):
        if self.broken:
            return len(text)
        text = terminal_text(str(text))
        try:
            self.stream.write(text)
        except UnicodeEncodeError:
            enc = getattr(self.stream, "encoding", None) or "ascii"
            self._guarded(
                lambda: self.stream.write(text.encode(enc, "backslashreplace").decode(enc))
            )
        except BrokenPipeError:
            self.broken = True
        return len(text)

    def _guarded(self, fn):
        try:
            fn()
        except BrokenPipeError:
            self.broken = True

    def flush(self):
        if not self.broken:
            self._guarded(self.stream.flush)

    def silence_if_broken(self):
        """After a broken pipe: point the real stream at the null device, so the interpreter's
        last flush at exit does not fail either."""
        if not self.broken:
            return
        try:
            fd = self.stream.fileno()
        except (AttributeError, OSError, ValueError):
            return
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, fd)
        os.close(devnull)


def _short_number(text: str) -> str:
    return text if len(text) <= SHOWN_NUMBER_CHARS else text[: SHOWN_NUMBER_CHARS - 3] + "..."


def _check_numbers(args):
    """Command-line numbers: finite, and not so long that no field could use them."""
    for name, value in vars(args).items():
        option = "--" + name.replace("_", "-")
        if isinstance(value, float) and not math.isfinite(value):
            raise InputError(f"{option} {value!r}: give a finite number")
        if isinstance(value, int) and not isinstance(value, bool) and abs(value) >= 10**18:
            digits = len(str(abs(value))) if abs(value) < 10**4000 else "thousands of"
            raise InputError(
                f"{option}: a whole number of {digits} digits is too large; give a plain number"
            )


def _check_outputs(outputs, inputs):
    """Each output (what, path) given: a file name, writable, and none of the ``inputs``;
    ``what`` names it in messages ("--json", "the project file")."""
    from profilebench.io.atomic import check_writable

    for what, value in outputs:
        if value is None:
            continue
        if not value.strip():
            raise InputError(f"{what} was given an empty file name; give the file to write")
        target = check_writable(value)
        for given in inputs:
            if given is None:
                continue
            try:
                same = Path(given).resolve() == target.resolve() or (
                    os.path.exists(given) and os.path.samefile(given, target)
                )
            except (OSError, ValueError):  # an input that cannot exist: refused when read
                same = False
            if same:
                raise InputError(
                    f"{what} {value!r} is the input file {given!r}: writing it would "
                    "destroy that input; give another file name (nothing was written)"
                )


# --- argument parsing --------------------------------------------------------------------------


def _add_units_option(p):
    p.add_argument(
        "--units",
        choices=("auto", "mm", "m"),
        default="auto",
        help="unit of a CSV outline's numbers (default: from its header, else mm when "
        "the extents exceed 50)",
    )


def _add_condition_options(p):
    g = p.add_argument_group("conditions (override the project file's)")
    g.add_argument("--speed", type=float, metavar="KMH", help="vehicle speed in km/h")
    g.add_argument("--no-ground", action="store_true", help="free air: no ground plane at y = 0")
    g.add_argument(
        "--no-side-relief",
        action="store_true",
        help="keep the 2D section's underbody pressures even when a width is known (by default "
        "the gap under the body leaks through its sides)",
    )
    g.add_argument(
        "--transition",
        metavar="MODE",
        help="'free' (a transition criterion), 'turbulent' (from the stagnation point) "
        "or an arc length in metres from the stagnation point",
    )
    g.add_argument(
        "--h-separation",
        type=float,
        metavar="H",
        help="turbulent separation threshold on the shape factor H (1.8 to 2.8)",
    )
    g.add_argument("--panels", type=int, metavar="N", help="number of panels on the outline")
    g.add_argument(
        "--base-from",
        metavar="MODEL",
        help="where the base pressure comes from: 'constant' (the project's Cp_b), or the "
        "boundary layer at separation through Hoerner's blunt-base correlation, 'body' (a "
        "three-dimensional base, for a vehicle) or 'section' (a two-dimensional base)",
    )
    g.add_argument(
        "--table",
        metavar="CSV",
        help="an r/t table of your own (in-house data) instead of the built-in ones; "
        "format in profilebench/assess/tables.py",
    )
    g.add_argument(
        "--altitude", type=float, metavar="M", help="ISO 2533 geopotential altitude in metres"
    )
    area = g.add_mutually_exclusive_group()
    area.add_argument(
        "--area",
        type=float,
        metavar="M2",
        help="frontal area in m^2 (gives CdA, drag force and power)",
    )
    area.add_argument(
        "--width",
        type=float,
        metavar="M",
        help="vehicle width in m: frontal area = width x the profile's height h",
    )


class _Parser(argparse.ArgumentParser):
    """argparse, whose usage errors do not echo a value of thousands of characters in full."""

    def error(self, message):
        self.print_usage(sys.stderr)
        self.exit(
            EXIT_BAD_INPUT,
            f"{self.prog}: error: {terminal_text(_shorten_numbers(_shorten_quoted(message)))}\n",
        )


def _shorten_quoted(message: str) -> str:
    return re.sub(
        r"'([^']{%d,})'" % (SHOWN_NUMBER_CHARS + 1),
        lambda m: repr(_short_number(m.group(1))),
        message,
    )


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``profilebench`` command."""
    parser = _Parser(
        prog="profilebench",
        description="Screening aerodynamics of 2D vehicle side profiles. Without a subcommand the "
        "desktop editor starts; 'profilebench PROJECT.json' opens that file in it.",
        epilog="Exit codes: 0 success, 1 an analysis did not succeed, 2 bad input. "
        "Lengths are printed in mm, speeds in km/h, power in kW.",
    )
    parser.add_argument(
        "--version", action="version", version=f"profilebench {profilebench.__version__}"
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = sub.add_parser(
        "analyse",
        aliases=["analyze"],
        help="analyse a project file or a CSV outline: summary table, optional image, CSV, JSON",
    )
    p.add_argument("file", help="project file (.json) or outline points (.csv)")
    p.add_argument("--image", metavar="OUT", help="review page image (.png, .svg or .pdf)")
    p.add_argument("--csv", metavar="OUT", help="surface data, one row per panel station")
    p.add_argument("--json", metavar="OUT", help="results as JSON")
    p.add_argument(
        "--cp-min",
        type=float,
        metavar="CP",
        default=None,
        help="lowest Cp of the review page's colour scale (default -3, the same on "
        "every page so that pages compare side by side)",
    )
    p.add_argument(
        "--check-refinement",
        action="store_true",
        help="analyse again at twice the panels and say what moved: Cd, each corner's verdict "
        "and the smallest attached radius of the corners the flow reaches (a few seconds)",
    )
    _add_units_option(p)
    _add_condition_options(p)

    p = sub.add_parser("compare", help="compare a variant with a baseline (b minus a)")
    p.add_argument("baseline", help="baseline project file (.json) or outline points (.csv)")
    p.add_argument("variant", help="variant project file (.json) or outline points (.csv)")
    p.add_argument(
        "--same-conditions",
        action="store_true",
        help="analyse the variant at the baseline's conditions (after the options "
        "below), so that only the shape differs",
    )
    _add_units_option(p)
    _add_condition_options(p)

    p = sub.add_parser("corners", help="list the corners with r, t, r/t and verdicts")
    p.add_argument("file", help="project file (.json) or outline points (.csv)")
    p.add_argument(
        "--smallest",
        action="store_true",
        help="search the smallest radius that keeps the flow attached, per convex corner",
    )
    _add_units_option(p)
    _add_condition_options(p)

    p = sub.add_parser("import", help="write a project file from a CSV outline (x, y points)")
    p.add_argument("outline", help="outline points (.csv): x, y columns in mm or m")
    p.add_argument("project", help="the project file to write (.json); an existing file is kept")
    p.add_argument(
        "--simplify",
        type=float,
        metavar="MM",
        help="the fit's tolerance: the fitted outline stays this close (mm) to the "
        "points (default 5)",
    )
    p.add_argument("--name", help="the profile's name (default: the file's name)")
    _add_units_option(p)
    _add_condition_options(p)

    _add_sweep_parser(sub)
    _add_variants_parser(sub)

    sub.add_parser("samples", help="list the sample project files")

    p = sub.add_parser(
        "bench",
        help="run the benchmark scripts and print a table of medians and "
        "ratios (needs a source checkout with benchmarks/)",
    )
    p.add_argument(
        "--only",
        nargs="+",
        metavar="NAME",
        help="run only these benchmarks: " + ", ".join(BENCH_SCRIPTS),
    )
    p.add_argument(
        "--skip",
        nargs="+",
        default=[],
        metavar="NAME",
        help="leave these benchmarks out (e.g. bench_gui)",
    )
    return parser


# --- helpers -----------------------------------------------------------------------------------


def _load(path, args=None, fits=None):
    """A project file, or a CSV outline as a project with the default conditions (its fit
    appended to ``fits``, a list, when given)."""
    if Path(str(path)).suffix.lower() == ".csv":
        return _import_csv(
            path,
            getattr(args, "units", "auto"),
            getattr(args, "simplify", None),
            getattr(args, "name", None),
            fits=fits,
        )
    from profilebench.io.project import load_project

    return load_project(path)


#: the tolerance (mm) of a CSV outline's fit when --simplify does not give one
FIT_TOLERANCE_MM = 5.0


def _import_csv(
    path, units="auto", simplify_mm=None, name=None, ground=True, report=None, fits=None
):
    """A CSV outline fitted to a profile (profilebench.geometry.fit) as a Project with the
    default conditions; ``report`` (a list) receives the fit's largest deviation and notes,
    ``fits`` (a list) the fit itself."""
    from profilebench.assess.conditions import Conditions
    from profilebench.geometry.fit import fit_outline
    from profilebench.io.points import import_points_csv
    from profilebench.io.project import Project

    got = import_points_csv(path, units=units)
    tol_mm = FIT_TOLERANCE_MM if simplify_mm is None else simplify_mm
    if not tol_mm > 0:
        raise InputError(f"--simplify {simplify_mm!r}: give a positive distance in mm")
    fit = fit_outline(
        got.points, tolerance=tol_mm / 1000.0, ground=ground, name=name or Path(str(path)).stem
    )
    if report is not None:
        report.append(
            f"fitted within {fit.max_deviation * 1e3:.1f} mm of the points "
            f"(tolerance {tol_mm:g} mm): {len(fit.profile.nodes)} nodes, "
            f"{fit.corners} corners"
        )
        report.extend(f"note: {n}" for n in fit.notes)
    if fits is not None:
        fits.append(fit)
    # the radii the points do not fix go with the project, for whoever opens it next
    notes = "\n".join(r.message() for r in fit.unresolved)
    return Project(profile=fit.profile, conditions=Conditions(), notes=notes)


def _conditions(project, args):
    from profilebench.assess.conditions import kmh_to_ms

    changes = {}
    if getattr(args, "speed", None) is not None:
        changes["speed"] = kmh_to_ms(_checked_speed_kmh(args.speed))
    if getattr(args, "no_ground", False):
        changes["ground"] = False
    if getattr(args, "no_side_relief", False):
        changes["side_relief"] = False
    if getattr(args, "transition", None) is not None:
        t = args.transition.strip().lower()
        if t in ("free", "turbulent"):
            changes["transition"] = t
        else:
            try:
                changes["transition"] = float(t)
            except ValueError:
                raise InputError(
                    f"--transition {args.transition!r} is not understood; give 'free', "
                    "'turbulent' or an arc length in metres such as 0.5"
                ) from None
    if getattr(args, "h_separation", None) is not None:
        changes["h_separation"] = args.h_separation
    if getattr(args, "panels", None) is not None:
        changes["panels"] = args.panels
    if getattr(args, "base_from", None) is not None:
        changes["base_model"] = args.base_from
    if getattr(args, "altitude", None) is not None:
        changes["altitude"] = args.altitude
    if getattr(args, "area", None) is not None:
        changes.update(frontal_area=_checked_positive("--area", args.area, "m^2"), width=None)
    if getattr(args, "width", None) is not None:
        changes.update(width=_checked_positive("--width", args.width, "m"), frontal_area=None)
    cond = project.conditions
    return cond.replace(**changes) if changes else cond


def _checked_speed_kmh(kmh):
    """The --speed value (km/h), refused in km/h when the conditions would refuse it in m/s."""
    import math

    from profilebench.assess.conditions import SPEED_MAX

    top = SPEED_MAX * 3.6
    if not (math.isfinite(kmh) and 0.0 < kmh <= top):
        raise InputError(
            f"--speed {kmh:g} km/h is outside (0, {top:g}] km/h; give a value "
            f"in km/h in that range (above {top:g} km/h the air's "
            "compressibility matters)"
        )
    return kmh


def _checked_positive(option, value, unit):
    import math

    if not (math.isfinite(value) and value > 0.0):
        raise InputError(f"{option} {value:g}: give a positive number in {unit}")
    return value


#: condition fields and how ``compare`` names them when they differ
_CONDITION_WORDS = {
    "speed": ("speed", lambda v: f"{v * 3.6:.1f} km/h"),
    "altitude": ("altitude", lambda v: f"{v:g} m"),
    "temperature_offset": ("temperature offset", lambda v: f"{v:+g} K"),
    "density": ("density", lambda v: "ISO 2533" if v is None else f"{v:g} kg/m^3"),
    "kinematic_viscosity": ("viscosity", lambda v: "ISO 2533" if v is None else f"{v:g} m^2/s"),
    "ground": ("ground", lambda v: "on" if v else "off"),
    "transition": ("transition", lambda v: v if isinstance(v, str) else f"at s = {v:g} m"),
    "h_separation": ("H separation", lambda v: f"{v:g}"),
    "frontal_area": ("frontal area", lambda v: "none" if v is None else f"{v:g} m^2"),
    "width": ("width", lambda v: "none" if v is None else f"{v:g} m"),
    "model_scale": ("model scale", lambda v: f"{v:g}"),
    "tunnel_speed": ("tunnel speed", lambda v: "none" if v is None else f"{v * 3.6:.1f} km/h"),
    "base_pressure": ("base pressure", lambda v: f"{v:g}"),
    "base_model": ("base pressure from", lambda v: v),
    "panels": ("panels", lambda v: f"{v}"),
    "side_relief": ("underbody side relief", lambda v: "on" if v else "off"),
}


def conditions_differences(a, b):
    """'name: a vs b' for each condition in which ``a`` and ``b`` differ."""
    out = []
    for field, (word, fmt) in _CONDITION_WORDS.items():
        va, vb = getattr(a, field), getattr(b, field)
        if va != vb:
            out.append(f"{word} {fmt(va)} vs {fmt(vb)}")
    return out


def _user_table(args):
    """The --table file as an RtTable, or None for the built-in tables."""
    if not getattr(args, "table", None):
        return None
    from profilebench.assess.tables import load_table

    return load_table(args.table)


def _analyse(profile, conditions, table=None):
    from profilebench.assess.analysis import analyze

    return analyze(profile, conditions, table=table)


def _check_success(analysis, what):
    if not analysis.success:
        raise _Failed(f"{what}: analysis {analysis.status.value}: {analysis.message}")


def _print_summary(analysis, out):
    from profilebench.plotting.summary import (
        corner_rows,
        format_table,
        summary_rows,
        CORNER_COLUMNS,
    )

    from profilebench.io.export import run_record
    from profilebench.plotting.summary import (
        MARGIN_DEFINITION,
        corner_disagreements,
        corner_notes,
        run_lines,
    )

    for line in run_lines(run_record(analysis)):
        print(line, file=out)
    print("", file=out)
    print(format_table(("quantity", "value", "unit / note"), summary_rows(analysis)), file=out)
    print("", file=out)
    print("Corners", file=out)
    print(format_table(CORNER_COLUMNS, corner_rows(analysis)), file=out)
    for name, text in corner_disagreements(analysis):
        print(f"  {name}: {text}", file=out)
    print(f"  ({MARGIN_DEFINITION})", file=out)
    notes = corner_notes(analysis) + list(analysis.warnings)
    notes += list(analysis.drag.notes) if analysis.drag else []
    if notes:
        print("", file=out)
        for n in notes:
            print(f"note: {n}", file=out)


def _caution(out):
    from profilebench.io.export import CAUTION

    print("", file=out)
    print(CAUTION, file=out)


# --- subcommands -------------------------------------------------------------------------------


def _cmd_analyse(args, out):
    from profilebench.io.export import write_results_json, write_surface_csv

    if args.image:
        from profilebench.plotting.review import image_format

        image_format(args.image)  # bad extension: bad input, before any work
    if args.cp_min is not None:
        from profilebench.plotting.profile_view import check_cp_min

        check_cp_min(args.cp_min)
    for opt, ext in (("csv", ".csv"), ("json", ".json")):
        value = getattr(args, opt)
        if value and Path(value).suffix.lower() != ext:
            raise InputError(f"--{opt} {value!r}: the file name must end in {ext}")
    _check_outputs(
        [("--image", args.image), ("--csv", args.csv), ("--json", args.json)],
        [args.file, getattr(args, "table", None)],
    )
    fits = []
    project = _load(args.file, args, fits=fits)
    cond = _conditions(project, args)
    table = _user_table(args)  # read once: every analysis below uses it
    analysis = _analyse(project.profile, cond, table=table)
    _check_success(analysis, f"{args.file}")
    print(f"{project.profile.name} ({args.file})", file=out)
    print("", file=out)
    _print_summary(analysis, out)
    open_radii = _open_radii(fits, project.profile, cond, out, analysis, table)
    refinement = None
    if args.check_refinement:
        from profilebench.assess.refinement import check_refinement

        refinement = check_refinement(
            project.profile, cond, radii=True, table=table, analysis=analysis
        )
        _print_refinement(refinement, out)
    if args.image:
        from profilebench.plotting.review import review_figure, save_figure

        from profilebench.plotting.profile_view import CP_FLOOR

        baseline = project.baseline
        if baseline is not None:
            # analysed at the same conditions, so that the page gives its Cd and the deltas
            base = _analyse(baseline, cond, table=table)
            if base.success:
                baseline = base
            else:
                print(
                    f"note: the baseline was not analysed ({base.message}); the page shows "
                    "its outline only",
                    file=out,
                )
        fig = review_figure(
            analysis,
            baseline=baseline,
            cp_min=CP_FLOOR if args.cp_min is None else args.cp_min,
            refinement=refinement,
            open_radii=open_radii,
        )
        save_figure(fig, args.image)
        print(f"\nimage written: {args.image}", file=out)
    if args.csv:
        write_surface_csv(analysis, args.csv)
        print(f"surface data written: {args.csv}", file=out)
    if args.json:
        write_results_json(analysis, args.json, refinement=refinement, open_radii=open_radii)
        print(f"results written: {args.json}", file=out)
    _caution(out)
    return EXIT_OK


def _open_radii(fits, profile, conditions, out, analysis=None, table=None, heading=None):
    """Print, for a fitted CSV outline, the radii its points leave open and the Cd at each end
    of their ranges (profilebench.assess.open_radii), after ``heading`` when given; returns the
    effects (none, and nothing printed, for a project file or when the points fix every
    radius)."""
    if not fits or not fits[0].unresolved:
        return ()
    from profilebench.assess.open_radii import open_radius_effects
    from profilebench.plotting.summary import open_radius_lines

    effects = open_radius_effects(
        profile, conditions, fits[0].radius_ranges, analysis=analysis, table=table
    )
    if heading:
        print(f"\n{heading}", file=out)
    print("", file=out)
    for line in open_radius_lines(effects):
        print(line, file=out)
    return effects


def _print_refinement(check, out):
    from profilebench.plotting.summary import refinement_lines

    print("", file=out)
    for line in refinement_lines(check):
        print(line, file=out)


def _cmd_compare(args, out):
    from profilebench.assess.compare import compare

    fits_a, fits_b = [], []
    pa, pb = _load(args.baseline, args, fits=fits_a), _load(args.variant, args, fits=fits_b)
    cond_a = _conditions(pa, args)
    cond_b = cond_a if args.same_conditions else _conditions(pb, args)
    differ = conditions_differences(cond_a, cond_b)
    table = _user_table(args)
    a = _analyse(pa.profile, cond_a, table=table)
    _check_success(a, f"baseline {args.baseline}")
    b = _analyse(pb.profile, cond_b, table=table)
    _check_success(b, f"variant {args.variant}")
    c = compare(a, b)
    fmt = lambda v, f, scale=1.0: "n/a" if v is None else format(v * scale, f)  # noqa: E731
    rows = [
        ("Cd baseline", f"{c.cd_before:.4f}", pa.profile.name),
        ("Cd variant", f"{c.cd_after:.4f}", pb.profile.name),
        ("delta Cd", f"{c.delta_cd:+.4f}", "variant minus baseline"),
        ("delta Cd (%)", f"{c.delta_cd_percent:+.2f}", "%"),
        ("delta CdA", fmt(c.delta_cda, "+.4f"), "m^2"),
        ("delta force", fmt(c.delta_force, "+.2f"), "N"),
        ("delta power", fmt(c.delta_power, "+.3f", 1e-3), "kW"),
    ]
    from profilebench.plotting.summary import format_table

    print(format_table(("quantity", "value", "unit / note"), rows), file=out)
    changed = [ch for ch in c.corner_changes if ch.verdict_changed]
    print("", file=out)
    if changed:
        print("Corners that changed verdict", file=out)
        print(
            format_table(
                ("corner", "before", "after"),
                [(ch.label, ch.verdict_before, ch.verdict_after) for ch in changed],
            ),
            file=out,
        )
    else:
        print("No corner changed verdict.", file=out)
    # a CSV outline's radii that its points leave open: how far they move each Cd, against the
    # difference read between the two
    moves = []
    for which, fits, prof, cond, an in (
        ("baseline", fits_a, pa.profile, cond_a, a),
        ("variant", fits_b, pb.profile, cond_b, b),
    ):
        effects = _open_radii(fits, prof, cond, out, an, table, heading=f"{which} ({prof.name}):")
        moves += [e.spread * e.cd for e in effects if e.spread is not None]
    if moves and max(moves) >= abs(c.delta_cd):
        print(
            f"\nWARNING: the difference in Cd ({c.delta_cd:+.4f}) is no larger than what a "
            f"radius the points leave open moves a Cd by (up to {max(moves):.4f}): take those "
            "radii from the drawing before reading the difference.",
            file=out,
        )
    for w in c.warnings:
        print(f"WARNING: {w}", file=out)
    if differ:
        print(
            f"WARNING: the conditions differ ({'; '.join(differ)}): the deltas mix the change "
            "of shape with the change of conditions. Use --same-conditions to analyse the "
            "variant at the baseline's conditions.",
            file=out,
        )
    elif args.same_conditions:
        print("Both analysed at the baseline's conditions.", file=out)
    _caution(out)
    return EXIT_OK


def _cmd_corners(args, out):
    from profilebench.plotting.summary import CORNER_COLUMNS, corner_rows, format_table

    fits = []
    project = _load(args.file, args, fits=fits)
    cond = _conditions(project, args)
    table = _user_table(args)
    analysis = _analyse(project.profile, cond, table=table)
    _check_success(analysis, f"{args.file}")
    print(format_table(CORNER_COLUMNS, corner_rows(analysis)), file=out)
    _open_radii(fits, project.profile, cond, out, analysis, table)
    if args.smallest:
        from profilebench.assess.radius_search import cached_radius_search

        rows, failed = [], []
        for corner in analysis.corners:
            if not corner.convex:
                continue
            name = corner.label or f"node {corner.node}"
            if project.profile.nodes[corner.node].smooth:
                # a curvature peak of a smooth run: no node radius to vary
                rows.append(
                    (
                        name,
                        f"{corner.radius * 1000:.1f}",
                        "smooth",
                        "n/a",
                        "n/a",
                        "0",
                        "a curvature peak of a smooth run: make its node a corner to search "
                        "its radius",
                    )
                )
                continue
            # the analysis above searched the corners its drag corrections needed: those come
            # from the cache, the others are searched now
            r = cached_radius_search(project.profile, cond, corner.node)
            rows.append(
                (
                    corner.label or f"node {corner.node}",
                    f"{corner.radius * 1000:.1f}",
                    r.status.value,
                    "n/a" if r.radius is None else f"{r.radius * 1000:.1f}",
                    f"{r.largest_fitting * 1000:.1f}",
                    str(r.solves),
                    r.message,
                )
            )
            if not r.success:
                failed.append(f"{corner.label or 'node %d' % corner.node}: {r.message}")
        print("", file=out)
        print("Smallest radius keeping the flow attached (convex corners)", file=out)
        print(
            format_table(
                (
                    "corner",
                    "r now (mm)",
                    "search",
                    "smallest r (mm)",
                    "largest fitting (mm)",
                    "solves",
                    "message",
                ),
                rows,
            ),
            file=out,
        )
        if failed:
            _caution(out)
            raise _Failed("radius search failed for " + "; ".join(failed))
    _caution(out)
    return EXIT_OK


def _cmd_samples(args, out):
    from profilebench.io.samples import default_sample_path, sample_paths

    default = default_sample_path()
    for p in sample_paths():
        mark = "  (default)" if p == default else ""
        print(f"{p}{mark}", file=out)
    return EXIT_OK


def _benchmarks_folder() -> Path:
    return Path(profilebench.__file__).resolve().parent.parent / "benchmarks"


def _cmd_bench(args, out):
    import importlib.util

    for opt in ("only", "skip"):
        for name in getattr(args, opt) or []:
            if name not in BENCH_SCRIPTS:
                raise InputError(
                    f"--{opt} {name!r} is not a benchmark; choose from {', '.join(BENCH_SCRIPTS)}"
                )
    path = _benchmarks_folder() / "run_all.py"
    if not path.is_file():
        raise InputError(
            f"the benchmark scripts are not installed (no {str(path)!r}); run "
            "'profilebench bench' from a source checkout of profilebench"
        )
    spec = importlib.util.spec_from_file_location("_profilebench_run_all", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    argv = (["--only", *args.only] if args.only else []) + (
        ["--skip", *args.skip] if args.skip else []
    )
    return int(module.main(argv) or 0)


def _start_editor(argv):
    """Start the desktop editor; ``argv`` holds an optional project file."""
    try:
        from profilebench.gui.app import run
    except ImportError as exc:
        print(
            f"profilebench: the desktop editor is not available ({exc}). Use a subcommand "
            "instead (profilebench --help), or install PySide6 and the editor.",
            file=sys.stderr,
        )
        return EXIT_BAD_INPUT
    return int(run(["profilebench", *argv]) or 0)  # run() takes sys.argv-style lists


def _cmd_import(args, out):
    from profilebench.io.project import save_project
    from profilebench.geometry import explain

    target = Path(args.project)
    if target.suffix.lower() != ".json":
        raise InputError(f"{args.project!r}: the project file's name must end in .json")
    if target.exists():
        raise InputError(f"{args.project!r} exists; give a new file name (nothing was written)")
    _check_outputs(
        [("the project file", args.project)], [args.outline, getattr(args, "table", None)]
    )
    report, fits = [], []
    project = _import_csv(
        args.outline,
        args.units,
        args.simplify,
        args.name,
        ground=not args.no_ground,
        report=report,
        fits=fits,
    )
    cond = _conditions(project, args)
    problems = explain(project.profile, ground=cond.ground)
    if problems:
        raise InputError(f"the imported outline is not valid: {problems[0]}; nothing was written")
    import dataclasses

    save_project(dataclasses.replace(project, conditions=cond), target)
    n = len(project.profile.nodes)
    corners = sum(1 for nd in project.profile.nodes if not nd.smooth)
    for line in report:
        print(line, file=out)
    _open_radii(fits, project.profile, cond, out)
    print(f"project written: {target} ({n} nodes, {corners} corners)", file=out)
    return EXIT_OK


# --- sweep -------------------------------------------------------------------------------------

SWEEP_HELP = """\
Sweep one parameter (or radius and speed on a grid) and analyse each point.

  --radius FIRST:LAST:N     N radii of the --corner from FIRST to LAST, in metres; LAST may be
                            'max', the largest radius that fits (0:max:15 sweeps from sharp)
  --position NODE:DX:DY:N   N positions of NODE (a label, place name or node number) moved
                            evenly from where it is by up to (DX, DY) metres (x rearward, y up)
  --speeds FIRST:LAST:N     N speeds from FIRST to LAST km/h; with --radius, a radius x speed grid

--corner names the corner by its label, its place name or its node number: the swept corner of
--radius, and the corner watched (verdict bands, smallest attached radius at each point) with
--position or --speeds. The knee is the smallest swept radius from which Cd stays within 2% of
its attached value (the median Cd of the points where the corner is attached). Exit codes: 0
every point succeeded, 1 some point failed (the table and files show which and why), 2 bad input.
"""


def _add_sweep_parser(sub):
    p = sub.add_parser(
        "sweep",
        help="sweep a corner's radius, a node's position or the speed: "
        "table, CSV, chart with the knee",
        description=SWEEP_HELP,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("file", help="project file (.json) or outline points (.csv)")
    p.add_argument("--corner", metavar="LABEL", help="the corner swept (--radius) or watched")
    p.add_argument("--radius", metavar="FIRST:LAST:N", help="radii in metres, LAST may be 'max'")
    p.add_argument("--position", metavar="NODE:DX:DY:N", help="a node moved by up to DX, DY metres")
    p.add_argument("--speeds", metavar="FIRST:LAST:N", help="speeds in km/h")
    _add_study_options(
        p, "the points", "one row per point (.csv)", "chart of Cd and CdA (.png, .svg or .pdf)"
    )


def _add_study_options(p, what, csv_help, image_help):
    """--workers, --csv, --image, --units and the condition options of a study."""
    p.add_argument(
        "--workers",
        type=int,
        metavar="N",
        help=f"processes to run {what} on (default: one per core; 1: this one)",
    )
    p.add_argument("--csv", metavar="OUT", help=csv_help)
    p.add_argument("--image", metavar="OUT", help=image_help)
    _add_units_option(p)
    _add_condition_options(p)


def _check_study_outputs(args):
    """A study's --image, --csv and --workers checked before any work."""
    if args.image:
        from profilebench.plotting.review import image_format

        image_format(args.image)
    if args.csv and Path(args.csv).suffix.lower() != ".csv":
        raise InputError(f"--csv {args.csv!r}: the file name must end in .csv")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers {args.workers}: give at least 1")
    _check_outputs(
        [("--image", args.image), ("--csv", args.csv)], [args.file, getattr(args, "table", None)]
    )


def _print_run(stats, out, head=""):
    """What a study's run did (RunStats), after a blank line."""
    print(
        f"\n{head}{stats.computed} analysed, {stats.from_cache} from the cache, "
        f"{stats.seconds:.2f} s on {stats.workers} worker(s)",
        file=out,
    )


def _terminal_progress(word):
    """``progress(done, total, i, result)`` writing "word done/total" to a terminal's stderr,
    or None when stderr is not a terminal."""
    err = sys.stderr
    if not err.isatty():
        return None

    def progress(done, total, i, result):
        err.write(f"\r  {word} {done}/{total}")
        err.write("\n" if done == total else "")
        err.flush()

    return progress


def _range_numbers(option, text, fields, last_may_be_max=False):
    """``text`` split at ':' into ``fields`` parts: floats, the last a count of points."""
    parts = text.split(":")
    if len(parts) != fields:
        raise InputError(
            f"{option} {_short_number(text)!r}: give {fields} values separated by ':' "
            f"(see profilebench sweep --help)"
        )
    values = []
    for k, part in enumerate(parts):
        part = part.strip()
        if k == fields - 1:
            if not part.isdigit() or not 2 <= int(part) <= 1000:
                raise InputError(
                    f"{option}: the number of points {_short_number(part)!r} must be a "
                    "whole number from 2 to 1000"
                )
            values.append(int(part))
        elif last_may_be_max and k == fields - 2 and part.lower() == "max":
            values.append(None)
        else:
            try:
                value = float(part)
            except ValueError:
                value = math.nan
            if not math.isfinite(value):
                raise InputError(f"{option}: {_short_number(part)!r} is not a number")
            values.append(value)
    return values


def _sweep_table(args, project, cond, workers, progress):
    import numpy as np

    from profilebench.assess.conditions import kmh_to_ms
    from profilebench import studies

    profile, table = project.profile, _user_table(args)
    options = dict(thickness=None, table=table, workers=workers, progress=progress)
    speeds = None
    if args.speeds:
        first, last, n = _range_numbers("--speeds", args.speeds, 3)
        speeds = np.linspace(kmh_to_ms(first), kmh_to_ms(last), n)
    if args.radius:
        if args.position:
            raise InputError("give --radius or --position, not both (a grid is radius x speed)")
        if not args.corner:
            raise InputError("--radius needs --corner LABEL: the corner whose radius is swept")
        first, last, n = _range_numbers("--radius", args.radius, 3, last_may_be_max=True)
        node = studies.corner_node(profile, args.corner)
        if profile.nodes[node].smooth:
            raise InputError(
                f"--corner {args.corner!r} is a smooth node (a spline passes "
                "through it), not a corner; make it a corner first"
            )
        radii = studies.radius_range(profile, node, first, last, n)
        if speeds is not None:
            return studies.radius_speed_grid(
                profile, cond, node, radii=radii, speeds=speeds, **options
            )
        return studies.radius_sweep(profile, cond, node, radii=radii, **options)
    if args.position:
        if speeds is not None:
            raise InputError("give --position or --speeds, not both (a grid is radius x speed)")
        name, rest = (args.position.rsplit(":", 3)[0], ":".join(args.position.rsplit(":", 3)[1:]))
        dx, dy, n = _range_numbers("--position", rest, 3)
        node = studies.corner_node(profile, name)
        return studies.position_sweep(
            profile, cond, node=node, direction=(dx, dy), points=n, corner=args.corner, **options
        )
    if speeds is not None:
        return studies.speed_sweep(profile, cond, speeds, corner=args.corner, **options)
    raise InputError(
        "give what to sweep: --radius FIRST:LAST:N (with --corner), "
        "--position NODE:DX:DY:N or --speeds FIRST:LAST:N"
    )


def _sweep_cell(arr, i, fmt, scale=1.0):
    return "n/a" if arr.mask[i] else format(float(arr.data[i]) * scale, fmt)


def _print_sweep(table, out):
    from profilebench.plotting.summary import format_table
    from profilebench.plotting.sweep_chart import axis_scale

    scale, label = axis_scale(table.parameter)
    verdicts = table.corner_verdicts() if table.corner is not None else (None,) * len(table)
    j = table.corner_nodes.index(table.corner) if table.corner in table.corner_nodes else None
    rows = []
    for i in range(len(table)):
        v = verdicts[i]
        rows.append(
            (
                f"{table.values[i] * scale:.1f}",
                _sweep_cell(table.cd, i, ".4f"),
                _sweep_cell(table.cda, i, ".4f"),
                _sweep_cell(table.force, i, ".1f"),
                _sweep_cell(table.power, i, ".2f", 1e-3),
                "" if v is None else v.value,
                "" if j is None or table.margins.mask[i, j] else f"{table.margins.data[i, j]:.2f}",
                table.status[i].value,
            )
        )
    print(
        format_table(
            (
                label,
                "Cd",
                "CdA (m^2)",
                "force (N)",
                "power (kW)",
                "corner verdict",
                "margin",
                "status",
            ),
            rows,
        ),
        file=out,
    )
    if table.knee is not None:
        print(f"knee: {table.knee.message}", file=out)
    if table.corner is not None:
        found = table.smallest_attached.compressed()
        if table.parameter == "radius":
            r = table.smallest_attached_radius
            print(
                f"smallest attached radius of {table.corner_label}: "
                + (
                    "not found ("
                    + (table.search_status[0].value if table.search_status[0] else "not searched")
                    + ")"
                    if r is None
                    else f"{r * 1e3:.1f} mm"
                ),
                file=out,
            )
        elif len(found):
            print(
                f"smallest attached radius of {table.corner_label}: "
                f"{found.min() * 1e3:.1f} to {found.max() * 1e3:.1f} mm over the points",
                file=out,
            )
    for i, status, message in table.failed:
        print(f"point {i + 1} ({table.values[i] * scale:.1f}): {status.value}: {message}", file=out)


def _cmd_sweep(args, out):
    from profilebench.studies import GridTable
    from profilebench.studies.export import write_sweep_csv

    _check_study_outputs(args)
    project = _load(args.file, args)
    cond = _conditions(project, args)
    result = _sweep_table(args, project, cond, args.workers, _terminal_progress("point"))
    tables = result.rows if isinstance(result, GridTable) else (result,)
    print(f"{project.profile.name} ({args.file})", file=out)
    for t in tables:
        print("", file=out)
        if isinstance(result, GridTable):
            print(f"speed {t.conditions[0].speed * 3.6:.1f} km/h", file=out)
        _print_sweep(t, out)
    total = sum(len(t) for t in tables)
    _print_run(result.stats, out, f"{total} points: ")
    if args.csv:
        write_sweep_csv(result, args.csv)
        print(f"table written: {args.csv}", file=out)
    if args.image:
        from profilebench.plotting.review import save_figure
        from profilebench.plotting.sweep_chart import grid_figure, sweep_figure

        fig = grid_figure(result) if isinstance(result, GridTable) else sweep_figure(result)
        save_figure(fig, args.image)
        print(f"image written: {args.image}", file=out)
    _caution(out)
    failed = sum(len(t.failed) for t in tables)
    if failed:
        raise _Failed(f"{failed} of {total} sweep points did not succeed (listed above)")
    return EXIT_OK


# --- variants ----------------------------------------------------------------------------------

VARIANTS_HELP = """\
Rank the named variants stored in a project file, or add one to it.

Every variant is analysed at the project's conditions (after the condition options given here),
so that the ranking compares shapes only. The variants are ranked by drag force when a frontal
area or width is known (a lower Cd can still mean more force when the frontal area grows), else
by Cd; --by chooses. With --width each variant's area is the width times its own height; a fixed
--area gives every variant the same area (the ranking by force is then the ranking by Cd).
Deltas are the variant minus the baseline variant (the project's, else the first; --baseline
chooses another for this ranking).

  --add NAME FILE   store FILE's profile (a project file's profile, or a CSV outline fitted as
                    'profilebench import' does) in PROJECT as the variant NAME, writing PROJECT
                    atomically (saved as format version 2); nothing is analysed

Exit codes: 0 every variant analysed, 1 some variant's analysis failed (the table shows which and
why; the files asked for are still written), 2 bad input (nothing written).
"""


def _add_variants_parser(sub):
    p = sub.add_parser(
        "variants",
        help="rank a project's variants by force, CdA and Cd against the baseline "
        "variant (table, CSV, review page), or add a variant",
        description=VARIANTS_HELP,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("file", metavar="PROJECT", help="the project file (.json) holding the variants")
    p.add_argument(
        "--add",
        nargs=2,
        metavar=("NAME", "FILE"),
        help="store FILE's profile (.json project or .csv outline) as the variant NAME",
    )
    p.add_argument("--note", help="with --add: a note kept with the variant")
    p.add_argument(
        "--simplify",
        type=float,
        metavar="MM",
        help="with --add of a CSV outline: the fit's tolerance in mm (default 5)",
    )
    p.add_argument("--baseline", metavar="NAME", help="rank against this variant instead")
    p.add_argument(
        "--by",
        choices=("force", "cda", "cd"),
        help="what to rank by, lowest first (default: force when an area is known, else cd)",
    )
    _add_study_options(
        p,
        "the variants",
        "the ranking, one row per variant (.csv)",
        "the variants review page (.png, .svg or .pdf)",
    )


def _variants_project(path):
    from profilebench.io.project import load_project

    if Path(str(path)).suffix.lower() != ".json":
        raise InputError(
            f"{path!r}: variants are kept in a project file (.json); import a CSV outline "
            "first with 'profilebench import OUTLINE.csv PROJECT.json'"
        )
    return load_project(path)


def _cmd_variants_add(args, out):
    import dataclasses

    from profilebench.geometry import explain
    from profilebench.io.project import Variant, check_variants, save_project

    name, source = args.add
    analysis_options = (
        "csv image baseline by workers speed transition h_separation panels table altitude area "
        "width base_from"
    ).split()
    given = [o for o in analysis_options if getattr(args, o, None) is not None]
    given += [o for o in ("no_ground", "no_side_relief") if getattr(args, o, False)]
    if given:
        option = "--" + given[0].replace("_", "-")
        raise InputError(
            f"--add stores a variant and analyses nothing: give {option} in a second "
            "call without --add (nothing was written)"
        )
    if args.simplify is not None and Path(source).suffix.lower() != ".csv":
        raise InputError(
            f"--simplify is the fit's tolerance of a CSV outline; {source!r} is not one "
            "(nothing was written)"
        )
    _check_outputs([("the project file", args.file)], [])  # FILE may be PROJECT itself
    project = _variants_project(args.file)
    added = _load(source, args)
    profile = added.profile
    problems = explain(profile, ground=project.conditions.ground)
    if problems:
        raise InputError(
            f"the profile of {source!r} is not a valid outline: {problems[0]}; nothing was written"
        )
    variant = Variant(name, profile, args.note or "")
    variants = check_variants(project.variants + (variant,), project.baseline_variant)
    save_project(dataclasses.replace(project, variants=variants), args.file)
    print(f"variant {name!r} added to {args.file} ({len(profile.nodes)} nodes)", file=out)
    print(f"{len(variants)} variant{'s' if len(variants) != 1 else ''}:", file=out)
    for i, v in enumerate(variants, start=1):
        base = v.name == (project.baseline_variant or variants[0].name)
        print(f"  {i}. {v.name}{' (baseline)' if base else ''}", file=out)
    return EXIT_OK


def _print_variants(table, out):
    from profilebench.plotting.summary import format_table
    from profilebench.plotting.variants_page import RANKING_COLUMNS, corner_matrix, ranking_rows

    print(table.key_reason, file=out)
    print("", file=out)
    print(format_table(RANKING_COLUMNS, ranking_rows(table)), file=out)
    header, rows = corner_matrix(table)
    if rows:
        print("", file=out)
        print("Corner verdicts (columns: the variants by rank)", file=out)
        print(format_table(header, rows), file=out)
    notes = list(table.notes)
    notes += [f"{r.name}: {w}" for r in table.rows for w in r.warnings]
    notes += [f"{r.name}: {r.status.value}: {r.message}" for r in table.failed]
    if notes:
        print("", file=out)
        for n in notes:
            print(f"note: {n}", file=out)


def _cmd_variants(args, out):
    if args.add is not None:
        return _cmd_variants_add(args, out)
    from profilebench.studies.export import write_variants_csv
    from profilebench.studies.variants import rank_project

    for option in ("note", "simplify"):
        if getattr(args, option) is not None:
            raise InputError(f"--{option} goes with --add NAME FILE")
    _check_study_outputs(args)
    project = _variants_project(args.file)
    if not project.variants:
        raise InputError(
            f"{args.file!r} holds no variants; add some first: profilebench variants "
            f"{args.file} --add NAME FILE"
        )
    cond = _conditions(project, args)
    baseline = project.baseline_variant
    if args.baseline is not None:
        baseline = project.variant(args.baseline).name
    import dataclasses

    table = rank_project(
        dataclasses.replace(project, baseline_variant=baseline),
        conditions=cond,
        key=args.by,
        workers=args.workers,
        progress=_terminal_progress("variant"),
        table=_user_table(args),
    )
    print(f"{len(table)} variants of {project.profile.name} ({args.file})", file=out)
    _print_variants(table, out)
    _print_run(table.stats, out)
    if args.csv:
        write_variants_csv(table, args.csv)
        print(f"table written: {args.csv}", file=out)
    if args.image:
        from profilebench.plotting.review import save_figure
        from profilebench.plotting.variants_page import variants_figure

        save_figure(variants_figure(table, title=f"Variants of {project.profile.name}"), args.image)
        print(f"image written: {args.image}", file=out)
    _caution(out)
    if table.failed:
        raise _Failed(
            f"{len(table.failed)} of {len(table)} variants did not succeed (listed above)"
        )
    return EXIT_OK


COMMANDS = {
    "analyse": _cmd_analyse,
    "variants": _cmd_variants,
    "analyze": _cmd_analyse,
    "compare": _cmd_compare,
    "corners": _cmd_corners,
    "import": _cmd_import,
    "samples": _cmd_samples,
    "bench": _cmd_bench,
    "sweep": _cmd_sweep,
}


def main(argv=None) -> int:
    """Run the command line with ``argv`` (default: sys.argv[1:]); return the exit code."""
    argv = list(sys.argv[1:] if argv is None else argv)
    if argv and argv[0].lower().endswith(".json") and argv[0] not in COMMANDS:
        return _start_editor(argv)  # profilebench PROJECT.json: open it in the editor
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # --help, --version, or a usage error (argparse printed it)
        return int(exc.code or 0)
    if args.command is None:
        return _start_editor(argv)
    out, err = _TerminalStream(sys.stdout), _TerminalStream(sys.stderr)
    try:
        _check_numbers(args)
        return COMMANDS[args.command](args, out)
    except ProfileBenchError as exc:
        print(f"profilebench: error: {_shorten_numbers(str(exc))}", file=err)
        return EXIT_BAD_INPUT
    except _Failed as exc:
        print(f"profilebench: {exc}", file=err)
        return EXIT_FAILED
    except KeyboardInterrupt:
        print(
            "\nprofilebench: interrupted (Ctrl-C); files being written were left as they were",
            file=err,
        )
        return EXIT_INTERRUPTED
    finally:
        out.flush()
        out.silence_if_broken()


def _shorten_numbers(message: str) -> str:
    """Very long digit runs in a message (a number echoed from the input) cut short."""
    return re.sub(
        r"\d{%d,}" % (SHOWN_NUMBER_CHARS + 1), lambda m: _short_number(m.group()), message
    )
