"""Fitting an editable profile to a digitised outline (a traced photo, a CAD cut, a scan).

``fit_outline(points, tolerance)`` turns a dense point list (either orientation, any start
point, metres, noisy to about a millimetre) into a handful of nodes:

1. The points are put in the canonical order (counter-clockwise from the point of least x), so
   the same outline given clockwise or from another point gives the same profile.
2. The outline is reduced with the Douglas-Peucker algorithm (shapely ``simplify``, topology
   preserved) to a polygon no farther than ``tolerance`` from any point (the *reduced polygon*);
   vertices that the noise put on a straight run are then dropped wherever the points from the
   vertex before to the vertex after lie within ``tolerance`` of their least-squares line: the
   *frame*.
3. Each stretch of the frame joined by short edges (shorter than ``CORNER_EDGE_RATIO`` of the
   outline's height or 15 tolerances, or not long and turning the same way at both ends: the
   chords Douglas-Peucker leaves on a large fillet) and turning by more than
   ``SMOOTH_TURN_DEG`` is a fillet when its points lie within twice ``tolerance`` of a
   line-arc-line path (the refinement of step 5 brings it within the tolerance, where a side is
   a curved run rather than a line): one node where the edges' least-squares lines meet, with
   the radius that fits the points best (scipy ``least_squares`` for a first guess,
   ``minimize_scalar`` on the path), below ``FILLET_MAX_RADIUS_RATIO`` of the height. A stretch that is not one fillet is split
   at its longest edge and each part tried again. A single vertex turning by more than
   ``SMOOTH_TURN_DEG`` between two long edges is a corner where their lines meet: rounded when
   a fillet fits its points significantly better than a sharp corner (an F test,
   ``FILLET_F_RATIO``), sharp otherwise.
4. Frame vertices that turn little are smooth nodes (a spline through them: bonnets, screens,
   roofs); those turning by less than ``STRAIGHT_TURN_DEG`` are left out. Fillets that overlap
   their neighbours are reduced to what fits.
5. When this first candidate is valid but strays from the points (a spline through nodes on
   the points need not follow them between the nodes), every node is moved and every fillet
   sized on the built outline (:func:`profilebench.geometry.refine.refine_profile`: least
   squares of the points' distances, smooth nodes inserted where it strays most), starting
   from a quarter of each curved run's smooth nodes, else half, else all of them: a spline
   needs fewer nodes than the frame's chords, so the profile keeps few.

Every candidate is built and checked: a valid, simple outline (shapely), above the ground when
asked, within ``tolerance`` of every point (the largest deviation is reported), and with the
points' length and height within 0.5 % (or twice the tolerance, as each side may lie up to the
tolerance from noisy points). If it fails, detail is given up step by step, each step kept if it
helps: the smooth nodes made sharp, the straight runs' dropped vertices restored, the fillets
one by one made sharp; if nothing passes, the reduced polygon itself (all vertices sharp, which
meets the tolerance by construction) is returned, and the result's notes say so. Last, every
fillet that the points cannot tell from a sharp corner (the F test on the built outline) is
made sharp; and each corner's radius gets the range the points allow
(:mod:`profilebench.geometry.radius_bounds`), so that a radius the points cannot fix is said
to be so. An invalid profile is never returned: a point list that cannot give a valid one is
refused with the reason.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.errors import GeometryError, InputError, RadiusTooLargeError
from profilebench.geometry.profile import Node, Profile

__all__ = ["FitResult", "fit_outline", "CORNER_EDGE_RATIO", "SMOOTH_TURN_DEG"]

# A frame edge shorter than this share of the outline's height may belong to a corner's
# stretch (a fillet's chords); longer edges are the straight runs between corners (a choice of
# this project, no source).
CORNER_EDGE_RATIO = 0.12
# A corner's stretch must turn the outline by more than this (degrees); a frame vertex that
# turns less and lies between long edges is a smooth node (a choice of this project, no source).
SMOOTH_TURN_DEG = 20.0
# A frame vertex between long edges turning by less than this (degrees) is a kink of the noise
# in a straight run and is left out (a choice of this project, no source).
STRAIGHT_TURN_DEG = 3.0
# A "fillet" of more than this share of the height is a curved run (the same share below which
# the corner assessment counts a spline's curvature peak as a corner; a choice of this project,
# no source).
FILLET_MAX_RADIUS_RATIO = 0.5
# A fillet is kept only when it fits the points near its corner better than a sharp corner by
# more than this ratio of the drop in the sum of squares to the residual variance: an F test of
# one extra parameter; 9 is the square of three standard deviations, a chi-square test with one
# degree of freedom at 99.7 % (standard statistical tables).
FILLET_F_RATIO = 9.0
# The fitted outline keeps the points' length and height within this share.
EXTENT_TOLERANCE = 0.005


@dataclass(frozen=True)
class FitResult:
    """A fitted profile and how well it follows the points.

    ``max_deviation`` (m): the largest distance between a point and the built outline, or
    between the built outline and the point polyline. ``corners``: the number of corner nodes
    (sharp or with a radius). ``notes``: what the fit had to give up (a fillet tried sharp, the
    frame returned as it is), each with where. ``radius_ranges``: for every corner node, the
    radii the points allow (:class:`profilebench.geometry.radius_bounds.RadiusRange`);
    ``unresolved`` lists those the points do not fix to 10 %, whose radius the user should take
    from the drawing.
    """

    profile: Profile
    max_deviation: float
    tolerance: float
    corners: int
    notes: tuple[str, ...]
    radius_ranges: tuple = ()

    @property
    def unresolved(self) -> tuple:
        """The corners whose radius the points do not fix (see ``radius_ranges``)."""
        return tuple(r for r in self.radius_ranges if not r.resolved)


def _clean(points):
    """(points, numbers): the finite (N, 2) points without repeats (a repeated neighbour, a
    closing copy of the first) and each one's number in the given list, counting from 1."""
    pts = np.asarray(points, dtype=float)
    if pts.ndim != 2 or pts.shape[1] != 2:
        raise InputError(f"points must be an (N, 2) array of x, y in metres, got shape {pts.shape}")
    if not np.all(np.isfinite(pts)):
        raise InputError("points contain NaN or infinite values; give finite coordinates")
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(np.abs(np.diff(pts, axis=0)) > 0.0, axis=1)
    numbers = np.flatnonzero(keep) + 1
    pts = pts[keep]
    if len(pts) > 1 and np.array_equal(pts[0], pts[-1]):
        pts, numbers = pts[:-1], numbers[:-1]
    if len(pts) < 3:
        raise InputError(f"only {len(pts)} distinct point(s); an outline needs at least 3 points")
    return pts, numbers


