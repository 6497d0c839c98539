"""A sweep or grid table written as CSV: one row per point, empty cells where a point has no
number (a failed point: its status and message say why), atomic."""

from __future__ import annotations

import csv

from profilebench.io.atomic import atomic_write_text
from profilebench.studies.points import DRAG_FIELDS
from profilebench.studies.sweep import GridTable, SweepTable

__all__ = ["sweep_rows", "write_sweep_csv", "PARAMETER_COLUMNS"]

#: the first column of a sweep's CSV, by parameter
PARAMETER_COLUMNS = {"radius": "radius_m", "displacement": "displacement_m", "speed": "speed_m_s"}
_UNITS = {
    "cd": "cd",
    "cd_friction": "cd_friction",
    "cd_pressure": "cd_pressure",
    "cd_base": "cd_base",
    "cd_corners": "cd_corners",
    "cda": "cda_m2",
    "force": "force_N",
    "power": "power_W",
}


def _cell(value, masked):
    return "" if masked else repr(float(value))


def sweep_rows(table):
    """(header, rows) of a :class:`SweepTable` or :class:`GridTable` (a row per point)."""
    rows_of = table.rows if isinstance(table, GridTable) else (table,)
    first = rows_of[0]
    header = [PARAMETER_COLUMNS[first.parameter]]
    if first.positions is not None:
        header += ["x_m", "y_m"]
    if first.parameter != "speed":
        header.append("speed_m_s")
    header += ["status"] + [_UNITS[f] for f in DRAG_FIELDS] + ["smallest_attached_radius_m"]
    corner_labels = first.corner_labels
    for label in corner_labels:
        header += [f"{label} verdict", f"{label} margin"]
    header.append("message")
    rows = []
    for t in rows_of:
        if not isinstance(t, SweepTable):
            raise TypeError(f"expected a SweepTable, got {type(t).__name__}")
        for i in range(len(t)):
            row = [repr(float(t.values[i]))]
            if t.positions is not None:
                row += [repr(float(v)) for v in t.positions[i]]
            if t.parameter != "speed":
                row.append(repr(float(t.conditions[i].speed)))
            row.append(t.status[i].value)
            for f in DRAG_FIELDS:
                arr = getattr(t, f)
                row.append(_cell(arr.data[i], arr.mask[i]))
            row.append(_cell(t.smallest_attached.data[i], t.smallest_attached.mask[i]))
            for label in corner_labels:
                j = t.corner_labels.index(label) if label in t.corner_labels else None
                v = None if j is None else t.verdicts[i, j]
                row.append("" if v is None else v.value)
                row.append("" if j is None else _cell(t.margins.data[i, j], t.margins.mask[i, j]))
            row.append(t.messages[i])
            rows.append(row)
    return header, rows


def write_sweep_csv(table, path):
    """Write :func:`sweep_rows` to ``path`` (atomic: a failed write leaves no half file)."""
    header, rows = sweep_rows(table)

    def write(fh):
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)

    return atomic_write_text(path, write)
