"""The engineer's first check, done by the tool: does the answer hold when the panels are doubled?

:func:`check_refinement` analyses a profile at its conditions' panel count N and again at
``factor`` x N, and says, corner by corner, what moved: the Cd, each corner's verdict and
separation margin, and (with ``radii=True``) the smallest attached radius of every rounded
convex corner that the flow reaches, at both counts. The rules are the ones
profilebench holds its own samples to (docs/validation.md; rules of this project, no source):

- the Cd within :data:`CD_RULE` (2 %) of the refined one;
- the same verdict on every corner;
- each smallest attached radius within both searches' tolerances plus :data:`RADIUS_RULE` (2 %)
  of the refined one, with the same search status;
- an attached corner whose separation margin falls to below half of what it was, and below
  :data:`NEAR_CRITICAL_MARGIN`, is flagged as undecided even when its verdict holds (measured: the test body's front lower edge reads "attached" at 250, 500 and 1000 panels
  with margins 15, 7 and 3 %, and a laminar bubble at 1500).

The check does not make the coarse answer right: where it does not hold, quote the refined
answer and refine again.
"""

from __future__ import annotations

import dataclasses

from profilebench.assess.analysis import analyze
from profilebench.assess.conditions import PANELS_RANGE
from profilebench.assess.radius_search import cached_radius_search, thin_arc_bound, thin_arc_note
from profilebench.assess.results import SearchStatus, Verdict
from profilebench.errors import InputError

__all__ = [
    "CD_RULE",
    "RADIUS_RULE",
    "NEAR_CRITICAL_MARGIN",
    "CornerRefinement",
    "RefinementCheck",
    "check_refinement",
]

CD_RULE = 0.02
RADIUS_RULE = 0.02
NEAR_CRITICAL_MARGIN = 0.2


@dataclasses.dataclass(frozen=True)
class CornerRefinement:
    """One corner at N and at the refined count: verdicts, margins, smallest attached radii (m;
    None where not searched or not found), and what moved (``problems``, empty when it holds)."""

    node: int
    label: str
    verdict: str
    verdict_refined: str
    margin: float
    margin_refined: float
    smallest: float | None
    smallest_refined: float | None
    search_status: str
    search_status_refined: str
    problems: tuple[str, ...]
    # the boundary layer's thickness (m) at the arc on the refined search's answer, or None
    layer_thickness: float | None = None

    @property
    def holds(self) -> bool:
        return not self.problems


@dataclasses.dataclass(frozen=True)
class RefinementCheck:
    """:func:`check_refinement`'s answer. ``cd_change`` is (refined / coarse - 1); ``problems``
    lists every rule that failed, in words with the numbers; ``holds`` is True when none did."""

    profile: str
    panels: int
    panels_refined: int
    cd: float | None
    cd_refined: float | None
    cd_change: float | None
    corners: tuple[CornerRefinement, ...]
    problems: tuple[str, ...]
    # what the numbers do not say by themselves (a smallest attached radius below the layer's
    # thickness); not rules, so they do not make the check fail
    notes: tuple[str, ...] = ()

    @property
    def holds(self) -> bool:
        return not self.problems


