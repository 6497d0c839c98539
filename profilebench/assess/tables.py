"""Empirical drag versus r/t tables (published or in-house wind-tunnel data).

File format (our own), plain text CSV:

* header lines first, each ``# key: value``; required keys ``name``, ``source`` (full citation),
  ``reynolds_min`` and ``reynolds_max`` (the Reynolds range the data hold for, on the stated
  length), ``thickness`` (what t means) and ``quantity`` (what the second column is); optional
  ``critical_ratio`` (the r/t beyond which the drag stops falling, if the data show one) and
  ``notes``. A line holding only ``#`` is ignored.
* then the column row ``r_over_t,cd``;
* then at least two data rows, r/t strictly increasing, all values finite and >= 0.

Interpolation is monotone piecewise-cubic (scipy's PchipInterpolator, Fritsch & Carlson 1980):
between two points the curve stays between their values. Outside the tabulated r/t the value of
the nearest end point is held, and a :class:`~profilebench.errors.ProfileBenchWarning` says so
(:meth:`RtTable.lookup` also returns the flag); extrapolation is never silent.
"""

from __future__ import annotations

import math
import os
import warnings
from dataclasses import dataclass, field
from enum import Enum
from functools import lru_cache
from pathlib import Path

import numpy as np
from scipy.interpolate import PchipInterpolator

from profilebench.errors import InputError, ProfileBenchWarning, TableError, excerpt

__all__ = [
    "RtTable",
    "RtVerdict",
    "TableValue",
    "TableSelection",
    "load_table",
    "builtin_tables",
    "select_table",
    "RESOURCES_DIR",
    "FLAT_TOLERANCE",
    "REQUIRED_KEYS",
    "OPTIONAL_KEYS",
    "COLUMNS",
    "MAX_TABLE_BYTES",
]

RESOURCES_DIR = Path(__file__).resolve().parent.parent / "resources"
REQUIRED_KEYS = ("name", "source", "reynolds_min", "reynolds_max", "thickness", "quantity")
OPTIONAL_KEYS = ("critical_ratio", "notes")
COLUMNS = ("r_over_t", "cd")
#: Largest table file read (bytes): a table is a few kB; this refuses a wrong file (an image, a
#: device such as /dev/zero) before it is read into memory.
MAX_TABLE_BYTES = 4 * 1024 * 1024
# The curve "stops falling" at a point when no later point lies more than this fraction of the
# point's value below it (common practice, no source).
FLAT_TOLERANCE = 0.02


class RtVerdict(str, Enum):
    """A corner's r/t against a table's critical ratio."""

    BELOW = "below critical"
    AT_OR_ABOVE = "at or above critical"
    UNDETERMINED = "no critical ratio in the table's data"


@dataclass(frozen=True)
class TableValue:
    """One table look-up: r/t, the value there, whether it was held beyond the data, a message."""

    r_over_t: float
    cd: float
    extrapolated: bool
    message: str


@dataclass(frozen=True)
class TableSelection:
    """The table chosen for a Reynolds number.

    ``inside_range`` is False when the Reynolds number lies outside every table's range and the
    nearest table (in log10 Re) was taken; ``message`` then says so. For convenience it
    unpacks as ``table, outside_range = select_table(...)``.
    """

    table: "RtTable"
    reynolds: float
    inside_range: bool
    message: str

    @property
    def outside_range(self) -> bool:
        """True when the Reynolds number lies outside every candidate table's range."""
        return not self.inside_range

    def __iter__(self):
        return iter((self.table, self.outside_range))