def _first_crossing(pts, numbers):
    """A message naming where the closed point list ``pts`` crosses itself (two of its segments
    by their points' numbers, and the crossing point in mm), or "" when it does not."""
    import shapely

    n = len(pts)
    a, b = pts, np.roll(pts, -1, axis=0)
    segments = shapely.linestrings(np.stack([a, b], axis=1))
    tree = shapely.STRtree(segments)
    left, right = tree.query(segments, predicate="intersects")
    apart = (right > left) & ((right - left) % n != 1) & ((left - right) % n != 1)
    if not apart.any():
        return ""
    i, j = int(left[apart][0]), int(right[apart][0])
    where = shapely.intersection(segments[i], segments[j])
    x, y = np.asarray(shapely.get_coordinates(where), dtype=float)[0]
    return (
        f"the segment from point {numbers[i]} to point {numbers[(i + 1) % n]} crosses the "
        f"segment from point {numbers[j]} to point {numbers[(j + 1) % n]} at "
        f"({x * 1e3:.1f}, {y * 1e3:.1f}) mm (points numbered in the order given, from 1)"
    )


def _canonical(pts):
    """The points in the canonical order (as the profile's nodes are panelled)."""
    from profilebench.geometry.outline import canonical_point_order

    order, _rev = canonical_point_order(pts)
    return pts[list(order)]


def _frame(pts, tolerance):
    from shapely.geometry import LinearRing

    ring = LinearRing(pts)  # simple: fit_outline has refused crossing points
    reduced = ring.simplify(float(tolerance), preserve_topology=True)
    frame = np.asarray(reduced.coords, dtype=float)[:-1]
    if len(frame) < 3:
        raise GeometryError("the points reduce to fewer than 3 vertices; give a closed outline")
    return _canonical(_drop_spare_vertices(frame, pts, tolerance)), _canonical(frame)


