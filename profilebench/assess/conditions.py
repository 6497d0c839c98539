"""Flow conditions of an analysis: speed, air, ground, transition, separation and scale test.

:class:`Conditions` is an immutable value checked on creation: a bad field raises
:class:`~profilebench.errors.ConditionsError` naming the field, the value given and the range
allowed. The air comes from the ISO 2533 standard atmosphere (altitude and temperature offset)
unless the user gives density and kinematic viscosity together.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping
from dataclasses import dataclass

from profilebench.errors import ConditionsError, excerpt
from profilebench.flow.atmosphere import (
    ALTITUDE_MAX,
    ALTITUDE_MIN,
    Air,
    standard_atmosphere,
)

# turbulent separation usually taken at H 1.8..2.8 (Cebeci & Bradshaw, Momentum Transfer in
# Boundary Layers, 1977): the range the boundary-layer march itself accepts
from profilebench.flow.boundary_layer import H_SEPARATION_RANGE
from profilebench.flow.base_pressure import BASE_FORMS, LayerBasePressure

__all__ = [
    "Conditions",
    "kmh_to_ms",
    "ms_to_kmh",
    "SPEED_MAX",
    "TRANSITION_MODES",
    "BASE_MODELS",
]

SPEED_MAX = 150.0  # m/s; above this (about Mach 0.44 at sea level) compressibility matters
TRANSITION_MODES = ("free", "turbulent")
# where the base pressure comes from: "constant" (base_pressure as given), or the boundary layer
# at separation through Hoerner's blunt-base correlation, "body" (a three-dimensional base, for a
# vehicle) or "section" (a two-dimensional base); see profilebench.flow.base_pressure
BASE_MODELS = ("constant",) + BASE_FORMS
BASE_PRESSURE_RANGE = (-1.5, 0.0)  # Cp; a plate normal to the flow about -1.4 (Roshko, from memory)
PANELS_RANGE = (40, 2000)
# largest frontal area (m^2) and width (m) taken: far beyond any vehicle, and small enough that
# a force from them stays finite (common practice, no source)
FRONTAL_AREA_MAX = 1.0e4
WIDTH_MAX = 1.0e4


def kmh_to_ms(speed_kmh: float) -> float:
    """Convert a speed from km/h to m/s (1 km/h = 1/3.6 m/s)."""
    return _number("speed_kmh", speed_kmh) / 3.6


def ms_to_kmh(speed_ms: float) -> float:
    """Convert a speed from m/s to km/h (1 m/s = 3.6 km/h)."""
    return _number("speed_ms", speed_ms) * 3.6


def _number(name: str, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ConditionsError(
            f"{name} must be a number, got {value!r} ({type(value).__name__}); give a plain float"
        )
    try:
        value = float(value)
    except OverflowError:  # a whole number beyond any float
        raise ConditionsError(
            f"{name} is a whole number of {len(str(abs(value)))} digits, too "
            "large; give a plain number"
        ) from None
    if not math.isfinite(value):
        raise ConditionsError(f"{name} is {value!r}; give a finite number")
    return value


@dataclass(frozen=True)
class Conditions:
    """Flow conditions of one analysis (SI units).

    Attributes
    ----------
    speed : float
        m/s, vehicle speed through still air, 0 < speed <= 150.
    altitude : float
        m, ISO 2533 geopotential altitude, -2000..20000.
    temperature_offset : float
        K, added to the ISO 2533 temperature.
    density, kinematic_viscosity : float or None
        kg/m^3 and m^2/s; given together they override the standard atmosphere.
    ground : bool
        True: y = 0 is a slip (moving-belt) ground.
    transition : str or float
        "free" (a transition criterion), "turbulent" (from the stagnation point) or a forced
        transition position as an arc length (m, >= 0) from the stagnation point.
    h_separation : float
        Turbulent separation threshold on the shape factor H, 1.8..2.8 (default 2.4, a common
        choice, Cebeci & Bradshaw 1977).
    frontal_area : float or None
        m^2, for CdA, drag force and power.
    width : float or None
        m; the frontal area is width * h when frontal_area is not given.
    model_scale : float
        Scale-model length / full-scale length, 0 < scale <= 1.
    tunnel_speed : float or None
        m/s, the scale test's tunnel speed, 0 < speed <= 150.
    base_pressure : float
        Cp in separated regions (base-pressure model), -1.5..0. Default -0.25: square-back
        vehicles -0.15 to -0.3 (Roshko, NACA TN 3169, 1954, and later compilations: from memory).
        With ``base_model`` other than "constant" it is only the first guess of the wake passes
        whose shape depends on the base pressure.
    base_model : str
        Where the base pressure comes from: "constant" (default: ``base_pressure``), or the
        boundary layer at the two final separation points through Hoerner's blunt-base
        correlation, "body" (a three-dimensional base: a vehicle's) or "section" (a
        two-dimensional base); see :mod:`profilebench.flow.base_pressure`.
    panels : int
        Panel count of the inviscid solve, 40..2000.
    side_relief : bool
        True (default): with a ``width`` and a ground, the underbody's pressures come from a
        gap channel that leaks through its two sides (profilebench.flow.underbody); without a
        width the 2D section's are used (and the analysis says so). False: always the 2D
        section's.
    """

    speed: float = 30.0
    altitude: float = 0.0
    temperature_offset: float = 0.0
    density: float | None = None
    kinematic_viscosity: float | None = None
    ground: bool = True
    transition: str | float = "free"
    h_separation: float = 2.4
    frontal_area: float | None = None
    width: float | None = None
    model_scale: float = 1.0
    tunnel_speed: float | None = None
    base_pressure: float = -0.25
    base_model: str = "constant"
    panels: int = 250
    side_relief: bool = True

    # ------------------------------------------------------------------ validation
    def __post_init__(self):
        def setf(name, value):
            object.__setattr__(self, name, value)

        def in_range(name, lo, hi, lo_open=False, hi_open=False, unit=""):
            v = _number(name, getattr(self, name))
            low_bad = v <= lo if lo_open else v < lo
            high_bad = v >= hi if hi_open else v > hi
            if low_bad or high_bad:
                lb = "(" if lo_open else "["
                hb = ")" if hi_open else "]"
                raise ConditionsError(
                    f"{name} = {v!r}{unit} is outside the allowed range {lb}{lo:g}, {hi:g}{hb}"
                    f"{unit}; give a value in that range"
                )
            setf(name, v)

        def positive_or_none(name, unit, upper=math.inf):
            value = getattr(self, name)
            if value is None:
                return
            v = _number(name, value)
            if v <= 0.0 or v > upper:
                rng = "> 0" if upper == math.inf else f"in (0, {upper:g}]"
                raise ConditionsError(
                    f"{name} = {v!r} {unit} is not allowed; it must be {rng} {unit}, or None to "
                    "leave it unset"
                )
            setf(name, v)

        in_range("speed", 0.0, SPEED_MAX, lo_open=True, unit=" m/s")
        in_range("altitude", ALTITUDE_MIN, ALTITUDE_MAX, unit=" m")
        _number("temperature_offset", self.temperature_offset)
        setf("temperature_offset", float(self.temperature_offset))

        if (self.density is None) != (self.kinematic_viscosity is None):
            given = "density" if self.density is not None else "kinematic_viscosity"
            missing = "kinematic_viscosity" if given == "density" else "density"
            raise ConditionsError(
                f"{given} is given ({getattr(self, given)!r}) but {missing} is not; give both "
                "density (kg/m^3) and kinematic_viscosity (m^2/s), or neither to use the "
                "standard atmosphere"
            )
        positive_or_none("density", "kg/m^3")
        positive_or_none("kinematic_viscosity", "m^2/s")

        if not isinstance(self.ground, bool):
            raise ConditionsError(f"ground must be True or False, got {self.ground!r}; give a bool")
        if not isinstance(self.side_relief, bool):
            raise ConditionsError(
                f"side_relief must be True or False, got {excerpt(repr(self.side_relief))}; "
                "give a bool"
            )

        tr = self.transition
        if isinstance(tr, str):
            if tr not in TRANSITION_MODES:
                raise ConditionsError(
                    f"transition = {tr!r} is not allowed; give 'free', 'turbulent' or a forced "
                    "transition position in metres of arc length (>= 0) from the stagnation point"
                )
        else:
            if isinstance(tr, bool) or not isinstance(tr, (int, float)):
                raise ConditionsError(
                    f"transition = {tr!r} is not allowed; give 'free', 'turbulent' or a forced "
                    "transition position in metres of arc length (>= 0) from the stagnation point"
                )
            v = _number("transition", tr)
            if v < 0.0:
                raise ConditionsError(
                    f"transition = {v!r} m: a forced transition position must be >= 0 m of arc "
                    "length from the stagnation point; or give 'free' or 'turbulent'"
                )
            setf("transition", v)

        in_range("h_separation", *H_SEPARATION_RANGE)
        positive_or_none("frontal_area", "m^2", upper=FRONTAL_AREA_MAX)
        positive_or_none("width", "m", upper=WIDTH_MAX)
        in_range("model_scale", 0.0, 1.0, lo_open=True)
        positive_or_none("tunnel_speed", "m/s", upper=SPEED_MAX)
        in_range("base_pressure", *BASE_PRESSURE_RANGE)
        if not isinstance(self.base_model, str) or self.base_model not in BASE_MODELS:
            raise ConditionsError(
                f"base_model = {excerpt(str(self.base_model))} is not allowed; give one of "
                f"{', '.join(repr(m) for m in BASE_MODELS)}"
            )

        p = self.panels
        if isinstance(p, bool) or not isinstance(p, int):
            raise ConditionsError(
                f"panels must be a whole number, got {p!r}; give an int in "
                f"{PANELS_RANGE[0]}..{PANELS_RANGE[1]}"
            )
        if not PANELS_RANGE[0] <= p <= PANELS_RANGE[1]:
            raise ConditionsError(
                f"panels = {excerpt(str(p))} is outside the allowed range "
                f"{PANELS_RANGE[0]}..{PANELS_RANGE[1]}; "
                "give a panel count in that range"
            )

        # the standard atmosphere checks the absolute temperature (> 0 K) with the offset
        standard_atmosphere(self.altitude, self.temperature_offset)

    # ------------------------------------------------------------------ air
    @property
    def air(self) -> Air:
        """The air: ISO 2533 at altitude and temperature offset, or the given density/viscosity.

        With a given density and kinematic viscosity, temperature, pressure and speed of sound
        are still those of the standard atmosphere at the altitude and offset (used only for a
        Mach number); the dynamic viscosity is rho * nu.
        """
        std = standard_atmosphere(self.altitude, self.temperature_offset)
        if self.density is None:
            return std
        return Air(
            temperature=std.temperature,
            pressure=std.pressure,
            density=self.density,
            dynamic_viscosity=self.density * self.kinematic_viscosity,
            kinematic_viscosity=self.kinematic_viscosity,
            speed_of_sound=std.speed_of_sound,
            source="given by the user (density and kinematic viscosity)",
        )

    @property
    def rho(self) -> float:
        """Density, kg/m^3."""
        return self.air.density

    @property
    def nu(self) -> float:
        """Kinematic viscosity, m^2/s."""
        return self.air.kinematic_viscosity

    @property
    def mu(self) -> float:
        """Dynamic viscosity, Pa s."""
        return self.air.dynamic_viscosity

    @property
    def dynamic_pressure(self) -> float:
        """Dynamic pressure q = 1/2 rho V^2, Pa."""
        return 0.5 * self.rho * self.speed**2

    @property
    def mach(self) -> float:
        """Mach number V / a (a from the standard atmosphere's temperature)."""
        return self.speed / self.air.speed_of_sound

    def reynolds(self, length: float) -> float:
        """Reynolds number V L / nu of the full-scale vehicle for a length L (m, > 0)."""
        L = _length("length", length)
        return self.speed * L / self.nu

    def model_reynolds(self, length: float) -> float | None:
        """Reynolds number of the scale test, tunnel_speed * L * model_scale / nu.

        ``length`` is the full-scale length L (m); the tunnel air is taken to be the same as these
        conditions' air. None when no tunnel speed is given.
        """
        L = _length("length", length)
        if self.tunnel_speed is None:
            return None
        return self.tunnel_speed * L * self.model_scale / self.nu

    @property
    def base_pressure_model(self):
        """What the flow takes for the base pressure: the number ``base_pressure`` with
        ``base_model`` "constant", else a
        :class:`~profilebench.flow.base_pressure.LayerBasePressure` of that form (starting from
        ``base_pressure``)."""
        if self.base_model == "constant":
            return self.base_pressure
        return LayerBasePressure(self.base_model, self.base_pressure)

    @property
    def relief_width(self) -> float | None:
        """The width (m) the underbody side relief uses, or None when the 2D section's
        underbody is used (relief switched off, no width given, or no ground)."""
        if not self.side_relief or not self.ground:
            return None
        return self.width

    def reference_area(self, h: float) -> float | None:
        """Reference area for CdA, force and power, m^2.

        frontal_area if given; else width * h (h the profile's frontal height, m); else None.
        """
        if self.frontal_area is not None:
            return self.frontal_area
        if self.width is not None:
            return self.width * _length("h", h)
        return None

    # ------------------------------------------------------------------ (de)serialisation
    def to_dict(self) -> dict:
        """The fields as a dict of plain JSON-able types (float, int, bool, str, None)."""
        return {f.name: getattr(self, f.name) for f in dataclasses.fields(self)}

    @classmethod
    def from_dict(cls, data: Mapping) -> "Conditions":
        """Build conditions from a dict as written by :meth:`to_dict`.

        Missing keys take their defaults. Unknown keys and wrongly typed values raise
        ConditionsError naming the key.
        """
        if not isinstance(data, Mapping):
            raise ConditionsError(
                f"conditions must be a mapping of field names to values, got "
                f"{type(data).__name__}; give a dict such as Conditions().to_dict()"
            )
        known = {f.name for f in dataclasses.fields(cls)}
        for key in data:
            if key not in known:
                raise ConditionsError(
                    f"unknown conditions key {key!r}; allowed keys are {', '.join(sorted(known))}"
                )
        return cls(**dict(data))

    def replace(self, **changes) -> "Conditions":
        """A copy with some fields changed (checked like a new instance)."""
        known = {f.name for f in dataclasses.fields(self)}
        for key in changes:
            if key not in known:
                raise ConditionsError(
                    f"unknown conditions field {key!r}; allowed fields are "
                    f"{', '.join(sorted(known))}"
                )
        return dataclasses.replace(self, **changes)


def _length(name: str, value) -> float:
    v = _number(name, value)
    if v <= 0.0:
        raise ConditionsError(f"{name} = {v!r} m must be > 0 m; give a positive length in metres")
    return v
