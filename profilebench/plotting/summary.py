"""Text rows of an analysis summary and of its corner table, shared by the CLI and the review page.

Values are formatted from the Analysis only (no physics here). Lengths are shown in mm, speeds in
km/h, power in kW.
"""

from __future__ import annotations

from profilebench.assess.results import Verdict
from profilebench.plotting.style import CAUTION

__all__ = [
    "summary_rows",
    "corner_rows",
    "corner_notes",
    "corner_disagreements",
    "run_lines",
    "CORNER_COLUMNS",
    "MARGIN_DEFINITION",
    "format_table",
    "refinement_lines",
    "CAUTION",
]

CORNER_COLUMNS = (
    "corner",
    "r (mm)",
    "t (mm)",
    "r/t",
    "solver verdict",
    "sep. margin",
    "table verdict",
    "delta Cd",
    "node",
)


#: what the "margin" column means (shown in the editor's tooltip, the README and every page)
MARGIN_DEFINITION = (
    "separation margin: how far the boundary layer stayed from its separation criterion over "
    "the corner, at its closest (100% far from it, 0% at it or separated). Laminar: "
    "1 - lambda/(-0.09) (Thwaites' lambda); turbulent: (H_sep - H)/(H_sep - 1.4). It is not a "
    "margin on the radius."
)


def _base_text(record):
    """The run line's base pressure: the constant, or the one found from the layer."""
    c = record["conditions"]
    model = c.get("base_model", "constant")
    if model == "constant":
        return f"base pressure Cp_b = {c['base_pressure']:g}"
    used = record.get("base_pressure_used")
    if used is None:  # not found, or not needed (no separated region)
        note = record.get("base_pressure_note") or "not found"
        return f"base pressure from the boundary layer at separation ({model} form): {note}"
    return (
        f"base pressure Cp_b = {used:.3f} from the boundary layer at separation "
        f"(Hoerner's blunt-base correlation, {model} form)"
    )


def run_lines(record):
    """The run block as text lines, from :func:`profilebench.io.export.run_record`'s dict."""
    c = record["conditions"]
    air = record.get("air") or {}
    if c.get("density") is not None:
        air_text = (
            f"air given: rho {c['density']:.4g} kg/m^3, nu {c['kinematic_viscosity']:.4g} m^2/s"
        )
    else:
        air_text = f"ISO 2533 air at {c['altitude']:g} m, {c['temperature_offset']:+g} K" + (
            f" (rho {air['density_kg_m3']:.4g} kg/m^3, nu "
            f"{air['kinematic_viscosity_m2_s']:.4g} m^2/s)"
            if air
            else ""
        )
    tr = c["transition"]
    tr_text = (
        "free transition (Michel)"
        if tr == "free"
        else "turbulent from the stagnation point"
        if tr == "turbulent"
        else f"transition forced at s = {float(tr):g} m"
    )
    if c.get("frontal_area") is not None:
        area = f"frontal area {c['frontal_area']:g} m^2"
    elif c.get("width") is not None:
        area = f"width {c['width']:g} m"
    else:
        area = "no frontal area or width (per unit width)"
    scale = ""
    if c.get("model_scale", 1.0) != 1.0 or c.get("tunnel_speed") is not None:
        ts = c.get("tunnel_speed")
        scale = f"; model scale 1:{1.0 / c['model_scale']:g}" + (
            f" at {ts * 3.6:.1f} km/h" if ts is not None else ""
        )
    if not c["ground"]:
        ground_text = "free air (no ground)"
    elif not c.get("side_relief", True):
        ground_text = "ground on (slip, moving belt), underbody side relief off"
    elif c.get("width") is not None:
        ground_text = f"ground on (slip, moving belt), underbody side relief for {c['width']:g} m"
    else:
        ground_text = "ground on (slip, moving belt), 2D underbody (no width)"
    line1 = (
        f"Run: {c['speed'] * 3.6:.1f} km/h; {air_text}; {ground_text}; "
        f"{tr_text}; turbulent separation at H = {c['h_separation']:g}; "
        f"{_base_text(record)}; {c['panels']} panels; {area}{scale}"
    )
    tables = "; ".join(record.get("tables") or []) or "none"
    line2 = (
        f"r/t table: {tables}; profilebench {record['profilebench_version']}; "
        f"made {record['created_utc'].replace('T', ' ').replace('+00:00', ' UTC')}"
    )
    return [line1, line2]


def _g(value, fmt):
    return "n/a" if value is None else format(value, fmt)


def summary_rows(analysis):
    """(quantity, value, unit) rows: Cd and its breakdown, CdA, force, power, Cl, Reynolds."""
    rows = []
    cond = analysis.conditions
    speed = cond.speed
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
            ("Cl", f"{d.cl:.4f}", _lift_caution(analysis)),
        ]
    rows.append(("Reynolds (full scale)", _g(analysis.reynolds, ".4g"), "on length"))
    rows.append(("Reynolds (model)", _g(analysis.model_reynolds, ".4g"), "on model length"))
    return rows


