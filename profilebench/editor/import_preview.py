"""What the editor's import dialog shows: a digitised outline's fit at one tolerance, without Qt.

:func:`fit_preview` fits the points (:func:`profilebench.geometry.fit.fit_outline`) and returns
an :class:`ImportPreview`: the fitted profile with its built outline sampled for drawing, the
largest deviation, the counts of corners and smooth nodes, what the fit had to give up, the
corners whose radius the points do not fix, or the
reason there is nothing to load. It runs in the editor's child process (its argument and result
pickle), so the dialog stays responsive while a large outline is fitted.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["ImportPreview", "fit_preview"]


@dataclass(frozen=True)
class ImportPreview:
    """One fit of the points at ``tolerance`` (m).

    ``profile`` is None, and ``error`` says why, when the points give no valid profile: such a
    fit is never loaded. ``outline`` holds points of the built outline (m) for drawing;
    ``max_deviation`` (m) is the largest distance between it and the points.
    """

    tolerance: float
    profile: object = None
    outline: np.ndarray | None = None
    max_deviation: float | None = None
    corners: int = 0
    smooth: int = 0
    notes: tuple[str, ...] = ()
    error: str = ""
    # one line per corner whose radius the points do not fix (FitResult.unresolved)
    radius_notes: tuple[str, ...] = ()
    unresolved_nodes: tuple[int, ...] = ()
    # with conditions: the Cd at both ends of each open range (OpenRadiusEffect.line())
    effect_lines: tuple[str, ...] = ()

    @property
    def ok(self) -> bool:
        """True when the fit can be loaded."""
        return self.profile is not None and not self.error

    def summary(self) -> str:
        """One line for the dialog: the nodes, and the largest deviation against the tolerance."""
        if not self.ok:
            return f"Cannot load this outline: {self.error}"
        return (
            f"{len(self.profile.nodes)} nodes ({self.corners} corners, {self.smooth} smooth); "
            f"largest deviation {self.max_deviation * 1e3:.1f} mm "
            f"(tolerance {self.tolerance * 1e3:.1f} mm)"
        )


def fit_preview(
    points, tolerance, ground=True, name="imported", samples=800, conditions=None
) -> ImportPreview:
    """Fit ``points`` ((N, 2), m) within ``tolerance`` (m) and sample the result for drawing.

    With ``conditions`` (:class:`~profilebench.assess.conditions.Conditions`), the fitted
    outline is analysed with each radius the points leave open at both ends of its range
    (:func:`profilebench.assess.open_radii.open_radius_effects`), so that the dialog says which
    of them moves the Cd. Bad points or a tolerance that gives no valid profile come back as a
    preview with ``error`` set (the message of the fit's
    :class:`~profilebench.errors.ProfileBenchError`).
    """
    from profilebench.errors import ProfileBenchError
    from profilebench.geometry.fit import fit_outline
    from profilebench.geometry.outline import build_outline

    try:
        fit = fit_outline(points, tolerance=tolerance, ground=ground, name=name)
        outline = np.asarray(build_outline(fit.profile).sample(samples), dtype=float)
    except ProfileBenchError as exc:
        return ImportPreview(tolerance=float(tolerance), error=str(exc))
    smooth = sum(1 for nd in fit.profile.nodes if nd.smooth)
    effects = ()
    if conditions is not None and fit.unresolved:
        from profilebench.assess.open_radii import open_radius_effects

        try:
            effects = open_radius_effects(fit.profile, conditions, fit.radius_ranges)
        except ProfileBenchError:
            effects = ()  # the ranges are still shown; the analysis is the editor's to run
    return ImportPreview(
        tolerance=float(tolerance),
        profile=fit.profile,
        outline=outline,
        max_deviation=float(fit.max_deviation),
        corners=int(fit.corners),
        smooth=smooth,
        notes=tuple(fit.notes),
        radius_notes=tuple(r.message() for r in fit.unresolved),
        unresolved_nodes=tuple(int(r.node) for r in fit.unresolved),
        effect_lines=tuple(e.line() for e in effects),
    )