def _drop_spare_vertices(frame, pts, tolerance):
    """The frame without the vertices whose removal keeps every point within ``tolerance`` of
    the frame (Douglas-Peucker keeps some that the noise put there), fewest-needed first."""
    index = [int(np.argmin(np.hypot(*(pts - v).T))) for v in frame]
    keep = list(range(len(frame)))

    def cost(k):
        # the points from the vertex before to the vertex after: how far from their own
        # least-squares line (a straight run with noise on it is one edge, whatever the noise
        # did to the vertices Douglas-Peucker kept)
        a, b = keep[(k - 1) % len(keep)], keep[(k + 1) % len(keep)]
        i0, i1 = index[a], index[b]
        idx = np.arange(i0, (i1 if i1 >= i0 else i1 + len(pts)) + 1) % len(pts)
        sel = pts[idx]
        c = sel.mean(axis=0)
        _, _, vt = np.linalg.svd(sel - c, full_matrices=False)
        normal = np.array([-vt[0][1], vt[0][0]])
        return float(np.max(np.abs((sel - c) @ normal)))

    while len(keep) > 3:
        costs = [cost(k) for k in range(len(keep))]
        k = int(np.argmin(costs))
        if costs[k] > tolerance:
            break
        keep.pop(k)
    return frame[keep]


def _turn(frame):
    """Signed turning angle (rad, left positive) at each frame vertex."""
    d_in = frame - np.roll(frame, 1, axis=0)
    d_out = np.roll(frame, -1, axis=0) - frame
    a_in = np.arctan2(d_in[:, 1], d_in[:, 0])
    a_out = np.arctan2(d_out[:, 1], d_out[:, 0])
    return np.angle(np.exp(1j * (a_out - a_in)))


def _line_intersection(p0, d0, p1, d1):
    """Intersection of the lines p0 + t d0 and p1 + u d1, or None when nearly parallel."""
    det = d0[0] * (-d1[1]) - d0[1] * (-d1[0])
    if abs(det) < 1e-9 * math.hypot(*d0) * math.hypot(*d1):
        return None
    rhs = p1 - p0
    t = (rhs[0] * (-d1[1]) - rhs[1] * (-d1[0])) / det
    return p0 + t * d0


def _circle_radius(points):
    """Radius (m) of the least-squares circle through ``points`` (scipy least_squares)."""
    from scipy.optimize import least_squares

    c0 = points.mean(axis=0)
    r0 = float(np.mean(np.hypot(*(points - c0).T)))

    def resid(p):
        return np.hypot(points[:, 0] - p[0], points[:, 1] - p[1]) - p[2]

    sol = least_squares(resid, np.array([c0[0], c0[1], max(r0, 1e-6)]))
    return float(abs(sol.x[2]))


def _fillet_path_distances(points, corner, d_in, d_out, r):
    """Distances (m) of ``points`` to the path along the line through ``corner`` with direction
    ``d_in`` (arriving), a fillet of radius ``r`` (m; 0: sharp) and the line leaving along
    ``d_out``; None when the lines do not turn."""
    u_in = np.asarray(d_in, float) / math.hypot(*d_in)
    u_out = np.asarray(d_out, float) / math.hypot(*d_out)
    theta = math.acos(max(-1.0, min(1.0, float(u_in @ u_out))))  # turning angle
    if theta < 1e-6:
        return None
    bis = u_out - u_in
    bis = bis / math.hypot(*bis)  # toward the arc's centre
    tlen = r * math.tan(0.5 * theta)
    t_in, t_out = corner - tlen * u_in, corner + tlen * u_out  # tangent points
    centre = corner + bis * r / math.cos(0.5 * theta)
    rel_in = (points - t_in) @ u_in  # > 0 past the first tangent
    rel_out = (points - t_out) @ u_out  # < 0 before the second
    on_arc = (rel_in > 0) & (rel_out < 0)
    d_arc = np.abs(np.hypot(*(points - centre).T) - r)
    n_in = np.array([-u_in[1], u_in[0]])
    n_out = np.array([-u_out[1], u_out[0]])
    d_line = np.where(rel_in <= 0, np.abs((points - t_in) @ n_in), np.abs((points - t_out) @ n_out))
    return np.where(on_arc, d_arc, d_line)


