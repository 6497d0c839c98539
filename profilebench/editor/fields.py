"""Parsing what the user types into entry fields (mm, km/h...), with messages that help.

Each parser returns SI units or raises :class:`~profilebench.errors.InputError` saying what is
wrong with the entry and what to type instead. Nothing is clamped: a value out of range is
refused, not changed.
"""

from __future__ import annotations

import math

from profilebench.errors import InputError, excerpt

__all__ = [
    "parse_number",
    "parse_length_mm",
    "parse_point_mm",
    "parse_speed_kmh",
    "parse_optional",
    "format_mm",
]


def parse_number(
    text: str,
    name: str,
    unit: str = "",
    minimum: float | None = None,
    maximum: float | None = None,
    exclusive_minimum: bool = False,
) -> float:
    """The number typed in ``text``; a comma as decimal separator is accepted."""
    raw = (text or "").strip().replace(",", ".")
    u = f" {unit}" if unit else ""
    if not raw:
        raise InputError(f"{name} is empty; type a number{u}")
    try:
        value = float(raw)
    except ValueError:
        raise InputError(
            f"{name}: {excerpt(text.strip())} is not a number; type a number{u}, e.g. 100"
        ) from None
    if not math.isfinite(value):
        raise InputError(
            f"{name}: {excerpt(text.strip())} is not a finite number; type a number{u}"
        )
    if minimum is not None and (value <= minimum if exclusive_minimum else value < minimum):
        op = ">" if exclusive_minimum else ">="
        raise InputError(f"{name} = {value:g}{u} is too small; it must be {op} {minimum:g}{u}")
    if maximum is not None and value > maximum:
        raise InputError(f"{name} = {value:g}{u} is too large; it must be <= {maximum:g}{u}")
    return value


def parse_length_mm(
    text: str, name: str, minimum_mm: float | None = 0.0, exclusive: bool = False
) -> float:
    """A length typed in millimetres, returned in metres."""
    return parse_number(text, name, "mm", minimum_mm, None, exclusive) / 1000.0


def parse_point_mm(text: str, name: str = "coordinate") -> tuple[float, float]:
    """A position typed as "x, y" (or "x; y") in millimetres, returned as (x, y) in metres."""
    parts = (text or "").replace(";", ",").split(",")
    if len(parts) != 2:
        raise InputError(f"{excerpt((text or '').strip())}: type two numbers 'x, y' in mm")
    x, y = (parse_number(p, name, "mm") / 1000.0 for p in parts)
    return (x, y)


def parse_speed_kmh(text: str, name: str = "speed") -> float:
    """A speed typed in km/h, returned in m/s (1 km/h = 1/3.6 m/s)."""
    return parse_number(text, name, "km/h", 0.0, None, exclusive_minimum=True) / 3.6


def parse_optional(text: str, parser, *args, **kwargs):
    """None for an empty entry, else ``parser(text, *args, **kwargs)``."""
    if not (text or "").strip():
        return None
    return parser(text, *args, **kwargs)


def format_mm(value_m: float | None, digits: int = 1) -> str:
    """A length in metres shown in mm ("" for None)."""
    if value_m is None:
        return ""
    return f"{value_m * 1000:.{digits}f}"
