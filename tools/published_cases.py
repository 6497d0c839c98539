"""Print the published-cases table of docs/validation.md: two-dimensional sections in free air
against handbook drag coefficients, the model's Cd with the default and a bluff-body base
pressure, and the solver's own Cd (without the table's corner corrections).

Sources (each value as the handbook gives it):
- Delany & Sorensen, NACA TN 3038 (1953), 2D square with rounded corners at Re = 1e5, via
  Munson, Young & Okiishi, Fundamentals of Fluid Mechanics (figure of 2D drag coefficients):
  R/D = 0 -> 2.2, 0.02 -> 2.0, 0.17 -> 1.2, 0.33 -> 1.0.
- Flat plate normal to the stream (2D): Cd about 2.0, base Cp about -1.38 (Fage & Johansen, Proc.
  Roy. Soc. A 116, 1927; also in Roshko, NACA TN 3169, 1954; values from memory).

Run: ``python tools/published_cases.py``.
"""

from __future__ import annotations

from profilebench import Conditions, analyze
from profilebench.geometry import rounded_box

NU = 1.5e-5
SQUARES = ((0.0, 2.2), (0.02, 2.0), (0.17, 1.2), (0.33, 1.0))


def _row(name, profile, published, conditions_for):
    """One table line: the case, its published Cd and the model's with Cp_b -0.25 and -1.4."""
    cells = []
    for cpb in (-0.25, -1.4):
        a = analyze(profile, conditions_for(cpb))
        if not a.success:
            cells += [a.status.value, ""]
            continue
        d = a.drag
        cells += [
            f"{d.cd:.3f} ({100 * (d.cd - published) / published:+.0f} %)",
            f"{d.cd - d.cd_corners:.3f}",
        ]
    return f"| {name} | {published:.2f} | " + " | ".join(cells) + " |"


def table_lines():
    """The published-cases table (markdown lines)."""
    lines = [
        "| case | published Cd | model, Cp_b -0.25 | solver only | model, Cp_b -1.4 | solver only |",
        "|---|---|---|---|---|---|",
    ]
    for rd, pub in SQUARES:
        lines.append(
            _row(
                f"square, R/D = {rd:g}, Re 1e5",
                rounded_box(1.0, 1.0, rd, clearance=1.0),
                pub,
                lambda cpb: Conditions(
                    speed=1e5 * NU / 1.0,
                    ground=False,
                    density=1.225,
                    kinematic_viscosity=NU,
                    base_pressure=cpb,
                ),
            )
        )
    lines.append(
        _row(
            "flat plate normal to the stream (2 % thick)",
            rounded_box(0.02, 1.0, 0.0, clearance=1.0),
            2.0,
            lambda cpb: Conditions(speed=30.0, ground=False, base_pressure=cpb),
        )
    )
    return lines


def main():
    print("\n".join(table_lines()))


if __name__ == "__main__":
    main()