@dataclass(frozen=True)
class RtTable:
    """A drag versus r/t table.

    Attributes
    ----------
    name, source, thickness, quantity, notes : str
        See the module docstring for the file keys.
    reynolds_min, reynolds_max : float
        Reynolds range the data hold for.
    ratios : tuple of float
        Tabulated r/t, strictly increasing, >= 0.
    values : tuple of float
        Tabulated Cd (or the stated quantity), >= 0.
    header_critical_ratio : float or None
        The critical r/t stated in the file, if any.
    path : str or None
        File the table was read from.
    """

    name: str
    source: str
    reynolds_min: float
    reynolds_max: float
    thickness: str
    quantity: str
    ratios: tuple[float, ...]
    values: tuple[float, ...]
    header_critical_ratio: float | None = None
    notes: str = ""
    path: str | None = None
    _interp: PchipInterpolator = field(init=False, repr=False, compare=False, hash=False)

    def __post_init__(self):
        where = self.path or self.name or "table"
        for key in ("name", "source", "thickness", "quantity"):
            if not isinstance(getattr(self, key), str) or not getattr(self, key).strip():
                raise TableError(f"{where}: '{key}' is empty; give it as text")
        x = np.asarray(self.ratios, dtype=float)
        y = np.asarray(self.values, dtype=float)
        if x.ndim != 1 or x.shape != y.shape:
            raise TableError(f"{where}: ratios and values must be 1-D and of equal length")
        if x.size < 2:
            raise TableError(f"{where}: a table needs at least 2 data rows, got {x.size}")
        if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
            raise TableError(f"{where}: the data hold a NaN or infinite value")
        if np.any(x < 0) or np.any(y < 0):
            raise TableError(f"{where}: r/t and the tabulated values must be >= 0")
        if np.any(np.diff(x) <= 0):
            raise TableError(f"{where}: r/t must be strictly increasing")
        for key in ("reynolds_min", "reynolds_max"):
            v = getattr(self, key)
            if (
                isinstance(v, bool)
                or not isinstance(v, (int, float))
                or not math.isfinite(v)
                or v <= 0
            ):
                raise TableError(f"{where}: {key} = {v!r} must be a finite number > 0")
        if self.reynolds_min >= self.reynolds_max:
            raise TableError(
                f"{where}: reynolds_min {self.reynolds_min:g} is not below reynolds_max "
                f"{self.reynolds_max:g}; give the range with the smaller value first"
            )
        cr = self.header_critical_ratio
        if cr is not None and not (x[0] <= cr <= x[-1]):
            raise TableError(
                f"{where}: critical_ratio {cr!r} lies outside the tabulated r/t "
                f"{x[0]:g}..{x[-1]:g}; give a ratio within the data or leave it out"
            )
        object.__setattr__(self, "ratios", tuple(float(v) for v in x))
        object.__setattr__(self, "values", tuple(float(v) for v in y))
        object.__setattr__(self, "_interp", PchipInterpolator(x, y, extrapolate=False))

    # ------------------------------------------------------------------ properties
    @property
    def r_over_t_range(self) -> tuple[float, float]:
        """Smallest and largest tabulated r/t."""
        return self.ratios[0], self.ratios[-1]

    @property
    def critical_ratio(self) -> float | None:
        """r/t beyond which the drag stops falling.

        From the header if stated; otherwise the first tabulated r/t that has at least one later
        point and no later point more than FLAT_TOLERANCE (2 %) of its value below it; None when
        the data show no such point (the drag still falls at the last point).
        """
        if self.header_critical_ratio is not None:
            return self.header_critical_ratio
        y = np.asarray(self.values)
        for i in range(len(y) - 1):
            if np.all(y[i] - y[i + 1 :] <= FLAT_TOLERANCE * y[i]):
                return self.ratios[i]
        return None

    @property
    def critical_ratio_basis(self) -> str:
        """Where :attr:`critical_ratio` comes from: "header", "data" or "none"."""
        if self.header_critical_ratio is not None:
            return "header"
        return "data" if self.critical_ratio is not None else "none"

    def contains(self, reynolds: float) -> bool:
        """True when reynolds_min <= reynolds <= reynolds_max."""
        return self.reynolds_min <= _ratio("reynolds", reynolds) <= self.reynolds_max

    # ------------------------------------------------------------------ look-ups
    def _evaluate(self, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        lo, hi = self.r_over_t_range
        outside = (x < lo) | (x > hi)
        held = np.clip(x, lo, hi)  # values held at the end points, flagged by `outside`
        return np.asarray(self._interp(held), dtype=float), outside

    def _warn(self, x: np.ndarray, outside: np.ndarray) -> str:
        lo, hi = self.r_over_t_range
        msg = (
            f"r/t {', '.join(f'{v:.4g}' for v in np.atleast_1d(x)[np.atleast_1d(outside)][:5])} "
            f"lies outside table '{self.name}' (r/t {lo:g}..{hi:g}); the end value is held there"
        )
        warnings.warn(msg, ProfileBenchWarning, stacklevel=3)
        return msg

    def cd(self, r_over_t):
        """Tabulated value at r/t, monotone PCHIP interpolation between points.

        Beyond the data the nearest end value is held and a ProfileBenchWarning is issued.

        Parameters
        ----------
        r_over_t : float or array
            Corner radius over thickness (>= 0).
        """
        x = _ratio_array("r_over_t", r_over_t)
        y, outside = self._evaluate(x)
        if np.any(outside):
            self._warn(x, outside)
        return float(y) if y.ndim == 0 else y

    def lookup(self, r_over_t: float) -> TableValue:
        """Value at one r/t with an explicit extrapolation flag and message (also warns)."""
        x = _ratio_array("r_over_t", r_over_t)
        if x.ndim != 0:
            raise InputError("lookup takes one r/t; use cd() for an array")
        y, outside = self._evaluate(x)
        if bool(outside):
            msg = self._warn(x, outside)
        else:
            msg = f"interpolated in table '{self.name}'"
        return TableValue(float(x), float(y), bool(outside), msg)

    def floor_ratio(self, attached_ratio: float | None = None) -> tuple[float, str]:
        """r/t at which the drag is taken to reach its floor, and where that comes from.

        ``attached_ratio`` (the solver's smallest attached r/t) if given ("solver"); else the
        critical ratio ("header" or "data"); else the last tabulated r/t ("last point", with a
        ProfileBenchWarning, since the drag is still falling there).
        """
        if attached_ratio is not None:
            return _ratio("attached_ratio", attached_ratio), "solver"
        cr = self.critical_ratio
        if cr is not None:
            return cr, self.critical_ratio_basis
        last = self.ratios[-1]
        warnings.warn(
            f"table '{self.name}' shows no critical ratio: its floor is taken at the last "
            f"tabulated r/t {last:g}, where the drag is still falling; give attached_ratio",
            ProfileBenchWarning,
            stacklevel=3,
        )
        return last, "last point"

    def penalty(self, r_over_t, attached_ratio: float | None = None):
        """Drag above the table's floor, cd(r/t) - cd(r/t_floor); 0 at and beyond the floor.

        The floor r/t is chosen by :meth:`floor_ratio`. Where a table rises again beyond a
        minimum (cd(r/t) < cd(floor) before the floor), the penalty is 0 there: it is defined as
        the excess over the floor, never a credit.

        Parameters
        ----------
        r_over_t : float or array
            Corner radius over thickness (>= 0).
        attached_ratio : float or None
            The solver's smallest attached r/t, used as the floor when given.
        """
        x = _ratio_array("r_over_t", r_over_t)
        x_floor, _ = self.floor_ratio(attached_ratio)
        below = x < x_floor
        out = np.zeros_like(x, dtype=float)
        if np.any(below):
            cd_floor = self.cd(x_floor)
            cd_x = self.cd(np.where(below, x, x_floor))
            out = np.where(below, np.maximum(cd_x - cd_floor, 0.0), 0.0)
        return float(out) if out.ndim == 0 else out

    def verdict(self, r_over_t: float) -> RtVerdict:
        """ "below critical" or "at or above critical" against :attr:`critical_ratio`.

        RtVerdict.UNDETERMINED when the table shows no critical ratio.
        """
        x = _ratio("r_over_t", r_over_t)
        cr = self.critical_ratio
        if cr is None:
            return RtVerdict.UNDETERMINED
        return RtVerdict.BELOW if x < cr else RtVerdict.AT_OR_ABOVE


def _ratio(name: str, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float, np.floating, np.integer)):
        raise InputError(f"{name} must be a number, got {value!r}; give a plain float")
    v = float(value)
    if not math.isfinite(v) or v < 0:
        raise InputError(f"{name} = {v!r} must be a finite number >= 0")
    return v


