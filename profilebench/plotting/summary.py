"""Text rows of an analysis summary and of its corner table, shared by the CLI and the review page.

Values are formatted from the Analysis only (no physics here). Lengths are shown in mm, speeds in
km/h, power in kW.
"""

from __future__ import annotations

from profilebench.plotting.style import CAUTION

__all__ = ["summary_rows", "corner_rows", "CORNER_COLUMNS", "format_table", "CAUTION"]

CORNER_COLUMNS = ("corner", "r (mm)", "t (mm)", "r/t", "solver verdict", "margin",
                  "table verdict", "delta Cd", "node")


def _g(value, fmt):
    return "n/a" if value is None else format(value, fmt)


def summary_rows(analysis):
    """(quantity, value, unit) rows: Cd and its breakdown, CdA, force, power, Cl, Reynolds."""
    rows = []
    cond = analysis.conditions
    speed = getattr(cond, "speed", None)
    rows.append(("speed", _g(None if speed is None else speed * 3.6, ".1f"), "km/h"))
    d = analysis.drag
    if d is not None:
        rows += [
            ("Cd", f"{d.cd:.4f}", "on h"),
            ("  friction", f"{d.cd_friction:.4f}", ""),
            ("  pressure", f"{d.cd_pressure:.4f}", ""),
            ("  base", f"{d.cd_base:.4f}", f"Cp_base {d.base_pressure:.3f}"),
            ("  corners", f"{d.cd_corners:.4f}", "r/t tables"),
            ("reference height h", f"{d.reference_height * 1000:.1f}", "mm"),
            ("reference area", _g(d.reference_area, ".4f"), "m^2"),
            ("CdA", _g(d.cda, ".4f"), "m^2"),
            ("drag force", _g(d.force, ".2f"), "N"),
            ("power", _g(None if d.power is None else d.power / 1000.0, ".3f"), "kW"),
            ("Cl", f"{d.cl:.4f}", "caution: 2D, ground suction overstated"),
        ]
    rows.append(("Reynolds (full scale)", _g(analysis.reynolds, ".4g"), "on length"))
    rows.append(("Reynolds (model)", _g(analysis.model_reynolds, ".4g"), "on model length"))
    return rows


def corner_rows(analysis):
    """One tuple per corner, in the order of :data:`CORNER_COLUMNS`."""
    rows = []
    for c in analysis.corners:
        verdict = getattr(c.verdict, "value", str(c.verdict))
        # no margin for a concave corner or one already in separated flow from upstream
        in_wake = getattr(c.verdict, "name", "") in ("IN_WAKE", "CONCAVE", "CONCAVE_BUBBLE")
        margin = "" if (not c.convex or in_wake) else f"{100 * c.margin:.0f}%"
        rows.append((
            c.label or f"node {c.node}", f"{c.radius * 1000:.1f}",
            f"{c.thickness * 1000:.1f}",
            f"{c.r_over_t:.4f}", verdict, margin, c.table_verdict, f"{c.delta_cd:+.4f}",
            str(c.node),
        ))
    return rows


def format_table(header, rows):
    """Plain-text table with columns padded to their widest cell."""
    cells = [tuple(str(h) for h in header)] + [tuple(str(v) for v in r) for r in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(header))]
    lines = ["  ".join(v.ljust(w) for v, w in zip(r, widths)).rstrip() for r in cells]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)