def _fillet_radius(points, corner, d_in, d_out, guess):
    """(radius, largest distance): the fillet radius (m) between the lines through ``corner``
    along ``d_in`` (arriving) and ``d_out`` (leaving) that best fits ``points`` (least squares
    of the points' distances to the line-arc-line path, scipy minimize_scalar, bounded) and the
    largest of those distances (m)."""
    from scipy.optimize import minimize_scalar

    if _fillet_path_distances(points, corner, d_in, d_out, 0.0) is None:
        return guess, math.inf

    def dist(r):
        return _fillet_path_distances(points, corner, d_in, d_out, r)

    hi = max(3.0 * guess, 1e-3)
    res = minimize_scalar(
        lambda r: float(np.sum(dist(r) ** 2)),
        bounds=(0.0, hi),
        method="bounded",
        options={"xatol": 1e-5 * hi},
    )
    r = float(res.x)
    return r, float(np.max(dist(r)))


def _rounding_is_significant(d_sharp, d_fillet):
    """True when the points' distances to a rounded corner (``d_fillet``, m) beat those to the
    sharp corner (``d_sharp``) by more than the noise explains: the drop in the sum of squares
    over the rounded model's residual variance exceeds FILLET_F_RATIO (an F test of nested
    least-squares models with one extra parameter, the radius)."""
    n = len(d_fillet)
    if n < 4:
        return False
    ss_r = float(np.sum(np.square(d_fillet)))
    ss_0 = float(np.sum(np.square(d_sharp)))
    variance = max(ss_r / (n - 1), 1e-18)
    return (ss_0 - ss_r) / variance > FILLET_F_RATIO


def _deviation(profile, pts):
    """Two-sided largest distance (m) between the built outline and the point polyline: of the
    points from a dense polyline on the outline, and of that polyline's vertices from the
    points' polyline (nearest vertex by a k-d tree, then the edges beside it; the same distances
    as shapely's, checked in the tests, at a fraction of the time)."""
    from profilebench.geometry.outline import build_outline
    from profilebench.geometry.refine import polyline_distances

    samples = build_outline(profile).sample(max(2000, 4 * len(pts)))
    a = float(np.max(np.abs(polyline_distances(samples, pts))))
    b = float(np.max(np.abs(polyline_distances(pts, samples))))
    return max(a, b), samples


def _check(profile, pts, tolerance, ground):
    """(ok, deviation, reason) of a candidate profile."""
    from profilebench.geometry.validity import explain

    try:
        problems = explain(profile, ground=ground)
    except Exception as exc:  # a build error is a reason to reject the candidate
        return False, math.inf, str(exc)
    if problems:
        return False, math.inf, problems[0]
    dev, samples = _deviation(profile, pts)
    if dev > tolerance * (1.0 + 1e-9):
        return False, dev, f"the outline strays {dev * 1e3:.1f} mm from the points"
    for axis, name in ((0, "length"), (1, "height")):
        want = float(np.ptp(pts[:, axis]))
        got = float(np.ptp(samples[:, axis]))
        if want > 0 and abs(got - want) > max(EXTENT_TOLERANCE * want, 2.0 * tolerance):
            return False, dev, f"its {name} is {got * 1e3:.0f} mm against {want * 1e3:.0f} mm"
    return True, dev, ""


def _thinned(profile):
    """``profile`` without every second smooth node of each run of smooth nodes (the first of
    a run kept), or None when no run has two."""
    nodes = profile.nodes
    n = len(nodes)
    corners = [i for i, nd in enumerate(nodes) if not nd.smooth]
    if not corners:
        return None
    drop, first = set(), corners[0]
    run = []
    for q in range(1, n + 1):
        i = (first + q) % n
        if nodes[i].smooth:
            run.append(i)
            continue
        drop.update(run[1::2])
        run = []
    if not drop:
        return None
    return Profile(tuple(nd for i, nd in enumerate(nodes) if i not in drop), name=profile.name)


