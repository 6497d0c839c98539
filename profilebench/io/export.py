"""Result export: CSV of the surface data and JSON of the results, both written atomically.

Both writers go through :func:`profilebench.io.atomic.atomic_write_text` (temporary file in the
same folder, fsync, then os.replace), so a file is either the previous one or the complete new
one. Units are SI (m, m/s, N, W) in both files.
"""

from __future__ import annotations

import csv
import dataclasses
import datetime
import enum
import json
import math

import numpy as np

import profilebench
from profilebench.assess.results import Analysis
from profilebench.errors import InputError
from profilebench.io.atomic import atomic_write_text

__all__ = [
    "SURFACE_COLUMNS",
    "CAUTION",
    "write_surface_csv",
    "write_results_json",
    "results_to_dict",
    "surface_table",
    "run_record",
]

SURFACE_COLUMNS = ("surface", "s", "x", "y", "ue", "cp", "theta", "delta_star", "H", "cf", "regime")

CAUTION = profilebench.CAUTION  # one text for the whole product

RESULTS_FORMAT = "profilebench-results"
RESULTS_VERSION = 1


def _regime(value) -> str:
    """A boundary-layer regime (an Enum, or its text) as a lower-case word."""
    return str(value.value if isinstance(value, enum.Enum) else value).lower()


def _check_analysis(analysis, what):
    if not isinstance(analysis, Analysis):
        raise InputError(
            f"{what} needs an Analysis from profilebench.assess.analysis.analyze, got "
            f"{type(analysis).__name__}"
        )


def surface_table(analysis):
    """Rows (tuples in the order of SURFACE_COLUMNS), one per panel station, upper then lower.

    Each station of the inviscid solution belongs to the surface whose ``surface.index`` holds
    it; stations on neither surface (beyond both marches, in the wake) are written with surface
    "wake" and empty boundary-layer cells.

    Raises
    ------
    InputError
        If the analysis has no surface flow (a failed analysis): its status and message are named.
    """
    _check_analysis(analysis, "write_surface_csv")
    flow = analysis.flow
    if flow is None or flow.inviscid is None or flow.upper is None or flow.lower is None:
        raise InputError(
            "the analysis has no surface data to export (status: "
            f"{analysis.status.value}: {analysis.message}); fix the "
            "profile or conditions and analyse again"
        )
    inv = flow.inviscid
    x, y = np.asarray(inv.x, float), np.asarray(inv.y, float)
    ue, cp = np.asarray(inv.ue, float), np.asarray(inv.cp, float)
    n = len(x)
    rows, seen = [], np.zeros(n, dtype=bool)
    for name, sf in (("upper", flow.upper), ("lower", flow.lower)):
        idx = np.asarray(sf.surface.index, dtype=int)
        bl = sf.bl
        m = len(idx)
        s_bl = np.asarray(bl.s, float)
        off = len(s_bl) - m  # the march may start with the stagnation point itself
        if off < 0:
            raise InputError(f"{name} surface: boundary layer has fewer stations than the surface")
        regime = list(bl.regime)
        for k, i in enumerate(idx):
            j = k + off
            rows.append(
                (
                    name,
                    s_bl[j],
                    x[i],
                    y[i],
                    ue[i],
                    cp[i],
                    float(bl.theta[j]),
                    float(bl.delta_star[j]),
                    float(bl.H[j]),
                    float(bl.cf[j]),
                    _regime(regime[j]),
                )
            )
            seen[i] = True
    for i in np.where(~seen)[0]:
        rows.append(("wake", "", x[i], y[i], ue[i], cp[i], "", "", "", "", "separated"))
    return rows


def _cell(v):
    if isinstance(v, str):
        return v
    v = float(v)
    if not math.isfinite(v):
        raise InputError(f"a surface value is {v!r}; the analysis is not usable for export")
    return repr(v)


def write_surface_csv(analysis, path):
    """Write one row per panel station: surface, s (m), x, y (m), ue (Ue/V), cp, theta,
    delta_star (m), H, cf, regime. Atomic. Returns the path written."""
    rows = surface_table(analysis)

    def write(fh):
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(SURFACE_COLUMNS)
        for r in rows:
            w.writerow([_cell(v) for v in r])

    return atomic_write_text(path, write)


def _plain(value):
    """JSON-safe copy: enums to their value, dataclasses to dicts, arrays to lists, NaN to None."""
    if isinstance(value, enum.Enum):
        return value.value
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        return {
            f.name: _plain(getattr(value, f.name))  # any dataclass: its fields by name
            for f in dataclasses.fields(value)
            if not f.name.startswith("_")
        }
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return [_plain(v) for v in value.tolist()]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        v = float(value)
        return v if math.isfinite(v) else None
    if value is None or isinstance(value, str):
        return value
    return str(value)


