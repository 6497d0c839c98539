"""Sweeps: one corner's radius, one node's position along a direction, the speed, and a grid of
radius and speed; each point analysed by :func:`profilebench.assess.analysis.analyze`.

Every sweep returns a frozen :class:`SweepTable` (a grid, a :class:`GridTable` of one radius
sweep per speed): read-only numpy arrays of the parameter, Cd and its parts, CdA, force and power,
per-point statuses and messages, each corner's verdict and margin per point, and the watched
corner's smallest attached radius. A point whose analysis failed keeps its status and message and
its numbers are masked (``numpy.ma``): no NaN stands for a missing number.

The knee of a radius sweep (:func:`find_knee`) is the smallest swept radius from which Cd stays
within 2% of its attached value to the end of the range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.assess.conditions import Conditions
from profilebench.assess.corners import largest_fitting_radius
from profilebench.assess.results import SearchStatus, Verdict
from profilebench.errors import GeometryError, InputError
from profilebench.geometry.profile import Profile
from profilebench.studies.points import DRAG_FIELDS, PointSpec, PointStatus
from profilebench.studies.runner import RunStats, run_points

__all__ = [
    "Knee",
    "SweepTable",
    "GridTable",
    "KNEE_TOLERANCE",
    "LARGEST_FITTING_SHARE",
    "radius_range",
    "corner_node",
    "find_knee",
    "radius_sweep",
    "position_sweep",
    "speed_sweep",
    "radius_speed_grid",
    "ATTACHED_VERDICTS",
    "SweepPlan",
    "radius_plan",
    "position_plan",
    "speed_plan",
]

#: Cd within this fraction of its attached value counts as settled (the issue's 2%)
KNEE_TOLERANCE = 0.02
#: a sweep "to the largest radius that fits" stops at this share of it, so that the last radius
#: still builds (the smallest-attached-radius search stops there too)
LARGEST_FITTING_SHARE = 0.999
#: verdicts counted as attached (a laminar bubble that reattaches keeps the flow on the body, as
#: the smallest-attached-radius search counts it)
ATTACHED_VERDICTS = (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES)
#: most points one study runs (a slip in a count, not a study: 100 x 100 is 10000)
MAX_POINTS = 10000


def _frozen(array):
    array.flags.writeable = False
    return array


def _masked(values):
    """A read-only masked float array of ``values`` (None masked, its data 0.0, never NaN)."""
    mask = np.array([v is None for v in values], dtype=bool)
    data = np.array([0.0 if v is None else float(v) for v in values], dtype=float)
    out = np.ma.MaskedArray(_frozen(data), mask=_frozen(mask))
    return out


@dataclass(frozen=True)
class Knee:
    """The knee of a radius sweep.

    ``radius`` (m) is the smallest swept radius from which every successful point's Cd lies
    within ``tolerance`` (a fraction) of ``attached_cd`` up to the end of the range;
    ``bracket`` is (the swept radius before it, the knee): the knee lies between them, so the
    sweep's step is its resolution. ``attached_cd`` is the *attached value*: the median Cd of
    the ``attached_points`` successful points at which the swept corner is attached (the verdict
    attached, or a laminar bubble that reattaches). The median, not the Cd at the largest
    radius, so that the slow fall of Cd with a still larger radius, once attached, does not move
    the knee to the end of the range. Without a knee in the range, ``radius`` is None and
    ``message`` says why.
    """

    found: bool
    radius: float | None
    bracket: tuple[float, float] | None
    attached_cd: float | None
    attached_points: int
    tolerance: float
    message: str


def find_knee(radii, cd, verdicts, tolerance=KNEE_TOLERANCE):
    """The :class:`Knee` of Cd against radius (m).

    ``cd`` is a masked array (masked: a failed point, left out); ``verdicts`` the swept corner's
    :class:`Verdict` per point (None for a failed point). See :class:`Knee` for the definitions.
    """
    radii = np.asarray(radii, dtype=float)
    cd = np.ma.asarray(cd)
    ok = [i for i in range(len(radii)) if not np.ma.getmaskarray(cd)[i]]
    attached = [i for i in ok if verdicts[i] in ATTACHED_VERDICTS]

    def none(why, value=None):
        return Knee(False, None, None, value, len(attached), tolerance, f"no knee in range: {why}")

    if len(ok) < 2:
        return none(f"{len(ok)} of {len(radii)} points succeeded; a knee needs at least two")
    if not attached:
        return none(
            f"the corner separates at every swept radius up to {radii[ok[-1]] * 1e3:.0f} mm,"
            " so Cd has no attached value; sweep to larger radii"
        )
    value = float(np.median([float(cd[i]) for i in attached]))
    band = tolerance * abs(value)
    outside = [i for i in ok if abs(float(cd[i]) - value) > band]
    what = (
        f"its attached value {value:.4f} (the median over the {len(attached)} points where "
        "the corner is attached)"
    )
    if not outside:
        return none(
            f"Cd stays within {tolerance:.0%} of {what} over the whole range: the knee "
            f"lies at or below the smallest swept radius, {radii[ok[0]] * 1e3:.0f} mm",
            value,
        )
    after = [i for i in ok if i > outside[-1]]
    if len(after) < 2:
        return none(
            f"Cd is still more than {tolerance:.0%} away from {what} at "
            f"{radii[outside[-1]] * 1e3:.0f} mm, with fewer than two points after it: Cd "
            "keeps changing with the radius; sweep a wider range or read the curve",
            value,
        )
    k = after[0]
    r_k, r_before = float(radii[k]), float(radii[outside[-1]])
    failed = len(radii) - len(ok)
    note = f"; {failed} failed points left out" if failed else ""
    return Knee(
        True,
        r_k,
        (r_before, r_k),
        value,
        len(attached),
        tolerance,
        f"knee at {r_k * 1e3:.0f} mm (between {r_before * 1e3:.0f} and {r_k * 1e3:.0f} mm):"
        f" from there Cd stays within {tolerance:.0%} of {what}{note}",
    )


@dataclass(frozen=True)
class SweepTable:
    """The points of a one-parameter sweep, in sweep order.

    Attributes
    ----------
    parameter : str
        "radius" (m, the corner's radius), "displacement" (m, of the node along the direction)
        or "speed" (m/s).
    values : ndarray
        The parameter at each point (SI units), read-only.
    corner : int or None
        The swept or watched corner's node; ``corner_label`` its name.
    status, messages : tuple
        Each point's :class:`PointStatus` and message.
    cd, cd_friction, cd_pressure, cd_base, cd_corners, cda, force, power : numpy.ma.MaskedArray
        Per point (section Cd on the frontal height; CdA m^2, force N, power W), masked where the
        point failed (and CdA, force, power where no frontal area or width was given).
    corner_nodes, corner_labels : tuple
        The corners reported at any point (columns of ``verdicts`` and ``margins``).
    verdicts : ndarray of object
        (points, corners) :class:`Verdict`, None where the point failed or lacks the corner.
    margins : numpy.ma.MaskedArray
        (points, corners) separation margins (0..1).
    smallest_attached : numpy.ma.MaskedArray
        The watched corner's smallest attached radius (m) per point, masked where the search did
        not find one (``search_status`` says why: none fits, failed, or not searched).
    profiles, conditions : tuple
        The variant analysed at each point (for loading a point into the editor).
    positions : ndarray or None
        (points, 2) the moved node's x, y (m) for a position sweep.
    knee : Knee or None
        Of a radius sweep.
    stats : RunStats
        Points analysed now and taken from the cache, cancelled or not, wall time.
    """

    parameter: str
    values: np.ndarray
    corner: int | None
    corner_label: str
    status: tuple
    messages: tuple
    cd: np.ma.MaskedArray
    cd_friction: np.ma.MaskedArray
    cd_pressure: np.ma.MaskedArray
    cd_base: np.ma.MaskedArray
    cd_corners: np.ma.MaskedArray
    cda: np.ma.MaskedArray
    force: np.ma.MaskedArray
    power: np.ma.MaskedArray
    corner_nodes: tuple
    corner_labels: tuple
    verdicts: np.ndarray
    margins: np.ma.MaskedArray
    smallest_attached: np.ma.MaskedArray
    search_status: tuple
    profiles: tuple
    conditions: tuple
    positions: np.ndarray | None
    knee: Knee | None
    stats: RunStats

    def __len__(self):
        return len(self.values)

    @property
    def ok(self) -> np.ndarray:
        """True at the points whose analysis succeeded."""
        return np.array([s is PointStatus.SUCCESS for s in self.status], dtype=bool)

    @property
    def cancelled(self) -> bool:
        return self.stats.cancelled

    @property
    def failed(self) -> tuple:
        """(index, status, message) of every point that did not succeed (cancelled ones too)."""
        return tuple(
            (i, s, m)
            for i, (s, m) in enumerate(zip(self.status, self.messages))
            if s is not PointStatus.SUCCESS
        )

    def corner_verdicts(self, node=None) -> tuple:
        """The verdict of corner ``node`` (default the watched corner) at each point (None where
        the point failed)."""
        node = self.corner if node is None else node
        if node not in self.corner_nodes:
            return (None,) * len(self)
        j = self.corner_nodes.index(node)
        return tuple(self.verdicts[:, j])

    @property
    def smallest_attached_radius(self) -> float | None:
        """For a radius sweep: the swept corner's smallest attached radius (m), which does not
        depend on that corner's own radius (the same at every point), or None if not found."""
        found = [float(v) for v in self.smallest_attached.compressed()]
        return found[0] if found else None


def _table(parameter, values, specs, results, stats, corner, corner_label, positions=None):
    nodes = sorted({c.node for r in results for c in r.corners})
    labels = {}
    for r in results:
        for c in r.corners:
            labels.setdefault(c.node, c.label)
    n, m = len(results), len(nodes)
    verdicts = np.empty((n, m), dtype=object)
    margin_rows = []
    for i, r in enumerate(results):
        by_node = {c.node: c for c in r.corners}
        row = []
        for j, node in enumerate(nodes):
            c = by_node.get(node)
            verdicts[i, j] = None if c is None else c.verdict
            row.append(None if c is None else c.margin)
        margin_rows.append(row)
    margins = np.ma.MaskedArray(
        _frozen(
            np.array(
                [[0.0 if v is None else v for v in row] for row in margin_rows], dtype=float
            ).reshape(n, m)
        ),
        mask=_frozen(
            np.array([[v is None for v in row] for row in margin_rows], dtype=bool).reshape(n, m)
        ),
    )
    searches = [r.search for r in results]
    if parameter == "radius":
        # one search serves the sweep: the corner's smallest attached radius is the same at
        # every radius of its own (see radius_plan)
        shared = next((s for s in searches if s is not None), None)
        searches = [shared] * len(searches)
    smallest = _masked(
        [
            s.radius
            if s is not None and s.status is SearchStatus.FOUND
            else (0.0 if s is not None and s.status is SearchStatus.ALWAYS_ATTACHED else None)
            for s in searches
        ]
    )
    drag = {f: _masked([getattr(r, f) for r in results]) for f in DRAG_FIELDS}
    label = corner_label or (labels.get(corner, "") if corner is not None else "")
    table = SweepTable(
        parameter=parameter,
        values=_frozen(np.array(values, dtype=float)),
        corner=corner,
        corner_label=label,
        status=tuple(r.status for r in results),
        messages=tuple(r.message for r in results),
        corner_nodes=tuple(nodes),
        corner_labels=tuple(labels[k] for k in nodes),
        verdicts=_frozen(verdicts),
        margins=margins,
        smallest_attached=smallest,
        search_status=tuple(None if s is None else s.status for s in searches),
        profiles=tuple(s.profile for s in specs),
        conditions=tuple(s.conditions for s in specs),
        positions=None if positions is None else _frozen(np.array(positions, dtype=float)),
        knee=None,
        stats=stats,
        **drag,
    )
    if parameter == "radius":
        knee = find_knee(table.values, table.cd, table.corner_verdicts())
        object.__setattr__(table, "knee", knee)
    return table


# --- inputs -----------------------------------------------------------------------------------


def _check_profile(profile, conditions):
    if not isinstance(profile, Profile):
        raise InputError(f"profile must be a profilebench Profile, got {type(profile).__name__}")
    if conditions is None:
        return Conditions()
    if not isinstance(conditions, Conditions):
        raise InputError(
            f"conditions must be a profilebench Conditions, got {type(conditions).__name__}"
        )
    return conditions


def _count(n, least=2):
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or not least <= n <= MAX_POINTS:
        raise InputError(
            f"the number of points is {n!r}; give a whole number from {least} to {MAX_POINTS}"
        )
    return int(n)


def _length(name, value):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{name} is {value!r}; give a finite length in metres")
    return float(value)


def corner_node(profile, name) -> int:
    """The node of the corner called ``name``: a node's own label, else its place name
    (``profilebench.geometry.places``), else a node number; matched without regard to case.

    Raises :class:`InputError` naming the corners there are.
    """
    from profilebench.geometry.places import place_names

    if isinstance(name, (int, np.integer)) and not isinstance(name, bool):
        index = int(name)
        if not 0 <= index < len(profile.nodes):
            raise InputError(
                f"node {index} is not a node of the profile (0 to {len(profile.nodes) - 1})"
            )
        return index
    text = str(name).strip()
    places = place_names(profile)
    named = {i: (n.label or places.get(i, "")) for i, n in enumerate(profile.nodes)}
    for i, label in named.items():
        if label and label.casefold() == text.casefold():
            return i
    for i, label in places.items():
        if label.casefold() == text.casefold():
            return i
    if text.isdigit():
        return corner_node(profile, int(text))
    known = ", ".join(f"{label!r} (node {i})" for i, label in named.items() if label)
    raise InputError(
        f"no corner is called {text!r}; give one of {known or 'the node numbers'}, or a node number"
    )


def _corner_to_sweep(profile, node):
    node = corner_node(profile, node)
    if profile.nodes[node].smooth:
        raise GeometryError(
            f"node {node} is smooth (a spline passes through it), not a corner; "
            "make it a corner first to sweep its radius"
        )
    return node


def radius_range(profile, node, start=0.0, stop=None, points=15):
    """The radii (m) of a radius sweep: ``points`` evenly from ``start`` (default 0, sharp) to
    ``stop`` (default the largest radius that fits, times :data:`LARGEST_FITTING_SHARE`).
    A stop beyond the largest that fits is refused with that largest, not clamped."""
    points = _count(points)
    largest = largest_fitting_radius(profile, node)
    start = _length("the first radius", start)
    stop = largest * LARGEST_FITTING_SHARE if stop is None else _length("the last radius", stop)
    if start < 0 or stop <= start:
        raise InputError(
            f"the radius range {start * 1e3:g} to {stop * 1e3:g} mm is empty or "
            "negative; give 0 <= first < last"
        )
    if stop > largest:
        raise InputError(
            f"the last radius {stop * 1e3:.1f} mm does not fit at node {node}: the "
            f"largest that fits is {largest * 1e3:.1f} mm; give a smaller last radius"
        )
    return np.linspace(start, stop, points)


# --- the sweeps -------------------------------------------------------------------------------


@dataclass(frozen=True)
class SweepPlan:
    """The points of a one-parameter sweep before they run: what :func:`radius_plan`,
    :func:`position_plan` and :func:`speed_plan` return, and what the sweeps run.

    ``values`` (SI units) and ``specs`` (one :class:`PointSpec` per point) in sweep order;
    ``corner`` the swept or watched corner's node; ``positions`` the moved node's (x, y) (m) of
    a position sweep. :meth:`run` runs every point; a caller that runs the points itself (the
    editor, to show them as they arrive) builds the table with :meth:`table` and, on the way,
    :meth:`table_so_far`.
    """

    parameter: str
    values: np.ndarray
    specs: tuple
    corner: int | None
    positions: tuple | None = None
    # the order the points start in (None: sweep order); see radius_plan
    order: tuple | None = None

    def __len__(self):
        return len(self.specs)

    def run(self, **run_options) -> SweepTable:
        """Run the points (``workers``, ``progress``, ``cancel``, ``cache``, ``start_method`` of
        :func:`profilebench.studies.runner.run_points`) and return their table."""
        results, stats = run_points(self.specs, order=self.order, **run_options)
        return self.table(results, stats)

    def table(self, results, stats) -> SweepTable:
        """The :class:`SweepTable` of ``results`` (one :class:`PointResult` per point)."""
        return self._table_of(range(len(self.specs)), results, stats)

    def table_so_far(self, results, stats) -> SweepTable | None:
        """The table of the points finished so far (``results[i]`` None: not yet), in sweep
        order; None while none has."""
        done = [i for i, r in enumerate(results) if r is not None]
        return self._table_of(done, results, stats) if done else None

    def _table_of(self, indices, results, stats):
        indices = list(indices)
        if len(results) != len(self.specs):
            raise InputError(f"give one result per point ({len(self.specs)}), got {len(results)}")
        positions = None if self.positions is None else [self.positions[i] for i in indices]
        return _table(
            self.parameter,
            [self.values[i] for i in indices],
            [self.specs[i] for i in indices],
            [results[i] for i in indices],
            stats,
            self.corner,
            "",
            positions=positions,
        )


def _radius_setup(profile, conditions, corner, radii, points):
    """(conditions, node, radii) of a radius sweep: the checked conditions, the swept corner's
    node and the radii (given, or ``points`` from sharp to the largest that fits)."""
    conditions = _check_profile(profile, conditions)
    node = _corner_to_sweep(profile, corner)
    if radii is None:
        return conditions, node, radius_range(profile, node, points=points)
    return conditions, node, _radii(profile, node, radii)


def radius_sweep(
    profile,
    conditions=None,
    corner=0,
    radii=None,
    points=15,
    *,
    thickness=None,
    table=None,
    search=True,
    **run_options,
):
    """Cd, its parts and every corner's verdict against the radius of one corner.

    Parameters
    ----------
    corner : int or str
        The corner: a node number, its label or its place name (:func:`corner_node`).
    radii : sequence of float, optional
        The radii (m, increasing); default ``points`` radii from 0 (sharp) to the largest that
        fits (:func:`radius_range`).
    search : bool
        Also search the corner's smallest attached radius (``cached_radius_search``; once per
        worker, as it does not depend on the corner's own radius).
    run_options
        ``workers``, ``progress``, ``cancel``, ``cache``, ``start_method`` of
        :func:`profilebench.studies.runner.run_points`.

    Returns
    -------
    SweepTable
        With its :class:`Knee`.
    """
    return radius_plan(
        profile, conditions, corner, radii, points, thickness=thickness, table=table, search=search
    ).run(**run_options)


def radius_plan(
    profile,
    conditions=None,
    corner=0,
    radii=None,
    points=15,
    *,
    thickness=None,
    table=None,
    search=True,
) -> SweepPlan:
    """The :class:`SweepPlan` of :func:`radius_sweep` (same arguments but the run options)."""
    conditions, node, radii = _radius_setup(profile, conditions, corner, radii, points)
    # the corner's smallest attached radius does not depend on its own radius: one point (the
    # first, the sharpest, whose own analysis usually needs that search for its corner bubble)
    # searches it, and the table gives it to every point. That point starts first, the others
    # from the largest radius down (where the corner is usually attached and a point needs no
    # search), so that with two or more workers the first points arrive after one analysis
    # rather than after a search of about ten (a 15-point sweep's first point 0.27-0.45 s ->
    # see docs/benchmarks.md)
    specs = tuple(
        PointSpec(
            profile.with_radius(node, float(r)),
            conditions,
            thickness,
            table,
            node if search and k == 0 else None,
        )
        for k, r in enumerate(radii)
    )
    order = (0, *range(len(specs) - 1, 0, -1))
    return SweepPlan("radius", _frozen(np.array(radii, dtype=float)), specs, node, order=order)


def _radii(profile, node, radii):
    values = np.asarray(radii, dtype=float)
    if values.ndim != 1 or len(values) < 2 or len(values) > MAX_POINTS:
        raise InputError(f"give the radii as a list of 2 to {MAX_POINTS} lengths in metres")
    if not np.all(np.isfinite(values)) or values[0] < 0 or np.any(np.diff(values) <= 0):
        raise InputError("the radii must be finite, at least 0 and increasing")
    largest = largest_fitting_radius(profile, node)
    if values[-1] > largest:
        raise InputError(
            f"the radius {values[-1] * 1e3:.1f} mm does not fit at node {node}: the "
            f"largest that fits is {largest * 1e3:.1f} mm"
        )
    return values


def position_sweep(
    profile,
    conditions=None,
    node=0,
    direction=(0.0, 0.0),
    points=11,
    *,
    corner=None,
    thickness=None,
    table=None,
    **run_options,
):
    """Cd and the verdicts as node ``node`` moves along ``direction``.

    ``direction`` (dx, dy) in m is the whole move: the points move the node by ``t * (dx, dy)``
    for ``points`` values of t evenly from 0 to 1; the table's parameter is the distance moved
    (m) and ``positions`` holds the node's (x, y). An outline made invalid by a move (crossing
    itself, a radius no longer fitting) is a failed point with its reason. ``corner`` (optional)
    is the corner watched: its verdict bands, and its smallest attached radius searched at each
    point (about ten solves a point).
    """
    return position_plan(
        profile,
        conditions,
        node,
        direction,
        points,
        corner=corner,
        thickness=thickness,
        table=table,
    ).run(**run_options)


def position_plan(
    profile,
    conditions=None,
    node=0,
    direction=(0.0, 0.0),
    points=11,
    *,
    corner=None,
    thickness=None,
    table=None,
) -> SweepPlan:
    """The :class:`SweepPlan` of :func:`position_sweep` (same arguments but the run options)."""
    conditions = _check_profile(profile, conditions)
    node = corner_node(profile, node)
    try:
        dx, dy = (_length("the move's dx", direction[0]), _length("the move's dy", direction[1]))
    except (TypeError, IndexError):
        raise InputError(
            f"direction is {direction!r}; give the move as (dx, dy) in metres"
        ) from None
    if dx == 0.0 and dy == 0.0:
        raise InputError("the move (dx, dy) is (0, 0); give a direction and distance in metres")
    watched = None if corner is None else _corner_to_sweep(profile, corner)
    n0 = profile.nodes[node]
    ts = np.linspace(0.0, 1.0, _count(points))
    positions = [(n0.x + t * dx, n0.y + t * dy) for t in ts]
    specs = tuple(
        PointSpec(profile.moved(node, x, y), conditions, thickness, table, watched)
        for x, y in positions
    )
    return SweepPlan(
        "displacement",
        _frozen(ts * math.hypot(dx, dy)),
        specs,
        watched if watched is not None else node,
        tuple(positions),
    )


def _speeds(speeds):
    values = np.asarray(speeds, dtype=float)
    if values.ndim != 1 or len(values) < 2 or len(values) > MAX_POINTS:
        raise InputError(f"give the speeds as a list of 2 to {MAX_POINTS} speeds in m/s")
    if not np.all(np.isfinite(values)) or np.any(np.diff(values) <= 0):
        raise InputError("the speeds must be finite and increasing")
    return values


def speed_sweep(
    profile,
    conditions=None,
    speeds=(20.0, 40.0),
    *,
    corner=None,
    thickness=None,
    table=None,
    **run_options,
):
    """Cd and the verdicts against the speed (m/s); ``corner`` as in :func:`position_sweep`.
    Each speed's conditions are checked before any point runs (a bad speed is refused)."""
    return speed_plan(
        profile, conditions, speeds, corner=corner, thickness=thickness, table=table
    ).run(**run_options)


def speed_plan(
    profile, conditions=None, speeds=(20.0, 40.0), *, corner=None, thickness=None, table=None
) -> SweepPlan:
    """The :class:`SweepPlan` of :func:`speed_sweep` (same arguments but the run options)."""
    conditions = _check_profile(profile, conditions)
    values = _speeds(speeds)
    watched = None if corner is None else _corner_to_sweep(profile, corner)
    specs = tuple(
        PointSpec(profile, conditions.replace(speed=float(v)), thickness, table, watched)
        for v in values
    )
    return SweepPlan("speed", _frozen(values), specs, watched)


@dataclass(frozen=True)
class GridTable:
    """A radius x speed grid: one radius sweep (a :class:`SweepTable`, with its knee) per speed.

    The 2-D arrays (:meth:`grid`) have a row per speed and a column per radius.
    """

    radii: np.ndarray
    speeds: np.ndarray
    rows: tuple
    stats: RunStats

    def grid(self, name) -> np.ma.MaskedArray:
        """(speeds, radii) masked array of a per-point number ("cd", "cda", "force", ...)."""
        if name not in DRAG_FIELDS + ("smallest_attached",):
            raise InputError(
                f"{name!r} is not a sweep number; give one of "
                f"{', '.join(DRAG_FIELDS + ('smallest_attached',))}"
            )
        return np.ma.vstack([getattr(row, name) for row in self.rows])

    @property
    def knees(self) -> tuple:
        return tuple(row.knee for row in self.rows)

    @property
    def cancelled(self) -> bool:
        return self.stats.cancelled


def radius_speed_grid(
    profile,
    conditions=None,
    corner=0,
    radii=None,
    speeds=(20.0, 40.0),
    points=15,
    *,
    thickness=None,
    table=None,
    search=True,
    **run_options,
):
    """Radius sweeps of ``corner`` at each of ``speeds`` (m/s), all points run together (one
    pool); the knee and the smallest attached radius per speed show how the speed moves them."""
    conditions, node, radii = _radius_setup(profile, conditions, corner, radii, points)
    speeds = _speeds(speeds)
    specs = [
        PointSpec(
            profile.with_radius(node, float(r)),
            conditions.replace(speed=float(v)),
            thickness,
            table,
            node if search else None,
        )
        for v in speeds
        for r in radii
    ]
    results, stats = run_points(specs, **run_options)
    n = len(radii)
    rows = tuple(
        _table(
            "radius",
            radii,
            specs[k * n : (k + 1) * n],
            results[k * n : (k + 1) * n],
            stats,
            node,
            "",
        )
        for k in range(len(speeds))
    )
    return GridTable(_frozen(np.array(radii, dtype=float)), _frozen(np.array(speeds)), rows, stats)
