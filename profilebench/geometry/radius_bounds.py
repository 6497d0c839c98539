"""How well a digitised outline's points fix each fitted corner's radius.

A fillet that turns the outline by a few tens of degrees lies only a millimetre or two off its
sharp corner (the arc's distance from the corner is r (1 / cos(a / 2) - 1) for a turn a): with
about 1 mm of digitising noise its points cannot tell 20 mm from 70 mm, nor either from sharp.
The fit gives one radius, the least-squares one; this module says which radii the points allow,
so that the user knows which corners to take from the drawing rather than from the points.

For each corner node of the fitted profile, S(r) is the sum of squared distances to the built
outline of the points on the corner's stretch (from the corner before it to the corner after
it), with the stretch's other parameters (the positions of its nodes, its neighbours' radii)
fitted with the radius: the stretch is first fitted afresh by least squares (scipy
least_squares; the fit itself stops once within its tolerance, and holding its nodes where it
left them missed the true radius 3 to 7 times in 100 on the test body), then each radius is
judged with the other parameters moved along their least-squares regression on it and one
Gauss-Newton step further. The radii whose S(r) exceeds the least by at most ``CHI2_LEVEL``
times the noise variance form the range (a profile-likelihood interval for one parameter of a
least-squares model with normal errors; 9 is the chi-square value of one degree of freedom at
99.73 %, standard statistical tables). The noise variance is estimated from all the points'
distances to the fitted outline, so it also carries what the splines miss (the range is then
wider, not narrower). Measured over fresh noise on the four samples (12 to 20 digitisings
each): the true radius inside its range 289 times in 292.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.errors import GeometryError
from profilebench.geometry.profile import Node

__all__ = ["RadiusRange", "radius_ranges", "CHI2_LEVEL", "RESOLVED_SHARE"]

# chi-square with one degree of freedom at 99.73 % (three standard deviations; standard
# statistical tables)
CHI2_LEVEL = 9.0
# a radius counts as fixed by the points when every radius they allow lies within this share of
# it (the round-trip rule of this project, 10 %, no source)
RESOLVED_SHARE = 0.10
# the largest radius tried, as a share of the outline's height (the fit's own limit for a
# fillet, profilebench.geometry.fit.FILLET_MAX_RADIUS_RATIO)
CAP_RATIO = 0.5


@dataclass(frozen=True)
class RadiusRange:
    """The radii (m) a corner node may have and still follow the points as well, at 99.73 %.

    ``radius`` is the fitted one; ``low`` and ``high`` bound what the points allow;
    ``high_is_limit`` is True when ``high`` is only the largest radius tried (or that fits
    between the neighbours), not a bound the points set. ``tolerance`` (m) is the fit's.
    """

    node: int
    label: str
    x: float
    y: float
    radius: float
    low: float
    high: float
    high_is_limit: bool
    tolerance: float

    @property
    def resolved(self) -> bool:
        """True when the points fix the radius: within ``RESOLVED_SHARE`` of the fitted one, or
        for a sharp corner no radius above the fit's tolerance."""
        if self.radius > 0.0:
            share = RESOLVED_SHARE * self.radius
            return self.low >= self.radius - share and self.high <= self.radius + share
        return self.high <= self.tolerance

    @property
    def where(self) -> str:
        """The corner for the user: its label (or "corner") and its node's place in mm."""
        return f"{self.label or 'corner'} ({self.x * 1e3:.0f}, {self.y * 1e3:.0f}) mm"

    def contains(self, radius: float) -> bool:
        """True when ``radius`` (m) is one the points allow."""
        return self.low <= radius <= self.high

    def message(self) -> str:
        """One line for the user: what was fitted and what the points allow."""
        upto = f"{self.high * 1e3:.0f} mm" + (" or more" if self.high_is_limit else "")
        if self.radius <= 0.0:
            fitted = "fitted sharp"
            allowed = f"any radius up to {upto}"
        else:
            fitted = f"fitted r {self.radius * 1e3:.0f} mm"
            allowed = (
                f"any radius up to {upto}" if self.low <= 0.0 else f"{self.low * 1e3:.0f} to {upto}"
            )
        return (
            f"{self.where}: {fitted}, but the points allow {allowed} (99.7 %); "
            "take its radius from the drawing if it has one"
        )


