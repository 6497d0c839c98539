"""Drag force, drag power and drag area from a drag coefficient.

F = 1/2 rho V^2 Cd A (definition of the drag coefficient), P = F V, CdA = Cd A. Arguments may be
scalars or numpy arrays (e.g. a speed sweep for a power curve); they broadcast against each other.
A scalar result comes back as a float.
"""

from __future__ import annotations

import numpy as np

from profilebench.errors import InputError

__all__ = ["drag_force", "drag_power", "cda"]


def _checked(name: str, value, *, positive: bool, unit: str) -> np.ndarray:
    if value is None or isinstance(value, (bool, np.bool_, str)):
        raise InputError(f"{name} must be a number in {unit}, got {value!r}; give a float")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(
            f"{name} must be a number or an array of numbers in {unit}, got {value!r}"
        ) from None
    if not np.all(np.isfinite(arr)):
        raise InputError(f"{name} contains a NaN or infinite value ({value!r}); give finite {unit}")
    if positive and np.any(arr <= 0.0):
        raise InputError(f"{name} must be > 0 {unit}, got {value!r}; give a positive value")
    if not positive and np.any(arr < 0.0):
        raise InputError(f"{name} must be >= 0 {unit}, got {value!r}; give a non-negative value")
    return arr


def _out(arr: np.ndarray):
    return float(arr) if arr.ndim == 0 else arr


def cda(cd, area):
    """Drag area CdA = Cd * A, m^2.

    Parameters
    ----------
    cd : float or array
        Drag coefficient based on ``area`` (>= 0).
    area : float or array
        Reference (frontal) area, m^2 (> 0).
    """
    return _out(
        _checked("cd", cd, positive=False, unit="(dimensionless)")
        * _checked("area", area, positive=True, unit="m^2")
    )


def drag_force(cd, area, density, speed):
    """Drag force F = 1/2 rho V^2 Cd A, N (definition of the drag coefficient).

    Parameters
    ----------
    cd : float or array
        Drag coefficient based on ``area`` (>= 0).
    area : float or array
        Reference (frontal) area, m^2 (> 0).
    density : float or array
        Air density, kg/m^3 (> 0).
    speed : float or array
        Speed through still air, m/s (>= 0).
    """
    c = _checked("cd", cd, positive=False, unit="(dimensionless)")
    a = _checked("area", area, positive=True, unit="m^2")
    rho = _checked("density", density, positive=True, unit="kg/m^3")
    v = _checked("speed", speed, positive=False, unit="m/s")
    return _out(0.5 * rho * v**2 * c * a)


def drag_power(force, speed):
    """Power to overcome the drag, P = F V, W.

    Parameters
    ----------
    force : float or array
        Drag force, N (>= 0).
    speed : float or array
        Speed through still air, m/s (>= 0).
    """
    f = _checked("force", force, positive=False, unit="N")
    v = _checked("speed", speed, positive=False, unit="m/s")
    return _out(f * v)
