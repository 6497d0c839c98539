"""Base pressure from the boundary layer at separation: Hoerner's blunt-base correlations.

The pressure in the dead-air region behind a blunt base rises as the boundary layer that arrives
at the base gets thicker: the layer, which becomes the free shear layer, insulates the dead air
from the outer flow that entrains it (Hoerner, "Base drag and thick trailing edges", J. Aero. Sci.
17, 1950: the jet-pump picture). Hoerner correlated the base drag coefficient C_Db (on the base
area) with the forebody's friction drag coefficient C_fb on the same area, a measure of that
thickness:

- ``"body"``, a three-dimensional base (a body of revolution):
  C_Db = 0.029 / sqrt(C_fb) (Hoerner, Fluid-Dynamic Drag, 1965, ch. 3, as given by Mandell,
  Caporaso & Bengen, Topics in Advanced Model Rocketry, MIT Press, 1973, eq. (125) and its
  Fig. 34, "a best fit to a large collection of experimental data"; the figure spans C_fb from
  0.0093, where C_Db = 0.30, to 0.8).
- ``"section"``, a two-dimensional base (a blunt trailing edge across the whole span):
  C_Db = 0.135 / C_fb^(1/3) (Hoerner, Fluid-Dynamic Drag, 1965, ch. 3: from memory, not
  re-checked against the book; no stored copy of it was found).

With a uniform pressure on a base normal to the stream, Cp_b = -C_Db.

C_fb from the layers. In two dimensions the friction drag per unit span of a flat plate is the
momentum flux deficit of its layer at the end, D' = rho U^2 theta (von Karman's momentum integral
with no pressure gradient), so a forebody whose two layers arrive at the base with momentum
thicknesses theta_u and theta_l implies C_fb = 2 (theta_u + theta_l) / h_b, h_b the height of the
base: here the vertical distance between the two final separation points, where the wake starts.
The momentum thickness, not the edge speed there, is what the layer brings to the base: at a
sharp edge the inviscid edge speed is singular, the thickness is not. Outside the span of the
correlation the estimate is refused (never clamped).

Which form for a vehicle's centre-line section: the ``"body"`` form. A road vehicle's base has a
finite width (about 1 to 1.5 times its height) and its wake closes from the sides as well as from
above and below, as a body of revolution's does; a two-dimensional base sheds a vortex street
across the whole span, whose lower base pressure (-0.5 to -0.6 behind thin layers) no square-back
vehicle shows (-0.15 to -0.3, Roshko, NACA TN 3169, 1954, and later compilations: from memory).
The ``"section"`` form is for comparing with two-dimensional tests (a blunt trailing edge, a
section spanning a tunnel). Only the section's two layers are counted: the side faces' layers,
which a real base also has, would raise C_fb and the base pressure, so the estimate leans to the
lower (more negative) base pressure.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.errors import InputError

__all__ = [
    "BASE_FORMS",
    "CFB_RANGE",
    "BaseEstimate",
    "LayerBasePressure",
    "base_pressure_coefficient",
    "forebody_friction_coefficient",
]

#: the correlations: form -> (coefficient, exponent) of C_Db = coefficient / C_fb**exponent
_CORRELATIONS = {
    "body": (0.029, 0.5),  # Hoerner 1965 via Mandell et al. 1973, eq. (125)
    "section": (0.135, 1.0 / 3.0),  # Hoerner 1965, from memory
}
BASE_FORMS = tuple(_CORRELATIONS)

# The span of C_fb taken as the correlations' range: that of the published figure of the "body"
# form (Mandell et al. 1973, Fig. 34: C_fb from (0.029 / 0.30)^2 = 0.0093 to 0.8). No span was
# found for the "section" form; the same one is used (a choice of this project, no source).
CFB_RANGE = ((0.029 / 0.30) ** 2, 0.8)

# separation points less than this share of the frontal height apart leave no base to speak of
_MIN_BASE_RATIO = 0.02


def base_pressure_coefficient(c_fb: float, form: str = "body") -> float:
    """Base pressure coefficient Cp_b = -C_Db of a blunt base behind a forebody whose friction
    drag coefficient on the base area is ``c_fb`` (Hoerner's correlations, see the module
    docstring; ``form`` "body" for a three-dimensional base, "section" for a two-dimensional one).

    Raises InputError for an unknown form or a ``c_fb`` outside :data:`CFB_RANGE`.
    """
    if form not in _CORRELATIONS:
        raise InputError(f"base form {form!r} is not known; give one of {', '.join(BASE_FORMS)}")
    if isinstance(c_fb, bool) or not isinstance(c_fb, (int, float)) or not math.isfinite(c_fb):
        raise InputError(f"C_fb = {c_fb!r} is not a finite number; give the friction coefficient")
    lo, hi = CFB_RANGE
    if not lo <= c_fb <= hi:
        raise InputError(
            f"C_fb = {c_fb:.4g} is outside the blunt-base correlation's range {lo:.4g} to "
            f"{hi:g}; the correlation does not hold there"
        )
    coefficient, exponent = _CORRELATIONS[form]
    return -coefficient / c_fb**exponent


def forebody_friction_coefficient(theta_upper: float, theta_lower: float, base_height: float):
    """C_fb = 2 (theta_u + theta_l) / h_b: the friction drag coefficient, on the base height, of
    flat-plate forebodies whose layers end with these momentum thicknesses (m; h_b in m)."""
    return 2.0 * (float(theta_upper) + float(theta_lower)) / float(base_height)


@dataclass(frozen=True)
class BaseEstimate:
    """The base pressure found from the layers at the two final separation points.

    ``ok`` False: no estimate (``message`` says why; ``cp_b`` is None). ``theta``: (upper,
    lower) momentum thicknesses at separation (m); ``base_height``: h_b (m); ``c_fb``: the
    forebody friction coefficient on h_b; ``passes``: wake passes the estimate took.
    """

    form: str
    ok: bool
    message: str
    cp_b: float | None = None
    c_fb: float | None = None
    theta: tuple[float, float] | None = None
    base_height: float | None = None
    passes: int = 1

    def note(self) -> str:
        """One line for the analysis notes and the run line."""
        if not self.ok:
            return self.message
        return (
            f"base pressure Cp_b = {self.cp_b:.3f} from the boundary layer at separation "
            f"({self.form} form of Hoerner's blunt-base correlation; C_fb = {self.c_fb:.4f} from "
            f"theta = {self.theta[0] * 1e3:.1f} / {self.theta[1] * 1e3:.1f} mm over a base of "
            f"{self.base_height * 1e3:.0f} mm)"
        )


@dataclass(frozen=True)
class LayerBasePressure:
    """The base-pressure model that derives Cp_b from the layers at separation (the flow's
    ``base_pressure`` argument instead of a number).

    ``form``: "body" or "section" (see the module docstring). ``start``: the Cp_b of the first
    wake pass where the wake's shape depends on it (shear layers leaving a sharp edge across the
    stream); elsewhere the wake does not depend on it and one pass gives the estimate.
    """

    form: str = "body"
    start: float = -0.25

    def __post_init__(self):
        if self.form not in _CORRELATIONS:
            raise InputError(
                f"base form {self.form!r} is not known; give one of {', '.join(BASE_FORMS)}"
            )

    def estimate(self, flow, height: float) -> BaseEstimate:
        """The estimate from ``flow`` (a successful ProfileFlow) of a section of frontal height
        ``height`` (m): its two surfaces' momentum thickness and position at their final
        separation point (or at their end when the layer stays attached)."""
        thetas, ys = [], []
        for sfl in (flow.upper, flow.lower):
            bl = sfl.bl
            sep = bl.separation
            i = int(sep.index) if sep is not None else len(bl.s) - 1
            s_at = float(sep.s) if sep is not None else float(bl.s[-1])
            thetas.append(float(bl.theta[i]))
            ys.append(float(np.interp(s_at, sfl.surface.s, sfl.surface.y)))
        h_b = abs(ys[0] - ys[1])
        if not all(math.isfinite(v) and v >= 0.0 for v in thetas) or not math.isfinite(h_b):
            return BaseEstimate(
                self.form, False, "the boundary layer at separation has no finite thickness"
            )
        if h_b < _MIN_BASE_RATIO * height:
            return BaseEstimate(
                self.form,
                False,
                f"the two separation points are {h_b * 1e3:.0f} mm apart in height: no base "
                "for the blunt-base correlation; use the constant base pressure",
            )
        c_fb = forebody_friction_coefficient(thetas[0], thetas[1], h_b)
        try:
            cp_b = base_pressure_coefficient(c_fb, self.form)
        except InputError as exc:
            return BaseEstimate(
                self.form,
                False,
                f"{exc} (momentum thickness {thetas[0] * 1e3:.2f} / {thetas[1] * 1e3:.2f} mm at "
                f"the upper / lower separation, base {h_b * 1e3:.0f} mm high): use the constant "
                "base pressure for this outline",
                c_fb=c_fb,
                theta=(thetas[0], thetas[1]),
                base_height=h_b,
            )
        return BaseEstimate(self.form, True, "", cp_b, c_fb, (thetas[0], thetas[1]), h_b)