def _ratio_array(name: str, value) -> np.ndarray:
    if value is None or isinstance(value, (bool, str)):
        raise InputError(f"{name} must be a number or an array of numbers, got {value!r}")
    try:
        x = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number or an array of numbers, got {value!r}") from None
    if not np.all(np.isfinite(x)) or np.any(x < 0):
        raise InputError(f"{name} must be finite and >= 0, got {value!r}")
    return x


# ---------------------------------------------------------------------- file reading
def load_table(path) -> RtTable:
    """Read and check an r/t table file (format in the module docstring).

    Raises
    ------
    TableError
        For a missing file, a folder, a device or pipe, a file over :data:`MAX_TABLE_BYTES`;
        and with the file name, the line number and how to fix it: a missing or unknown header key,
        a non-numeric cell, fewer than 2 data rows, r/t not strictly increasing, a negative
        value, reynolds_min >= reynolds_max.
    """
    from profilebench.errors import ProjectFileError
    from profilebench.input_files import read_input_bytes

    p = Path(path)
    fname = p.name
    try:
        if not os.path.lexists(p):
            raise TableError(f"{p}: no such table file; check the path")
        # bounded: a device (/dev/zero), a pipe or a huge file is refused before it is read
        raw = read_input_bytes(p, "table file", "choose an r/t table CSV file", MAX_TABLE_BYTES)
        text = raw.decode("utf-8")
    except ProjectFileError as exc:
        raise TableError(str(exc)) from None
    except UnicodeDecodeError as exc:
        raise TableError(
            f"{p}: cannot be read as UTF-8 text ({exc}); save it as a text CSV"
        ) from None

    def err(line_no, what, fix):
        return TableError(f"{fname}, line {line_no}: {what}; {fix}")

    header: dict[str, tuple[str, int]] = {}
    allowed = REQUIRED_KEYS + OPTIONAL_KEYS
    columns_line = None
    rows: list[tuple[float, float, int]] = []
    last_line = 0
    for n, raw in enumerate(text.splitlines(), start=1):
        last_line = n
        line = raw.strip()
        if not line:
            continue
        if line.startswith("#"):
            if columns_line is not None:
                raise err(
                    n,
                    "a '#' header line after the column row",
                    "put every '# key: value' line before the 'r_over_t,cd' row",
                )
            body = line[1:].strip()
            if not body:
                continue
            if ":" not in body:
                raise err(
                    n,
                    f"header line {excerpt(body)} is not 'key: value'",
                    f"write it as '# key: value' with a key among {', '.join(allowed)}",
                )
            key, value = (s.strip() for s in body.split(":", 1))
            key = key.lower()
            if key not in allowed:
                raise err(n, f"unknown header key {key!r}", f"use one of {', '.join(allowed)}")
            if key in header:
                raise err(
                    n,
                    f"header key {key!r} given twice (first on line {header[key][1]})",
                    "keep one",
                )
            if not value:
                raise err(n, f"header key {key!r} has no value", "give its value after the colon")
            header[key] = (value, n)
            continue
        if columns_line is None:
            cells = [c.strip().lower() for c in line.split(",")]
            if tuple(cells) != COLUMNS:
                raise err(
                    n,
                    f"column row {excerpt(line)} is not 'r_over_t,cd'",
                    "put the row 'r_over_t,cd' after the header lines",
                )
            columns_line = n
            continue
        cells = [c.strip() for c in line.split(",")]
        if len(cells) != 2:
            raise err(n, f"row {excerpt(line)} has {len(cells)} cells", "give two: r_over_t,cd")
        nums = []
        for col, cell in zip(COLUMNS, cells):
            try:
                v = float(cell)
            except ValueError:
                raise err(
                    n,
                    f"{col} cell {excerpt(cell)} is not a number",
                    "write a plain decimal number such as 0.17",
                ) from None
            if not math.isfinite(v):
                raise err(n, f"{col} cell {excerpt(cell)} is not finite", "give a finite number")
            if v < 0:
                raise err(n, f"{col} = {v:g} is negative", "give a value >= 0")
            nums.append(v)
        if rows and nums[0] <= rows[-1][0]:
            raise err(
                n,
                f"r_over_t {nums[0]:g} does not exceed {rows[-1][0]:g} on line {rows[-1][2]}",
                "list r/t strictly increasing, one row per ratio",
            )
        rows.append((nums[0], nums[1], n))

    missing = [k for k in REQUIRED_KEYS if k not in header]
    if missing:
        raise err(
            1,
            f"missing header key(s) {', '.join(missing)}",
            "add a '# key: value' line for each before the column row",
        )
    if columns_line is None:
        raise err(
            last_line or 1,
            "no column row 'r_over_t,cd'",
            "add the row 'r_over_t,cd' after the header and the data rows after it",
        )
    if len(rows) < 2:
        raise err(last_line, f"only {len(rows)} data row(s)", "give at least 2 rows r_over_t,cd")

    def number(key):
        value, n = header[key]
        try:
            v = float(value)
        except ValueError:
            raise err(
                n, f"{key} {excerpt(value)} is not a number", "give a plain number such as 1e5"
            ) from None
        if not math.isfinite(v) or v <= 0:
            raise err(n, f"{key} = {excerpt(value)} must be a finite number > 0", "correct it")
        return v

    re_min, re_max = number("reynolds_min"), number("reynolds_max")
    if re_min >= re_max:
        raise err(
            header["reynolds_max"][1],
            f"reynolds_min {re_min:g} is not below reynolds_max {re_max:g}",
            "give the Reynolds range with reynolds_min < reynolds_max",
        )
    crit = None
    if "critical_ratio" in header:
        value, n = header["critical_ratio"]
        try:
            crit = float(value)
        except ValueError:
            raise err(
                n,
                f"critical_ratio {excerpt(value)} is not a number",
                "give a plain number or leave the key out",
            ) from None
        if not (rows[0][0] <= crit <= rows[-1][0]):
            raise err(
                n,
                f"critical_ratio {crit:g} lies outside the tabulated r/t "
                f"{rows[0][0]:g}..{rows[-1][0]:g}",
                "give a ratio within the data or leave the key out",
            )
    return RtTable(
        name=header["name"][0],
        source=header["source"][0],
        reynolds_min=re_min,
        reynolds_max=re_max,
        thickness=header["thickness"][0],
        quantity=header["quantity"][0],
        ratios=tuple(r[0] for r in rows),
        values=tuple(r[1] for r in rows),
        header_critical_ratio=crit,
        notes=header.get("notes", ("", 0))[0],
        path=str(p),
    )


