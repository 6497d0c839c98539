"""What the radii a digitised outline's points leave open do to the answer.

An outline fitted to digitised points (:func:`profilebench.geometry.fit.fit_outline`) says, for
each corner, which radii the points allow
(:class:`profilebench.geometry.radius_bounds.RadiusRange`). Where the points do not fix a
radius, :func:`open_radius_effects` analyses the fitted outline with that corner at each end of
its range (the others as fitted) and gives the Cd and the corner's verdict at both: the user
sees at once which open radius decides the answer and must be taken from the drawing, and which
does not matter.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["OpenRadiusEffect", "open_radius_effects"]


@dataclass(frozen=True)
class OpenRadiusEffect:
    """One open radius and the analysis at both ends of its range.

    ``ends``: ((radius (m), Cd or None, verdict (its words) or None, message), ...) at the range's low
    and high end; a failed analysis has Cd and verdict None and its message. ``cd`` is the
    fitted outline's Cd.
    """

    range: object
    cd: float
    ends: tuple

    @property
    def spread(self) -> float | None:
        """The largest minus the smallest Cd over the ends and the fitted radius, as a share of
        the fitted outline's Cd; None when an end failed."""
        cds = [e[1] for e in self.ends]
        if any(c is None for c in cds):
            return None
        cds.append(self.cd)
        return (max(cds) - min(cds)) / self.cd

    def line(self) -> str:
        """One line of text: the range and the Cd and verdict at both ends."""
        r = self.range
        fitted = "fitted sharp" if r.radius <= 0.0 else f"fitted r {r.radius * 1e3:.0f} mm"
        parts = []
        for radius, cd, verdict, message in self.ends:
            at = "sharp" if radius <= 0.0 else f"r {radius * 1e3:.0f} mm"
            parts.append(
                f"{at}: not analysed ({message})" if cd is None else f"{at}: Cd {cd:.4f} {verdict}"
            )
        spread = self.spread
        moves = "" if spread is None else f"; Cd moves {spread * 100.0:.1f} % across the range"
        return f"{r.where}, {fitted} (Cd {self.cd:.4f}); " + ", ".join(parts) + moves


def open_radius_effects(profile, conditions, ranges, analysis=None, table=None):
    """The :class:`OpenRadiusEffect` of every range in ``ranges`` that the points do not fix
    (``not range.resolved``), for ``profile`` (the fitted outline) at ``conditions``.

    ``analysis``: the fitted outline's analysis at these conditions, when already made.
    """
    from profilebench.assess.analysis import analyze

    base = analysis if analysis is not None else analyze(profile, conditions, table=table)
    out = []
    for r in ranges:
        if r.resolved:
            continue
        ends = []
        for radius in (r.low, r.high):
            if abs(radius - r.radius) <= 1e-9:
                a = base
            else:
                a = analyze(profile.with_radius(r.node, radius), conditions, table=table)
            if not a.success or a.drag is None:
                ends.append((float(radius), None, None, a.message))
                continue
            same = [c for c in a.corners if c.node == r.node]
            verdict = same[0].verdict.value if same else "not a corner"
            ends.append((float(radius), float(a.drag.cd), verdict, ""))
        if base.success and base.drag is not None:
            out.append(OpenRadiusEffect(range=r, cd=float(base.drag.cd), ends=tuple(ends)))
    return tuple(out)
