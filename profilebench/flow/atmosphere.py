"""ISO 2533 standard atmosphere: temperature, pressure, density, viscosity and speed of sound.

Layers (ISO 2533:1975, identical with the ICAO standard atmosphere to 32 km): a troposphere from
the sea level (288.15 K, 101325 Pa) with a lapse rate of -6.5 K/km to the tropopause at 11 km
geopotential altitude, then an isothermal layer at 216.65 K to 20 km. The standard's own
extension below sea level to -2 km uses the troposphere's lapse rate.

A temperature offset (the "ISA + dT" day) is added to the standard temperature only; the pressure
keeps its standard hydrostatic value at that altitude, and the density follows from the ideal gas
law with the offset temperature.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from profilebench.errors import ConditionsError

__all__ = [
    "Air",
    "standard_atmosphere",
    "sutherland_viscosity",
    "GAS_CONSTANT",
    "GAMMA",
    "G0",
    "SUTHERLAND_BETA",
    "SUTHERLAND_S",
    "ALTITUDE_MIN",
    "ALTITUDE_MAX",
]

# ISO 2533 constants
G0 = 9.80665  # m/s^2, standard acceleration of gravity
GAS_CONSTANT = 287.05287  # J/(kg K), specific gas constant of dry air
GAMMA = 1.4  # ratio of specific heats of air
SUTHERLAND_BETA = 1.458e-6  # kg/(m s K^0.5)
SUTHERLAND_S = 110.4  # K
T_SEA_LEVEL = 288.15  # K
P_SEA_LEVEL = 101325.0  # Pa
LAPSE_TROPOSPHERE = -0.0065  # K/m
H_TROPOPAUSE = 11000.0  # m, geopotential
ALTITUDE_MIN = -2000.0  # m, geopotential
ALTITUDE_MAX = 20000.0  # m, geopotential (top of the isothermal layer)
# K: hottest air taken (an offset beyond weather or any tunnel is a slip; far beyond it the
# viscosity law overflows): common practice, no source
TEMPERATURE_MAX = 500.0

_T_TROPOPAUSE = T_SEA_LEVEL + LAPSE_TROPOSPHERE * H_TROPOPAUSE  # 216.65 K
_P_TROPOPAUSE = P_SEA_LEVEL * (_T_TROPOPAUSE / T_SEA_LEVEL) ** (
    -G0 / (GAS_CONSTANT * LAPSE_TROPOSPHERE)
)


@dataclass(frozen=True)
class Air:
    """State of the air the vehicle moves through.

    Attributes
    ----------
    temperature : float
        Absolute temperature, K.
    pressure : float
        Static pressure, Pa.
    density : float
        Density, kg/m^3.
    dynamic_viscosity : float
        Dynamic viscosity mu, Pa s.
    kinematic_viscosity : float
        Kinematic viscosity nu = mu / rho, m^2/s.
    speed_of_sound : float
        Speed of sound a = sqrt(gamma R T), m/s.
    source : str
        Where the values come from ("ISO 2533 standard atmosphere" or "given by the user").
    """

    temperature: float
    pressure: float
    density: float
    dynamic_viscosity: float
    kinematic_viscosity: float
    speed_of_sound: float
    source: str = "ISO 2533 standard atmosphere"


def _finite_number(name: str, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ConditionsError(f"{name} must be a number, got {value!r}; give a plain float")
    value = float(value)
    if not math.isfinite(value):
        raise ConditionsError(f"{name} is {value!r}; give a finite number")
    return value


def sutherland_viscosity(temperature: float) -> float:
    """Dynamic viscosity of air by Sutherland's law, Pa s.

    mu = beta T^1.5 / (T + S) with beta = 1.458e-6 kg/(m s K^0.5), S = 110.4 K (ISO 2533).

    Parameters
    ----------
    temperature : float
        Absolute temperature, K (> 0).
    """
    t = _finite_number("temperature", temperature)
    if t <= 0.0:
        raise ConditionsError(
            f"absolute temperature {t!r} K is not positive; give a temperature above 0 K"
        )
    return SUTHERLAND_BETA * t**1.5 / (t + SUTHERLAND_S)


def _standard_temperature_pressure(h: float) -> tuple[float, float]:
    """ISO 2533 temperature (K) and pressure (Pa) at geopotential altitude h (m)."""
    if h <= H_TROPOPAUSE:
        t = T_SEA_LEVEL + LAPSE_TROPOSPHERE * h
        # hydrostatic law with a constant lapse rate: p = p0 (T/T0)^(-g0/(R L))
        p = P_SEA_LEVEL * (t / T_SEA_LEVEL) ** (-G0 / (GAS_CONSTANT * LAPSE_TROPOSPHERE))
    else:
        t = _T_TROPOPAUSE
        # isothermal layer: p = p11 exp(-g0 (h - h11) / (R T11))
        p = _P_TROPOPAUSE * math.exp(-G0 * (h - H_TROPOPAUSE) / (GAS_CONSTANT * t))
    return t, p


def standard_atmosphere(altitude: float = 0.0, temperature_offset: float = 0.0) -> Air:
    """Air of the ISO 2533 standard atmosphere, optionally on a warmer or colder day.

    Parameters
    ----------
    altitude : float
        Geopotential altitude, m, from -2000 to 20000.
    temperature_offset : float
        K, added to the standard temperature (pressure keeps its standard value).

    Returns
    -------
    Air
        Temperature and pressure from ISO 2533, density from the ideal gas law
        rho = p / (R T) with R = 287.05287 J/(kg K), viscosity from Sutherland's law, speed of
        sound sqrt(1.4 R T).

    Raises
    ------
    ConditionsError
        Altitude out of range, a non-finite input, or an absolute temperature <= 0 K or above
        TEMPERATURE_MAX (500 K).
    """
    h = _finite_number("altitude", altitude)
    dt = _finite_number("temperature_offset", temperature_offset)
    if not ALTITUDE_MIN <= h <= ALTITUDE_MAX:
        raise ConditionsError(
            f"altitude {h!r} m is outside the standard atmosphere's range "
            f"{ALTITUDE_MIN:.0f} to {ALTITUDE_MAX:.0f} m (geopotential); give an altitude in that "
            "range"
        )
    t_std, p = _standard_temperature_pressure(h)
    t = t_std + dt
    if t <= 0.0:
        raise ConditionsError(
            f"temperature_offset {dt!r} K gives an absolute temperature of {t:.4g} K at "
            f"{h:.0f} m; the offset must be above {-t_std:.2f} K there"
        )
    if t > TEMPERATURE_MAX:
        raise ConditionsError(
            f"temperature_offset {dt:.4g} K gives an absolute temperature of {t:.4g} K at "
            f"{h:.0f} m, above the {TEMPERATURE_MAX:g} K taken for air; give an offset of at most "
            f"{TEMPERATURE_MAX - t_std:.2f} K there"
        )
    rho = p / (GAS_CONSTANT * t)
    mu = sutherland_viscosity(t)
    return Air(
        temperature=t,
        pressure=p,
        density=rho,
        dynamic_viscosity=mu,
        kinematic_viscosity=mu / rho,
        speed_of_sound=math.sqrt(GAMMA * GAS_CONSTANT * t),
    )
