"""A sweep or grid table written as CSV: one row per point, empty cells where a point has no
number (a failed point: its status and message say why), atomic; and a variant ranking, one row
per variant in ranking order."""

from __future__ import annotations

import csv

from profilebench.io.atomic import atomic_write_text
from profilebench.studies.points import DRAG_FIELDS
from profilebench.studies.sweep import GridTable, SweepTable

__all__ = [
    "sweep_rows",
    "write_sweep_csv",
    "variant_rows",
    "write_variants_csv",
    "PARAMETER_COLUMNS",
    "VARIANT_COLUMNS",
]

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


def _write_csv(header, rows, path):
    def write(fh):
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)

    return atomic_write_text(path, write)


def write_sweep_csv(table, path):
    """Write :func:`sweep_rows` to ``path`` (atomic: a failed write leaves no half file)."""
    return _write_csv(*sweep_rows(table), path)


#: the columns of a variant ranking's CSV (SI units), before one verdict column per corner and
#: the note and message
VARIANT_COLUMNS = (
    ("rank", None),
    ("variant", None),
    ("baseline", None),
    ("status", None),
    ("cd", "cd"),
    ("cda_m2", "cda"),
    ("force_N", "force"),
    ("power_W", "power"),
    ("reference_height_m", "reference_height"),
    ("reference_area_m2", "reference_area"),
    ("delta_cd", "delta_cd"),
    ("delta_cd_percent", "delta_cd_percent"),
    ("delta_cda_m2", "delta_cda"),
    ("delta_force_N", "delta_force"),
    ("delta_power_W", "delta_power"),
)


def variant_rows(table):
    """(header, rows) of a :class:`~profilebench.studies.variants.VariantTable`: a row per
    variant in ranking order, a verdict column per corner (empty where a variant has no such
    corner or failed), the variant's note and its analysis message."""
    keys = table.corner_keys
    header = [c for c, _ in VARIANT_COLUMNS] + [f"{k} verdict" for k in keys]
    header += ["note", "message"]
    rows = []
    for r in table.rows:
        row = ["" if r.rank is None else str(r.rank), r.name, "yes" if r.is_baseline else ""]
        row.append(r.status.value)
        for _, field in VARIANT_COLUMNS[4:]:
            value = getattr(r, field)
            row.append(_cell(value, value is None))
        verdicts = r.verdicts()
        row += [verdicts[k].value if k in verdicts else "" for k in keys]
        row += [r.note, r.message]
        rows.append(row)
    return header, rows


def write_variants_csv(table, path):
    """Write :func:`variant_rows` to ``path`` (atomic)."""
    return _write_csv(*variant_rows(table), path)