def _shrink_radii_to_fit(nodes, name):
    """``nodes`` (a list, None for a left-out vertex) with every radius too large for its
    neighbouring segments reduced to 90 % of the largest that fits, or to 0 if none fits."""
    from profilebench.geometry.outline import build_outline

    nodes = list(nodes)
    for _ in range(len(nodes)):
        live = [i for i, nd in enumerate(nodes) if nd is not None]
        try:
            build_outline(Profile(tuple(nodes[i] for i in live), name=name))
            break
        except RadiusTooLargeError as exc:
            i = live[exc.node]
            nodes[i] = Node(nodes[i].x, nodes[i].y, 0.9 * exc.largest)
        except GeometryError:
            break
    return nodes


def _sharpen_small_fillets(profile, pts, tolerance, ground, dev):
    """(profile, deviation) with every fillet that the points cannot tell from a sharp corner
    made sharp: one whose points (those round its arc) fit the sharp corner about as well
    (:func:`_rounding_is_significant`), kept sharp when the outline still passes its checks."""
    from profilebench.geometry.outline import build_outline
    from profilebench.geometry.refine import point_distances

    d_fillet = point_distances(profile, pts)
    for arc in build_outline(profile).arcs:
        nd = profile.nodes[arc.node]
        reach = 2.0 * arc.radius * math.tan(0.5 * abs(arc.turning_angle)) + 2.0 * tolerance
        near = np.hypot(pts[:, 0] - nd.x, pts[:, 1] - nd.y) <= reach
        trial = profile.replace_node(arc.node, Node(nd.x, nd.y, label=nd.label))
        try:
            d_sharp = point_distances(trial, pts)
        except GeometryError:
            continue
        if _rounding_is_significant(d_sharp[near], d_fillet[near]):
            continue
        t_ok, t_dev, _why = _check(trial, pts, tolerance, ground)
        if t_ok:
            profile, dev, d_fillet = trial, t_dev, d_sharp
    return profile, dev