# the outline between a corner's neighbouring corners is sampled this densely (m) for the
# distances: a polyline's chords on a 20 mm fillet then lie within 0.01 mm of the arc
SAMPLE_SPACING = 2e-3
# the outline is sampled this far (m) beyond the stretch's ends
WINDOW_MARGIN = 0.05
# evaluations allowed for the stretch's fresh least squares
POLISH_EVALS = 6
# a point counts this far off (m) where a trial outline does not build
_FAIL_DISTANCE = 1.0
# singular values of the derivatives below this share of the largest are left out of the steps
RCOND = 1e-3
# the step (m) of the node's position for the distances' derivatives
POSITION_STEP = 1e-3


class _Corner:
    """The distances of the points on one corner's stretch (from the corner before it to the
    corner after it) to the outline with that corner's radius r and the stretch's other
    parameters (every node's position on it, the neighbouring corners' radii) moved by ``q``."""

    def __init__(self, profile, node, pts, s_pts, outline):
        self.profile, self.node = profile, node
        n = len(profile.nodes)
        corners = [k for k, nd in enumerate(profile.nodes) if not nd.smooth]
        at = corners.index(node)
        self.prev, self.next = corners[at - 1], corners[(at + 1) % len(corners)]
        s0, s1 = outline.node_s[self.prev], outline.node_s[self.next]
        span = (s1 - s0) % outline.length or outline.length  # one corner: the whole outline
        self.near = np.flatnonzero((s_pts - s0) % outline.length <= span)
        self.pts = pts[self.near]
        # the nuisance parameters: (node, 0 | 1 for x | y, or 2 for the radius)
        stretch = [self.prev]
        while stretch[-1] != self.next and len(stretch) <= n:
            stretch.append((stretch[-1] + 1) % n)
        self.params = [(k, c) for k in dict.fromkeys(stretch) for c in (0, 1)]
        self.params += [
            (k, 2)
            for k in dict.fromkeys((self.prev, self.next))
            if k != node and profile.nodes[k].radius > 0
        ]

    def distances(self, r, q=None):
        """The distances (m), or None when the outline does not build (a radius too large)."""
        from profilebench.geometry.outline import build_outline
        from profilebench.geometry.refine import polyline_distances

        nodes = list(self.profile.nodes)
        nd = nodes[self.node]
        nodes[self.node] = Node(nd.x, nd.y, r, False, nd.label)
        try:
            if q is not None:
                for (k, c), dq in zip(self.params, q):
                    m = nodes[k]
                    x, y = m.x + (dq if c == 0 else 0.0), m.y + (dq if c == 1 else 0.0)
                    rad = m.radius + (dq if c == 2 else 0.0)
                    if rad < 0.0:
                        return None
                    nodes[k] = Node(x, y, rad, m.smooth, m.label)
            o = build_outline(self.profile._with_nodes(nodes))
        except GeometryError:
            return None
        s0, s1 = o.node_s[self.prev], o.node_s[self.next]
        span = (s1 - s0) % o.length or o.length
        # a margin either side, so that every point's nearest place lies on the samples when
        # the stretch's ends move (the ends are the middles of the neighbours' fillets)
        margin = min(WINDOW_MARGIN, 0.5 * (o.length - span)) if span < o.length else 0.0
        count = int(min(max((span + 2 * margin) / SAMPLE_SPACING, 200), 20000))
        s = s0 - margin + np.linspace(0.0, span + 2 * margin, count)
        # the samples as a closed polyline: its closing chord joins the margins' far ends,
        # which no point of the stretch is nearest to (with one corner there is no margin and
        # the polyline is the closed outline itself)
        return np.abs(polyline_distances(o.points_at(s), self.pts))

    def polish(self, r0, cap):
        """(r, q, jacobian): the least squares of the stretch's distances in the radius and
        the other parameters (scipy least_squares, from the fitted ones), and the derivatives
        there (columns: the radius, then the other parameters)."""
        from scipy.optimize import least_squares

        fail = np.full(len(self.pts), _FAIL_DISTANCE)

        def resid(th):
            d = self.distances(float(th[0]), th[1:])
            return fail if d is None else d

        n = len(self.params)
        lower = np.r_[0.0, np.full(n, -np.inf)]
        upper = np.r_[cap, np.full(n, np.inf)]
        for j, (k, c) in enumerate(self.params):  # a neighbour's radius stays a radius
            if c == 2:
                lower[j + 1] = -self.profile.nodes[k].radius
        start = np.r_[min(max(r0, 0.0), cap), np.zeros(n)]
        res = least_squares(
            resid, start, bounds=(lower, upper), diff_step=POSITION_STEP, max_nfev=POLISH_EVALS
        )
        return float(res.x[0]), np.asarray(res.x[1:]), np.asarray(res.jac)


