"""Point import and export: digitised outlines as CSV, and editable profiles made from them.

Reading rules (:func:`import_points_csv`):

- Blank lines are skipped; ``#`` starts a comment (a whole line or the rest of a line).
- Separator: tab if the first data line has a tab, else semicolon if it has one, else comma if
  it has one, else runs of spaces. With a tab or semicolon separator a decimal comma is accepted
  (``1,25;0,30``).
- An optional header row: a first row whose cells are all non-numeric (e.g. ``x,y`` or
  ``x_mm;y_mm`` or ``x [m]\\ty [m]``). With more than two columns the header must name an ``x``
  and a ``y`` column; without a header there must be exactly two columns.
- Units: ``units="mm"`` or ``"m"`` says so. ``units="auto"`` decides in this order: (1) a header
  naming units (``mm``/``millimetre(s)`` or ``m``/``metre(s)``/``meter(s)`` as a word, e.g.
  ``x_mm``, ``y (m)``); (2) otherwise the largest extent (x range or y range): above 50 the values
  are taken as millimetres, else metres. 50 works because a road vehicle is under 50 m long while
  even a 1:50 model measured in millimetres spans more than 50 mm (common practice, no source).
  The decision and its reason come back in :class:`PointImport`. An explicit unit that contradicts
  the header is an error.
- Non-numeric cells are reported with their line and column; NaN/infinite values, points beyond
  10 km, fewer than 3 points and more than :data:`MAX_POINTS` are refused.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from profilebench.errors import InputError, ProjectFileError, excerpt
from profilebench.geometry.profile import MAX_COORDINATE, Node, Profile
from profilebench.io.atomic import atomic_write_text, read_input_bytes

__all__ = [
    "MM_THRESHOLD",
    "MAX_POINTS_BYTES",
    "MAX_POINTS",
    "PointImport",
    "import_points_csv",
    "read_points_csv",
    "write_points_csv",
    "profile_from_points",
]

#: auto units: an extent above this (in file units) means millimetres.
MM_THRESHOLD = 50.0
#: Largest point file read (bytes), refused before reading.
MAX_POINTS_BYTES = 20 * 1024 * 1024
#: Most points read from a point file. A digitised side outline has hundreds to a few thousand
#: points; fitting an outline of 20000 took 45 s (measured), so more is refused with a remedy
#: rather than left to run for minutes.
MAX_POINTS = 10000

_MM_WORDS = {"mm", "millimetre", "millimetres", "millimeter", "millimeters"}
_M_WORDS = {"m", "metre", "metres", "meter", "meters"}


@dataclass(frozen=True)
class PointImport:
    """The result of reading a point file.

    Attributes
    ----------
    points : ndarray, shape (N, 2)
        The points in metres, in file order.
    units : str
        "mm" or "m": the unit of the numbers in the file.
    units_reason : str
        Why that unit was chosen (asked for, header, or extent rule).
    delimiter : str
        The separator found: "," ";" "\\t" or " " (spaces).
    decimal_comma : bool
        Whether decimal commas were read.
    header : tuple of str or None
        The header cells, if there was a header row.
    """

    points: np.ndarray
    units: str
    units_reason: str
    delimiter: str
    decimal_comma: bool
    header: tuple[str, ...] | None


def _split(line: str, delimiter: str) -> list[str]:
    if delimiter == " ":
        return line.split()
    cells = [c.strip() for c in line.split(delimiter)]
    if len(cells) > 1 and cells[-1] == "":
        cells = cells[:-1]  # a trailing separator
    return cells


def _to_float(cell: str, delimiter: str):
    """(value, used_decimal_comma) or None when the cell is not a number."""
    used_comma = False
    text = cell
    if delimiter != "," and "," in text:
        text = text.replace(",", ".")
        used_comma = True
    try:
        return float(text), used_comma
    except ValueError:
        return None


def _header_unit(cells) -> str | None:
    found = set()
    for cell in cells:
        words = set(re.findall(r"[a-z]+", cell.lower()))
        if words & _MM_WORDS:
            found.add("mm")
        if words & _M_WORDS:
            found.add("m")
    if len(found) > 1:
        raise ProjectFileError(
            f"the header {list(cells)} names both mm and m; use one unit for x and y"
        )
    return found.pop() if found else None


def _axis_columns(cells) -> tuple[int, int] | None:
    xs = [i for i, c in enumerate(cells) if (re.findall(r"[a-z]+", c.lower()) or [""])[0] == "x"]
    ys = [i for i, c in enumerate(cells) if (re.findall(r"[a-z]+", c.lower()) or [""])[0] == "y"]
    if len(xs) == 1 and len(ys) == 1:
        return xs[0], ys[0]
    return None


def import_points_csv(path, units: str = "auto") -> PointImport:
    """Read a digitised outline from a CSV-like text file (rules in the module docstring).

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    units : {"auto", "mm", "m"}
        Unit of the numbers in the file; "auto" decides from the header or the extent.

    Returns
    -------
    PointImport
        Points in metres with what was decided about the file.

    Raises
    ------
    ProjectFileError
        Unreadable file, non-numeric cell (line and column named), wrong column count, NaN,
        fewer than 3 points, contradictory units.
    InputError
        ``units`` is not one of "auto", "mm", "m".
    """
    if units not in ("auto", "mm", "m"):
        raise InputError(f"units must be 'auto', 'mm' or 'm', got {units!r}")
    p = Path(path)
    shown = str(p)
    raw = read_input_bytes(p, "point file", "choose a CSV point file", MAX_POINTS_BYTES)
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise ProjectFileError(
            f"{shown!r} is not UTF-8 text (byte {exc.start}); save it as UTF-8 CSV"
        ) from exc

    lines = []  # (line number, content without comment)
    for number, line in enumerate(text.splitlines(), start=1):
        content = line.split("#", 1)[0].strip()
        if content:
            lines.append((number, content))
    if not lines:
        raise ProjectFileError(
            f"{shown!r} holds no points (only blank lines or comments); "
            "choose the CSV file that holds the x, y columns"
        )

    first = lines[0][1]
    delimiter = "\t" if "\t" in first else ";" if ";" in first else "," if "," in first else " "

    header = None
    first_cells = _split(first, delimiter)
    if all(_to_float(c, delimiter) is None for c in first_cells):
        header = tuple(first_cells)
        lines = lines[1:]
    columns = (0, 1)
    if header is not None:
        cols = _axis_columns(header)
        if cols is not None:
            columns = cols
        elif len(header) != 2:
            raise ProjectFileError(
                f"{shown!r} line 1: the header has {len(header)} columns {list(header)}; name "
                "exactly one 'x' and one 'y' column, or give two columns only"
            )
        # else: two columns whose header names no x and y: taken as x, y in that order
    ncols = len(header) if header is not None else 2

    if len(lines) > MAX_POINTS:  # the header row is already taken off
        raise ProjectFileError(
            f"{shown!r} has {len(lines)} points, over the limit of {MAX_POINTS} for an "
            "outline; thin it out (keep every second or tenth point) and import it again"
        )
    rows, row_lines = [], []
    decimal_comma = False
    for number, content in lines:
        cells = _split(content, delimiter)
        if len(cells) != ncols:
            raise ProjectFileError(
                f"{shown!r} line {number}: {len(cells)} column(s), expected {ncols}"
                + (" (x, y)" if ncols == 2 else f" as in the header {list(header)}")
                + "; fix that line or remove it"
            )
        values = []
        for col in columns:
            parsed = _to_float(cells[col], delimiter)
            if parsed is None:
                raise ProjectFileError(
                    f"{shown!r} line {number}, column {col + 1}: {excerpt(cells[col])} is not a "
                    "number; fix that cell or remove the line"
                )
            value, used = parsed
            if not math.isfinite(value):
                raise ProjectFileError(
                    f"{shown!r} line {number}, column {col + 1}: {excerpt(cells[col])} is not a "
                    "finite number; remove or fix that point"
                )
            decimal_comma |= used
            values.append(value)
        rows.append(values)
        row_lines.append(number)
    if len(rows) < 3:
        raise ProjectFileError(
            f"{shown!r} has {len(rows)} point(s); an outline needs at least 3: add points"
        )
    pts = np.asarray(rows, dtype=float)

    header_unit = _header_unit(header) if header is not None else None
    if units != "auto":
        if header_unit is not None and header_unit != units:
            raise ProjectFileError(
                f"{shown!r}: units={units!r} was asked for but the header {list(header)} says "
                f"{header_unit!r}; fix the header or ask for {header_unit!r}"
            )
        chosen, reason = units, f"units={units!r} was asked for"
    elif header_unit is not None:
        chosen, reason = header_unit, f"the header {list(header)} names {header_unit}"
    else:
        extent = float(np.max(np.ptp(pts, axis=0)))
        if extent > MM_THRESHOLD:
            chosen = "mm"
            reason = f"largest extent {extent:.6g} > {MM_THRESHOLD:g}, so millimetres"
        else:
            chosen = "m"
            reason = f"largest extent {extent:.6g} <= {MM_THRESHOLD:g}, so metres"
    if chosen == "mm":
        pts = pts / 1000.0
    beyond = np.flatnonzero(np.any(np.abs(pts) > MAX_COORDINATE, axis=1))
    if beyond.size:
        k = int(beyond[0])
        raise ProjectFileError(
            f"{shown!r} line {row_lines[k]}: the point ({rows[k][0]:.4g}, {rows[k][1]:.4g}) {chosen} "
            f"lies beyond {MAX_COORDINATE:g} m from the origin, farther than any vehicle; fix "
            "that point, or give the unit (units='mm' or 'm') if it was misread"
        )
    return PointImport(pts, chosen, reason, delimiter, decimal_comma, header)


def read_points_csv(path, units: str = "auto") -> np.ndarray:
    """Read a digitised outline; the (N, 2) points in metres (see :func:`import_points_csv`)."""
    return import_points_csv(path, units).points


def write_points_csv(path, points, units: str = "m") -> Path:
    """Write (N, 2) points (m) as a CSV with a header naming the unit, atomically.

    ``units`` ("m" or "mm") is the unit written in the file. Values keep full precision, so
    :func:`read_points_csv` reads back the same numbers.
    """
    if units not in ("m", "mm"):
        raise InputError(f"units must be 'm' or 'mm', got {units!r}")
    pts = _as_points(points, minimum=1)
    factor = 1000.0 if units == "mm" else 1.0

    def write(fh):
        fh.write(f"x_{units},y_{units}\n")
        for x, y in pts * factor:
            fh.write(f"{float(x)!r},{float(y)!r}\n")

    return atomic_write_text(path, write)


def _as_points(points, minimum: int = 3) -> np.ndarray:
    try:
        pts = np.asarray(points, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputError(f"points must be an (N, 2) array of numbers: {exc}") from exc
    if pts.ndim != 2 or pts.shape[1] != 2:
        raise InputError(f"points must have shape (N, 2), got {pts.shape}")
    if not np.all(np.isfinite(pts)):
        bad = int(np.argwhere(~np.isfinite(pts))[0][0])
        raise InputError(f"point {bad} is {pts[bad].tolist()}: not finite; remove or fix it")
    if len(pts) < minimum:
        raise InputError(f"{len(pts)} point(s) given; at least {minimum} needed")
    return pts


def _turning_angles(pts: np.ndarray) -> np.ndarray:
    """Turning angle at each vertex of a closed polygon (degrees, 0 = straight on)."""
    d_in = pts - np.roll(pts, 1, axis=0)
    d_out = np.roll(pts, -1, axis=0) - pts
    cross = d_in[:, 0] * d_out[:, 1] - d_in[:, 1] * d_out[:, 0]
    dot = np.einsum("ij,ij->i", d_in, d_out)
    return np.degrees(np.abs(np.arctan2(cross, dot)))


def profile_from_points(
    points,
    name: str = "imported",
    simplify_tolerance: float | None = None,
    sharp_angle: float = 30.0,
) -> Profile:
    """An editable profile with nodes at the given outline points.

    Parameters
    ----------
    points : array_like, shape (N, 2)
        Outline points in metres, in order round the outline (the order is kept). A last point
        equal to the first (a closed list) and repeated consecutive points are dropped.
    name : str
        Profile name.
    simplify_tolerance : float or None
        If given (m, > 0), the outline is first reduced with the Douglas-Peucker algorithm
        (``shapely`` ``simplify`` with topology preserved): no dropped point lies farther than
        this from the reduced outline (checked; a tolerance too large for that raises
        InputError). The reduced outline may start at another of the points. Use it to turn a dense digitised outline into a handful
        of draggable nodes.
    sharp_angle : float
        Turning angle (degrees, 0 < angle < 180) above which a node is a sharp corner (radius 0);
        nodes turning by this much or less are smooth (a spline passes through them).

    Raises
    ------
    InputError
        Bad points, tolerance or angle, or fewer than 3 distinct nodes left.
    """
    pts = _as_points(points)
    if not (
        isinstance(sharp_angle, (int, float))
        and not isinstance(sharp_angle, bool)
        and 0.0 < sharp_angle < 180.0
    ):
        raise InputError(f"sharp_angle must be between 0 and 180 degrees, got {sharp_angle!r}")
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(pts[1:] != pts[:-1], axis=1)
    pts = pts[keep]
    if len(pts) > 1 and np.array_equal(pts[0], pts[-1]):
        pts = pts[:-1]
    if len(pts) < 3:
        raise InputError(f"only {len(pts)} distinct point(s); an outline needs at least 3")
    if simplify_tolerance is not None:
        tol = simplify_tolerance
        if (
            isinstance(tol, bool)
            or not isinstance(tol, (int, float))
            or not math.isfinite(tol)
            or tol <= 0
        ):
            raise InputError(
                f"simplify_tolerance must be a positive distance in metres or None, got {tol!r}"
            )
        import shapely
        from shapely.geometry import LinearRing

        ring = LinearRing(pts).simplify(float(tol), preserve_topology=True)
        reduced = np.asarray(ring.coords, dtype=float)[:-1]
        # With topology preserved GEOS never returns fewer than a triangle, even when that
        # triangle is farther than the tolerance from the outline: check the bound here.
        deviation = float(np.max(shapely.distance(shapely.points(pts), ring)))
        if len(reduced) < 3 or deviation > tol * (1 + 1e-9):
            raise InputError(
                f"simplify_tolerance {tol!r} m is too large for this outline: the reduced "
                f"outline would lie up to {deviation:.4g} m from the points; use a smaller "
                "tolerance"
            )
        pts = reduced
    turn = _turning_angles(pts)
    nodes = tuple(
        Node(float(x), float(y), 0.0, bool(a <= sharp_angle)) for (x, y), a in zip(pts, turn)
    )
    return Profile(nodes, name=name)
