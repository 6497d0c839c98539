"""Comparison of a variant with a baseline.

A lower drag coefficient can still mean more drag force if the frontal area grows (a rule of the
trade; common practice, no source): the comparison says so whenever Cd falls while CdA or the force
rises.
"""

from __future__ import annotations

from dataclasses import dataclass

from profilebench.assess.results import Analysis
from profilebench.errors import InputError

__all__ = ["Comparison", "CornerChange", "compare"]


@dataclass(frozen=True)
class CornerChange:
    """A corner (matched by node label, else by index) whose radius or verdict changed."""

    label: str
    radius_before: float | None
    radius_after: float | None
    verdict_before: str
    verdict_after: str

    @property
    def verdict_changed(self) -> bool:
        return self.verdict_before != self.verdict_after


@dataclass(frozen=True)
class Comparison:
    """Deltas of variant ``b`` against baseline ``a`` (b minus a)."""

    cd_before: float
    cd_after: float
    delta_cd: float
    delta_cd_percent: float
    delta_cda: float | None
    delta_force: float | None
    delta_power: float | None
    corner_changes: tuple[CornerChange, ...]
    warnings: tuple[str, ...]


def _key(corner):
    return corner.label or f"node {corner.node}"


def _drag(result):
    """The drag numbers of an Analysis (its ``drag``) or of a result that carries them itself
    (a study point's ``cd``, ``cda``, ``force`` and ``power``)."""
    return result.drag if isinstance(result, Analysis) else result


def compare(a, b):
    """Compare analysis ``b`` (the variant) with analysis ``a`` (the baseline).

    Both must be successful analyses: :class:`~profilebench.assess.results.Analysis`, or
    results with the same drag numbers and corners as attributes of their own (a study point's
    result, :class:`profilebench.studies.points.PointResult`). CdA, force and power deltas are
    given when both have a reference area (Conditions.frontal_area or width).
    """
    for name, an in (("baseline", a), ("variant", b)):
        if an is None or not an.success:
            msg = "no analysis" if an is None else an.message
            raise InputError(
                f"the {name} analysis did not succeed ({msg}); fix it before comparing"
            )
    da, db = _drag(a), _drag(b)
    delta = db.cd - da.cd
    pct = 100.0 * delta / da.cd if da.cd != 0 else float("nan")
    both_area = da.cda is not None and db.cda is not None
    d_cda = db.cda - da.cda if both_area else None
    d_force = db.force - da.force if both_area else None
    d_power = db.power - da.power if both_area else None
    warnings = []
    if delta < 0 and both_area and d_cda > 0:
        warnings.append(
            f"Cd falls by {-delta:.4f} ({pct:+.1f}%) but CdA rises by {d_cda:+.4f} m^2 "
            f"and the drag force by {d_force:+.1f} N: the larger frontal area outweighs the lower Cd"
        )
    elif delta < 0 and both_area and d_force > 0:
        # CdA fell too: the force rises with the dynamic pressure (speed or air), not the area
        warnings.append(
            f"Cd falls by {-delta:.4f} ({pct:+.1f}%) and CdA by {-d_cda:.4f} m^2, but the drag "
            f"force rises by {d_force:+.1f} N: the dynamic pressure (speed or air) differs"
        )
    if not both_area:
        warnings.append(
            "no frontal area or width given for both: CdA, force and power not compared"
        )
    if pct != pct:
        warnings.append("the baseline Cd is zero: no percentage change")
        pct = 0.0
    before = {_key(c): c for c in a.corners}
    after = {_key(c): c for c in b.corners}
    changes = []
    for key in list(before) + [k for k in after if k not in before]:
        ca, cb = before.get(key), after.get(key)
        va = ca.verdict.value if ca else "absent"
        vb = cb.verdict.value if cb else "absent"
        ra = ca.radius if ca else None
        rb = cb.radius if cb else None
        if va != vb or ra != rb:
            changes.append(CornerChange(key, ra, rb, va, vb))
    return Comparison(
        da.cd, db.cd, delta, pct, d_cda, d_force, d_power, tuple(changes), tuple(warnings)
    )