def radius_ranges(profile, points, tolerance):
    """The :class:`RadiusRange` of every corner node (sharp or rounded) of ``profile``, fitted
    to ``points`` ((N, 2), m) within ``tolerance`` (m); see the module notes."""
    from scipy.optimize import brentq
    from scipy.spatial import cKDTree

    from profilebench.geometry.outline import build_outline
    from profilebench.geometry.refine import point_distances

    pts = np.asarray(points, float)
    variance = max(float(np.mean(np.square(point_distances(profile, pts)))), 1e-12)
    height = float(np.ptp(pts[:, 1]))
    outline = build_outline(profile)
    # each point's place along the fitted outline (its nearest sample's arc length)
    count = int(min(max(outline.length / SAMPLE_SPACING, 2000), 50000))
    _, k = cKDTree(outline.sample(count)).query(pts)
    s_pts = k * (outline.length / count)
    turning = {arc.node: abs(arc.turning_angle) for arc in outline.arcs}
    turning.update({e.node: abs(e.turning_angle) for e in outline.sharp_edges})
    out = []
    for i, nd in enumerate(profile.nodes):
        if nd.smooth or turning.get(i, 0.0) <= 1e-6:
            continue
        corner = _Corner(profile, i, pts, s_pts, outline)
        if len(corner.near) < 4:
            continue
        cap = _largest_fitting(corner, nd.radius, max(CAP_RATIO * height, nd.radius))
        # the stretch fitted afresh, its radius with every other parameter of it (the fit
        # stops once within its tolerance, not at the least squares of these points)
        r_star, q_star, jac = corner.polish(nd.radius, cap)
        # how the other parameters follow the radius near that optimum (the least-squares
        # regression of their derivatives on the radius's): each radius is judged with them
        # moved along it, then one Gauss-Newton step further, taken on its linear prediction
        # (a profile of S in r; the step built as an outline cost 20 % more for the same ranges)
        j_r, j_q = jac[:, 0], jac[:, 1:]
        follow = -np.linalg.lstsq(j_q, j_r, rcond=RCOND)[0] if j_q.shape[1] else j_q[0]

        def ss(r, corner=corner, j_q=j_q, follow=follow, r_star=r_star, q_star=q_star):
            q = q_star + follow * (r - r_star)
            d = corner.distances(r, q)
            if d is None:
                return math.inf
            best = float(np.sum(np.square(d)))
            if j_q.shape[1]:
                step = np.linalg.lstsq(j_q, -d, rcond=RCOND)[0]
                best = min(best, float(np.sum(np.square(d + j_q @ step))))
            return best

        # the least S(r): the optimum above (or sharp, where the profile finds that better)
        best_r, best = r_star, ss(r_star)
        if r_star > 0.0 and ss(0.0) < best:
            best_r, best = 0.0, ss(0.0)
        target = best + CHI2_LEVEL * variance

        def excess(r, ss=ss, target=target):
            return ss(r) - target

        xtol = max(5e-4, 0.02 * best_r)  # bounds to 2 %: enough to judge 10 %
        if excess(cap) <= 0.0:
            high, limit = cap, True
        else:
            high, limit = brentq(excess, best_r, cap, xtol=xtol), False
        low = 0.0 if best_r <= 0.0 or excess(0.0) <= 0.0 else brentq(excess, 0.0, best_r, xtol=xtol)
        out.append(
            RadiusRange(
                node=i,
                label=nd.label,
                x=nd.x,
                y=nd.y,
                radius=nd.radius,
                low=float(low),
                high=float(high),
                high_is_limit=limit,
                tolerance=float(tolerance),
            )
        )
    return tuple(out)


def _largest_fitting(corner, start, cap):
    """The largest radius in [start, cap] (m) whose outline builds (bisection to 0.5 %)."""
    if corner.distances(cap) is not None:
        return cap
    lo, hi = start, cap
    while hi - lo > 5e-3 * hi:
        mid = 0.5 * (lo + hi)
        if corner.distances(mid) is not None:
            lo = mid
        else:
            hi = mid
    return lo