@lru_cache(maxsize=1)
def _builtin(directory: str) -> tuple[RtTable, ...]:
    return tuple(load_table(f) for f in sorted(Path(directory).glob("*.csv")))


def builtin_tables() -> tuple[RtTable, ...]:
    """Every table shipped in profilebench/resources/ (files ``*.csv``), sorted by file name."""
    return _builtin(str(RESOURCES_DIR))


def select_table(reynolds: float, tables=None) -> TableSelection:
    """The table whose Reynolds range holds ``reynolds``, else the nearest in log10(Re).

    Parameters
    ----------
    reynolds : float
        Reynolds number (> 0) on the length the tables state.
    tables : sequence of RtTable, optional
        Candidates; default :func:`builtin_tables`. Among several holding the value, the one
        whose range is narrowest (in log10 Re) is taken.
    """
    re = _ratio("reynolds", reynolds)
    if re <= 0:
        raise InputError(f"reynolds = {re!r} must be > 0")
    cands = tuple(builtin_tables() if tables is None else tables)
    if not cands:
        raise TableError("no r/t table to choose from; give at least one table (see load_table)")
    inside = [t for t in cands if t.contains(re)]
    if inside:
        best = min(inside, key=lambda t: math.log10(t.reynolds_max / t.reynolds_min))
        return TableSelection(
            best,
            re,
            True,
            f"Re {re:.3g} lies in table '{best.name}' "
            f"({best.reynolds_min:.3g}..{best.reynolds_max:.3g})",
        )

    def distance(t):
        lr = math.log10(re)
        return min(abs(lr - math.log10(t.reynolds_min)), abs(lr - math.log10(t.reynolds_max)))

    best = min(cands, key=distance)
    return TableSelection(
        best,
        re,
        False,
        f"Re {re:.3g} lies outside every table's range; the nearest, '{best.name}' "
        f"({best.reynolds_min:.3g}..{best.reynolds_max:.3g}), is used: read its values with care",
    )