def _lift_caution(analysis):
    """The caution beside Cl: the 2D section's underbody suction is overstated unless the
    side-relief model replaced it (profilebench.flow.underbody)."""
    flow = analysis.flow
    relief = None if flow is None else getattr(flow, "underbody", None)
    if relief is not None and relief.applied:
        return "caution: 2D, underbody with side relief"
    return "caution: 2D, ground suction overstated"


def _shared(values):
    """The one value all of ``values`` share (two or more of them), else None."""
    values = list(values)
    return values[0] if len(values) >= 2 and len(set(values)) == 1 and values[0] else None


def corner_notes(analysis):
    """Notes that hold for every corner, said once instead of on each row: a table verdict or
    a solver-table disagreement that all corners share."""
    notes = []
    shared = _shared(c.table_verdict for c in analysis.corners)
    if shared:
        notes.append(f"table verdict, every corner: {shared}")
    shared = _shared(c.disagreement for c in analysis.corners)
    if shared:
        notes.append(f"every corner: {shared}")
    return notes


def corner_disagreements(analysis):
    """(corner name, disagreement) for the corners whose disagreement is not said once in
    :func:`corner_notes`."""
    if _shared(c.disagreement for c in analysis.corners):
        return []
    return [
        (c.label or f"node {c.node}", c.disagreement) for c in analysis.corners if c.disagreement
    ]


def corner_rows(analysis):
    """One tuple per corner, in the order of :data:`CORNER_COLUMNS`; a table verdict that every
    corner shares is left out of the rows (see :func:`corner_notes`)."""
    rows = []
    said_once = _shared(c.table_verdict for c in analysis.corners) is not None
    for c in analysis.corners:
        verdict = c.verdict.value
        # no margin for a concave corner or one already in separated flow from upstream
        in_wake = c.verdict in (Verdict.IN_WAKE, Verdict.CONCAVE, Verdict.CONCAVE_BUBBLE)
        margin = "" if (not c.convex or in_wake) else f"{100 * c.margin:.0f}%"
        rows.append(
            (
                c.label or f"node {c.node}",
                f"{c.radius * 1000:.1f}",
                f"{c.thickness * 1000:.1f}",
                f"{c.r_over_t:.4f}",
                verdict,
                margin,
                "(see note)" if said_once else c.table_verdict,
                f"{c.delta_cd:+.4f}",
                str(c.node),
            )
        )
    return rows


def format_table(header, rows):
    """Plain-text table with columns padded to their widest cell."""
    cells = [tuple(str(h) for h in header)] + [tuple(str(v) for v in r) for r in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(header))]
    lines = ["  ".join(v.ljust(w) for v, w in zip(r, widths)).rstrip() for r in cells]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def open_radius_lines(effects):
    """The lines on the radii a fitted outline's points leave open (the
    :class:`~profilebench.assess.open_radii.OpenRadiusEffect` of each), as the command line
    prints them."""
    if not effects:
        return []
    lines = [
        "Radii the points do not fix (99.7 % ranges; take them from the drawing where the Cd "
        "moves):"
    ]
    lines += [f"  {e.line()}" for e in effects]
    return lines


def refinement_lines(check):
    """The lines of a refinement check's report (a
    :class:`~profilebench.assess.refinement.RefinementCheck`), as the command line prints it and
    the editor shows it."""
    n, m = check.panels, check.panels_refined
    lines = [f"Refinement check: {n} against {m} panels"]
    if check.cd is not None:
        change = "" if check.cd_change is None else f" ({check.cd_change * 100.0:+.1f} %)"
        lines.append(f"  Cd {check.cd:.4f} -> {check.cd_refined:.4f}{change}")

    def mm(r, status):
        if r is None:
            return status or "-"
        return f"{r * 1e3:.1f}" if status == "found" else status

    rows = [
        (
            c.label,
            c.verdict,
            c.verdict_refined,
            mm(c.smallest, c.search_status),
            mm(c.smallest_refined, c.search_status_refined),
            "yes" if c.holds else "NO",
        )
        for c in check.corners
    ]
    if rows:
        header = (
            "corner",
            f"verdict at {n}",
            f"verdict at {m}",
            f"smallest attached r at {n} (mm)",
            f"at {m} (mm)",
            "holds",
        )
        lines += format_table(header, rows).splitlines()
    if check.holds:
        lines.append("  holds: the answers above do not move when the panels are doubled")
    else:
        lines.append("  does not hold; what moved:")
        lines += [f"  - {p}" for p in check.problems]
        lines.append(f"  Quote the answers at {m} panels and check them again by doubling.")
    lines += [f"  note: {t}" for t in check.notes]
    return lines