def check_refinement(profile, conditions, factor=2, radii=False, table=None, analysis=None):
    """Analyse ``profile`` at ``conditions.panels`` and at ``factor`` times it and compare.

    Parameters
    ----------
    profile : Profile
    conditions : Conditions
    factor : int
        The refinement, 2 or more (2: the engineer's doubling).
    radii : bool
        Also search the smallest attached radius of every rounded convex corner the flow reaches
        (not in separated flow upstream), at both counts: about ten flow solves per corner and
        count (the searches are cached, so the analysis and the editor reuse them).
    table : RtTable or None
        As for :func:`profilebench.analyze`.
    analysis : Analysis or None
        ``analyze(profile, conditions, table=table)`` when the caller has it already (the
        command line does): it is not made again.

    Raises
    ------
    InputError
        ``factor`` is not a whole number of 2 or more, or the refined count exceeds the most
        panels allowed.
    """
    if isinstance(factor, bool) or not isinstance(factor, int) or factor < 2:
        raise InputError(f"factor = {factor!r}: give a whole number of 2 or more (2 doubles)")
    n = int(conditions.panels)
    fine = factor * n
    most = PANELS_RANGE[1]
    if fine > most:
        raise InputError(
            f"{n} panels refined {factor} times is {fine}, above the {most} allowed; check "
            f"at most {most // factor} panels, or use a smaller factor"
        )
    fine_conditions = conditions.replace(panels=fine)
    a = analyze(profile, conditions, table=table) if analysis is None else analysis
    b = analyze(profile, fine_conditions, table=table)
    problems = []
    for tag, x, count in (("", a, n), ("refined ", b, fine)):
        if not x.success:
            problems.append(f"the {tag}analysis at {count} panels failed: {x.message}")
    if problems:
        return RefinementCheck(profile.name, n, fine, None, None, None, (), tuple(problems))
    cd, cd_fine = a.drag.cd, b.drag.cd
    change = cd_fine / cd - 1.0 if cd > 0.0 else None
    if change is None or abs(change) > CD_RULE:
        moved = "n/a" if change is None else f"{change * 100.0:+.1f} %"
        problems.append(
            f"Cd {cd:.4f} at {n} panels, {cd_fine:.4f} at {fine} ({moved}; the rule: within "
            f"{CD_RULE * 100.0:.0f} %)"
        )
    fine_by_node = {c.node: c for c in b.corners}
    corners = []
    for c in a.corners:
        f = fine_by_node.get(c.node)
        if f is None:
            problems.append(f"{c.label}: a corner at {n} panels that the refined analysis lacks")
            continue
        search = radii and _searchable(a, c)
        row = _corner(profile, conditions, fine_conditions, c, f, search, n, fine)
        corners.append(row)
        problems.extend(f"{c.label}: {p}" for p in row.problems)
    notes = tuple(
        f"{c.label}: smallest attached radius {c.smallest_refined * 1e3:.1f} mm; "
        + thin_arc_note(c.smallest_refined, c.layer_thickness)
        for c in corners
        if c.smallest_refined is not None
        and c.layer_thickness is not None
        and c.search_status_refined == SearchStatus.FOUND.value
        and thin_arc_bound(c.smallest_refined, c.layer_thickness)
    )
    return RefinementCheck(
        profile.name, n, fine, cd, cd_fine, change, tuple(corners), tuple(problems), notes
    )


def _searchable(analysis, c):
    """Is the smallest attached radius of corner ``c`` a question? For a rounded convex corner
    the flow reaches and leaves attached or through a bubble, or from which it separates ahead
    of more attached surface: not for the edge of the base, from which the layer leaves its
    surface for good (there the search's verdict turns on where the wake starts, not on the
    corner: "attached even when sharp" where a sharp edge moves the separation upstream of it).
    """
    if not (c.convex and c.radius > 0.0) or c.verdict in (Verdict.IN_WAKE, Verdict.EDGE_SEPARATION):
        return False
    if c.verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES):
        return True
    sfl = next((f for f in analysis.flow.surfaces if str(f.name.value) == c.surface), None)
    final = None if sfl is None or sfl.bl.separation is None else float(sfl.bl.separation.s)
    return final is not None and final > c.s_end


def _corner(profile, conditions, fine_conditions, c, f, search, n, fine):
    problems = []
    if c.verdict is not f.verdict:
        problems.append(f"{c.verdict.value} at {n} panels, {f.verdict.value} at {fine}")
    elif (
        c.verdict is Verdict.ATTACHED
        and f.margin < 0.5 * c.margin
        and f.margin < NEAR_CRITICAL_MARGIN
    ):
        problems.append(
            f"separation margin {c.margin * 100.0:.0f} % at {n} panels, {f.margin * 100.0:.0f} % "
            f"at {fine}: the layer nears its separation criterion as the panels are refined, "
            "so the verdict may change with more (read it as undecided)"
        )
    small = small_fine = delta = None
    status = status_fine = ""
    if search and c.node < len(profile.nodes) and not profile.nodes[c.node].smooth:
        sa = cached_radius_search(profile, conditions, c.node)
        sb = cached_radius_search(profile, fine_conditions, c.node)
        status, status_fine = sa.status.value, sb.status.value
        small, small_fine, delta = sa.radius, sb.radius, sb.layer_thickness
        if sa.status is not sb.status:
            problems.append(
                f"smallest attached radius: {sa.status.value} at {n} panels, {sb.status.value} "
                f"at {fine}"
            )
        elif sa.status is SearchStatus.FOUND:
            allowed = sa.tolerance + sb.tolerance + RADIUS_RULE * sb.radius
            if abs(sa.radius - sb.radius) > allowed:
                problems.append(
                    f"smallest attached radius {sa.radius * 1e3:.1f} mm at {n} panels, "
                    f"{sb.radius * 1e3:.1f} mm at {fine} ({(sa.radius / sb.radius - 1) * 100:+.0f}"
                    f" %; the rule: within the searches' tolerances plus "
                    f"{RADIUS_RULE * 100.0:.0f} %)"
                )
    return CornerRefinement(
        c.node,
        c.label,
        c.verdict.value,
        f.verdict.value,
        float(c.margin),
        float(f.margin),
        small,
        small_fine,
        status,
        status_fine,
        tuple(problems),
        delta,
    )