def run_record(analysis, created=None) -> dict:
    """What a run was made with, so that two pages or files can be compared safely.

    Every condition (speed, air, ground, transition, separation threshold, base pressure and
    where it comes from, panels, area or width, model scale), the base pressure used (found from
    the boundary layer at separation with ``base_model`` other than "constant"), the air it
    gives, the r/t table(s) the corners were
    judged by, the profilebench version and the date (UTC, ISO 8601; ``created`` overrides it).
    """
    _check_analysis(analysis, "run_record")
    cond = analysis.conditions
    conditions = cond.to_dict()
    try:
        a = cond.air
        air = {
            "density_kg_m3": _plain(a.density),
            "kinematic_viscosity_m2_s": _plain(a.kinematic_viscosity),
            "source": (
                "given density and viscosity"
                if cond.density is not None
                else "ISO 2533 standard atmosphere"
            ),
        }
    except Exception:  # conditions that give no air still get a record of what was asked
        air = None
    tables = sorted({c.table_name for c in analysis.corners if c.table_name})
    when = created or datetime.datetime.now(datetime.timezone.utc)
    flow = analysis.flow
    estimate = None if flow is None else flow.base_estimate
    return {
        "conditions": _plain(conditions),
        # the base pressure the analysis used (the constant, or the one found from the layers
        # at separation) and how it was found
        "base_pressure_used": (
            None
            if analysis.drag is None or (estimate is not None and not estimate.ok)
            else _plain(analysis.drag.base_pressure)
        ),
        "base_pressure_note": None if estimate is None else estimate.note(),
        "air": air,
        "tables": tables,
        "profilebench_version": profilebench.__version__,
        "created_utc": when.isoformat(timespec="seconds"),
    }


def results_to_dict(analysis) -> dict:
    """The results as plain JSON types (see :func:`write_results_json`)."""
    _check_analysis(analysis, "write_results_json")
    cond = analysis.conditions
    conditions = cond.to_dict()
    drag = analysis.drag
    summary = {
        "profile": analysis.profile.name,
        "status": analysis.status.value,
        "success": bool(analysis.success),
        "message": analysis.message,
        "cd": None if drag is None else _plain(drag.cd),
        "cl": None if drag is None else _plain(drag.cl),
        "cda_m2": None if drag is None else _plain(drag.cda),
        "force_N": None if drag is None else _plain(drag.force),
        "power_W": None if drag is None else _plain(drag.power),
        "speed_m_s": _plain(cond.speed),
        "reynolds": _plain(analysis.reynolds),
        "model_reynolds": _plain(analysis.model_reynolds),
    }
    return {
        "format": RESULTS_FORMAT,
        "format_version": RESULTS_VERSION,
        "profilebench_version": profilebench.__version__,
        "units": "SI (m, m/s, N, W)",
        "caution": CAUTION,
        "summary": summary,
        "drag": _plain(drag),
        "corners": _plain(list(analysis.corners)),
        "events": _plain(list(analysis.events)),
        "conditions": _plain(conditions),
        "run": run_record(analysis),
        "warnings": list(analysis.warnings),
    }


def write_results_json(analysis, path, refinement=None, open_radii=()):
    """Write the results as JSON: summary, drag breakdown, corners, events, conditions, caution,
    versions, and with ``refinement`` (a :class:`~profilebench.assess.refinement.RefinementCheck`)
    its answer under "refinement" (with its ``holds``); with ``open_radii`` (the
    :class:`~profilebench.assess.open_radii.OpenRadiusEffect` of a fitted outline's radii that
    its points leave open) each range and the Cd at its ends under "open_radii". Non-finite
    numbers are written as null. Atomic. Returns the path written."""
    data = results_to_dict(analysis)
    if refinement is not None:
        data["refinement"] = dict(_plain(refinement), holds=bool(refinement.holds))
    if open_radii:
        data["open_radii"] = [
            {
                "node": int(e.range.node),
                "label": e.range.label,
                "x_m": e.range.x,
                "y_m": e.range.y,
                "fitted_radius_m": e.range.radius,
                "lowest_radius_m": e.range.low,
                "highest_radius_m": e.range.high,
                "highest_is_the_limit_tried": bool(e.range.high_is_limit),
                "cd_fitted": e.cd,
                "ends": [
                    {"radius_m": r, "cd": cd, "verdict": v, "message": m} for r, cd, v, m in e.ends
                ],
                "cd_spread": e.spread,
            }
            for e in open_radii
        ]
    text = json.dumps(data, indent=2, allow_nan=False)
    return atomic_write_text(path, lambda fh: fh.write(text + "\n"))