def fit_outline(points, tolerance=0.005, ground=True, name="imported") -> FitResult:
    """Fit an editable profile to a digitised outline (see the module notes).

    Parameters
    ----------
    points : array_like, shape (N, 2)
        The outline's points in metres, in order round it (either way, from any point).
    tolerance : float
        The largest distance (m) the fitted outline may keep from the points (default 5 mm).
    ground : bool
        The outline must stay above y = 0 (the ground) when True.
    name : str
        The profile's name.

    Raises
    ------
    InputError
        Bad points or tolerance.
    GeometryError
        Points that cross themselves, or an outline whose frame is itself invalid (below the
        ground, say): the message says where.
    """
    if (
        isinstance(tolerance, bool)
        or not isinstance(tolerance, (int, float))
        or not (math.isfinite(tolerance) and tolerance > 0)
    ):
        raise InputError(f"tolerance must be a positive distance in metres, got {tolerance!r}")
    pts, numbers = _clean(points)
    crossing = _first_crossing(pts, numbers)
    if crossing:
        raise GeometryError(
            f"the points cross themselves: {crossing}; remove the crossing "
            "points or reorder them round the outline"
        )
    pts = _canonical(pts)
    if ground and float(pts[:, 1].min()) <= 0.0:
        k = int(np.argmin(pts[:, 1]))
        raise GeometryError(
            f"the point at ({pts[k, 0] * 1e3:.1f}, {pts[k, 1] * 1e3:.1f}) mm lies on or below the "
            "ground (y = 0); raise the outline or fit it with the ground off"
        )
    frame, dp_frame = _frame(pts, tolerance)
    m = len(frame)
    height = float(np.ptp(pts[:, 1]))
    edge = np.hypot(*(np.roll(frame, -1, axis=0) - frame).T)  # edge k: vertex k -> k+1
    turn = _turn(frame)
    # an edge belongs to a corner's stretch when it is short, or when it is not long and its
    # ends turn the same way, one by more than SMOOTH_TURN_DEG and the other by more than a
    # kink (the chords Douglas-Peucker leaves on a large fillet, and the ends of its arc)
    big = np.abs(turn) > math.radians(SMOOTH_TURN_DEG)
    kink = np.abs(turn) > math.radians(STRAIGHT_TURN_DEG)
    nxt_big, nxt_kink = np.roll(big, -1), np.roll(kink, -1)
    short = (edge < max(CORNER_EDGE_RATIO * height, 15.0 * tolerance)) | (
        ((big & nxt_kink) | (kink & nxt_big))
        & (turn * np.roll(turn, -1) > 0)
        & (edge < 2.0 * CORNER_EDGE_RATIO * height)
    )
    notes = []

    # corner stretches: maximal runs of vertices joined by short edges, between long edges
    groups, seen = [], np.zeros(m, dtype=bool)
    if not short.all():
        start = int(np.flatnonzero(~short)[0]) + 1  # a vertex after a long edge
        k = start
        for _ in range(m):
            v = k % m
            if not seen[v]:
                run = [v]
                seen[v] = True
                while short[run[-1]] and not seen[(run[-1] + 1) % m]:
                    nxt = (run[-1] + 1) % m
                    run.append(nxt)
                    seen[nxt] = True
                groups.append(run)
            k += 1
    else:
        groups = [[v] for v in range(m)]

    nodes, kinds = [], []
    index = [int(np.argmin(np.hypot(*(pts - v).T))) for v in frame]

    def _edge_line(k):
        """(point, direction) of the least-squares line through the middle of the points that
        frame edge k (vertex k to k + 1) stands for: its ends may already be on a fillet."""
        i0, i1 = index[k], index[(k + 1) % m]
        idx = np.arange(i0, (i1 if i1 >= i0 else i1 + len(pts)) + 1) % len(pts)
        cut = len(idx) // 5
        sel = pts[idx[cut : len(idx) - cut]] if len(idx) - 2 * cut >= 2 else pts[idx]
        c = sel.mean(axis=0)
        _, _, vt = np.linalg.svd(sel - c, full_matrices=False)
        d = vt[0]
        if float(d @ (frame[(k + 1) % m] - frame[k])) < 0:
            d = -d
        return c, d

    def single(v):
        a = abs(math.degrees(turn[v]))
        if a > SMOOTH_TURN_DEG:
            at = frame[v]
            if not short[(v - 1) % m] and not short[v]:
                # between two straight runs: where their fitted lines meet
                (p0, d0), (p1, d1) = _edge_line((v - 1) % m), _edge_line(v)
                meet = _line_intersection(p0, d0, p1, d1)
                if meet is not None and math.hypot(*(meet - at)) <= 3.0 * tolerance:
                    at = meet
                    # a fillet too small for the frame to show (a corner turning little)?
                    reach = min(0.5 * edge[(v - 1) % m], 0.5 * edge[v], 0.1 * height)
                    near = pts[np.hypot(*(pts - meet).T) <= reach]
                    guess = reach / math.tan(0.5 * math.radians(a)) / 3.0
                    if len(near) >= 4:
                        r, worst = _fillet_radius(near, meet, d0, d1, guess)
                        if worst <= tolerance and _rounding_is_significant(
                            _fillet_path_distances(near, meet, d0, d1, 0.0),
                            _fillet_path_distances(near, meet, d0, d1, r),
                        ):
                            nodes.append(Node(*map(float, at), radius=r))
                            kinds.append(("fillet", [v], r))
                            return
            nodes.append(Node(*map(float, at)))
            kinds.append(("sharp", [v], None))
        elif a < STRAIGHT_TURN_DEG:
            # a kink of the noise in a straight run: left out (restored if the fit needs it)
            kinds.append(("straight", [v], None))
            nodes.append(None)
        else:
            nodes.append(Node(*map(float, frame[v]), smooth=True))
            kinds.append(("smooth", [v], None))

    def place(run):
        total = float(np.degrees(np.sum(turn[run])))
        if len(run) == 1 or abs(total) <= SMOOTH_TURN_DEG:
            for v in run:
                single(v)
            return
        # a fillet: the edges either side, their lines' intersection, the fitted radius
        first, last = run[0], run[-1]
        p_in, d_in = _edge_line((first - 1) % m)
        p_out, d_out = _edge_line(last)
        corner = _line_intersection(p_in, d_in, p_out, d_out)
        i0, i1 = index[first], index[last]
        idx = np.arange(i0, (i1 if i1 >= i0 else i1 + len(pts)) + 1) % len(pts)
        radius = _circle_radius(pts[idx]) if len(idx) >= 3 else 0.0
        fits = False
        if corner is not None and radius > 0:
            radius, worst = _fillet_radius(pts[idx], corner, d_in, d_out, radius)
            fits = worst <= 2.0 * tolerance and radius < FILLET_MAX_RADIUS_RATIO * height
        if fits:
            nodes.append(Node(float(corner[0]), float(corner[1]), radius=radius))
            kinds.append(("fillet", run, radius))
            return
        # not one circular fillet (two fillets joined by a short run, a curved run joined to
        # a corner): split it at its longest inner edge and try each part; single vertices
        # stand on their own, sharp where they turn much, smooth where they turn little
        cut = max(range(len(run) - 1), key=lambda q: edge[run[q]])
        short[run[cut]] = False  # the edge between the parts is a run of its own
        place(run[: cut + 1])
        place(run[cut + 1 :])

    for run in groups:
        place(run)

    def profile_of(nds):
        return Profile(tuple(nd for nd in nds if nd is not None), name=name)

    # fillets fitted one by one may overlap their neighbours: each too large is reduced to
    # what fits (the refinement below sizes them together)
    candidate = _shrink_radii_to_fit(nodes, name)
    ok, dev, why = _check(profile_of(candidate), pts, tolerance, ground)
    # a sharp vertex inside a curved run (a bonnet's leading edge between the bumper and the
    # bonnet), or a few sharp vertices joined by short edges, may be a fillet the grouping
    # could not see: try one node where the chords (or long edges' lines) before and after them
    # meet, with the radius that fits the points round them
    sharp_runs, i = [], 0
    while i < len(kinds):
        if kinds[i][0] != "sharp":
            i += 1
            continue
        j = i
        while (
            j + 1 < len(kinds)
            and kinds[j + 1][0] == "sharp"
            and kinds[j + 1][1][0] == (kinds[j][1][0] + 1) % m
            and short[kinds[j][1][0]]
        ):
            j += 1
        sharp_runs.append((i, j))
        i = j + 1
    for i, j in sharp_runs:
        if ok:
            break
        v, w = kinds[i][1][0], kinds[j][1][0]
        if i == j and not (short[(v - 1) % m] or short[v]):
            continue
        # the sides: a long edge's fitted line, else the chord one vertex further out
        if short[(v - 1) % m]:
            p_a, d_a = frame[(v - 1) % m], frame[(v - 1) % m] - frame[(v - 2) % m]
        else:
            p_a, d_a = _edge_line((v - 1) % m)
        if short[w]:
            p_b, d_b = frame[(w + 1) % m], frame[(w + 2) % m] - frame[(w + 1) % m]
        else:
            p_b, d_b = _edge_line(w)
        corner = _line_intersection(p_a, d_a, p_b, d_b)
        centre = frame[[kinds[q][1][0] for q in range(i, j + 1)]].mean(axis=0)
        if corner is None or math.hypot(*(corner - centre)) > 0.1 * height:
            continue
        near = np.flatnonzero(np.hypot(*(pts - centre).T) <= 0.1 * height)
        if len(near) < 3:
            continue
        guess = _circle_radius(pts[near])
        radius, _worst = _fillet_radius(pts[near], corner, d_a, d_b, guess)
        trial = list(candidate)
        trial[i] = Node(float(corner[0]), float(corner[1]), radius=radius)
        for q in range(i + 1, j + 1):
            trial[q] = None
        for q in (i - 1, j + 1):  # the fillet takes its neighbours' places
            qq = q % len(trial)
            if kinds[qq][0] in ("smooth", "straight"):
                trial[qq] = None
        t_ok, t_dev, t_why = _check(profile_of(trial), pts, tolerance, ground)
        # taken when it helps, and when neither is valid (the refinement may yet fix it)
        if t_ok or t_dev < dev or not math.isfinite(dev):
            candidate, ok, dev, why = trial, t_ok, t_dev, t_why
            kinds[i] = ("fillet", [kinds[q][1][0] for q in range(i, j + 1)], radius)
            for q in range(i + 1, j + 1):
                kinds[q] = ("merged", kinds[q][1], None)
    if not ok and math.isfinite(dev):
        # the nodes sit on the points, but a spline through them need not follow the points
        # between them: move the nodes and size the fillets on the built outline, adding
        # smooth nodes where it strays most (a candidate that is not even valid is not worth
        # the time: its fallbacks below are quicker)
        from profilebench.geometry.refine import refine_profile

        # first with every other smooth node of each curved run (a spline needs fewer nodes
        # than the chords the frame has there; the refinement adds nodes where it must)
        start = profile_of(candidate)
        half = _thinned(start)
        for trial in (half and _thinned(half), half, start):
            if trial is None:
                continue
            # a thinned start that strays far after its first fit is not worth adding to
            refined, _ = refine_profile(
                trial, pts, tolerance, give_up_above=None if trial is start else 4 * tolerance
            )
            r_ok, r_dev, r_why = _check(refined, pts, tolerance, ground)
            if r_ok:
                candidate, ok, dev, why = list(refined.nodes), r_ok, r_dev, r_why
                break
    # if it does not pass, give up detail step by step, keeping each step that helps: the
    # splines made polylines, the straight runs' kinks restored, the fillets one by one sharp
    steps = [
        (
            "the smooth nodes were made sharp",
            lambda c: [None if nd is None else Node(nd.x, nd.y, nd.radius, False) for nd in c],
        ),
        (
            "the straight runs keep every vertex of the reduced outline",
            lambda c: [
                Node(*map(float, frame[kinds[i][1][0]])) if nd is None else nd
                for i, nd in enumerate(c)
            ],
        ),
    ]
    for label, change in steps:
        if ok:
            break
        trial = change(candidate)
        t_ok, t_dev, t_why = _check(profile_of(trial), pts, tolerance, ground)
        if t_ok or t_dev < dev:
            notes.append(f"{label} ({why})")
            candidate, ok, dev, why = trial, t_ok, t_dev, t_why
    for i, (kind, _run, _radius) in enumerate(kinds):
        if ok:
            break
        if kind != "fillet":
            continue
        trial = list(candidate)
        trial[i] = Node(candidate[i].x, candidate[i].y)
        t_ok, t_dev, t_why = _check(profile_of(trial), pts, tolerance, ground)
        if t_ok or t_dev < dev:
            notes.append(
                f"the fillet near ({candidate[i].x * 1e3:.0f}, "
                f"{candidate[i].y * 1e3:.0f}) mm was made sharp ({why})"
            )
            candidate, ok, dev, why = trial, t_ok, t_dev, t_why
    if not ok:
        frame_profile = profile_of([Node(*map(float, p)) for p in dp_frame])
        f_ok, f_dev, f_why = _check(frame_profile, pts, tolerance, ground)
        if not f_ok:
            raise GeometryError(
                f"no valid profile fits these points within {tolerance * 1e3:.1f} mm: {f_why}"
            )
        notes.append(
            f"no fit with fillets and splines passed ({why}); the reduced polygon of "
            f"{len(dp_frame)} sharp vertices is returned"
        )
        candidate, dev = list(frame_profile.nodes), f_dev
    profile, dev = _sharpen_small_fillets(profile_of(candidate), pts, tolerance, ground, dev)
    from profilebench.geometry.places import place_names

    names = place_names(profile)  # corners named by where they sit (editable labels)
    profile = Profile(
        tuple(
            Node(nd.x, nd.y, nd.radius, nd.smooth, names.get(i, ""))
            for i, nd in enumerate(profile.nodes)
        ),
        name=name,
    )
    corners = sum(1 for nd in profile.nodes if not nd.smooth)
    from profilebench.geometry.radius_bounds import radius_ranges

    return FitResult(
        profile=profile,
        max_deviation=float(dev),
        tolerance=float(tolerance),
        corners=corners,
        notes=tuple(notes),
        radius_ranges=radius_ranges(profile, pts, tolerance),
    )
