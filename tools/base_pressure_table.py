"""Print the table of docs/validation.md's "Base pressure from the boundary layer": every sample
at its own conditions with the constant base pressure and with the base pressure found from the
boundary layer at separation (Conditions.base_model "body" and "section"), at the default panel
count and twice it (Cd, Cp_b, and the layer's C_fb).

Run from the repository: ``python tools/base_pressure_table.py``.
"""

from __future__ import annotations

from profilebench import Conditions, analyze, load_project
from profilebench.io.samples import sample_paths

MODELS = ("constant", "body", "section")


def _cell(analysis):
    if not analysis.success:
        return f"failed: {analysis.status.value}"
    d = analysis.drag
    return f"{d.cd:.4f} / {d.base_pressure:.3f}"


def main():
    n0 = Conditions().panels
    counts = (n0, 2 * n0)
    print(
        "| sample | "
        + " | ".join(f"{m}: Cd / Cp_b at {n}" for m in MODELS for n in counts)
        + " | C_fb at "
        + " / ".join(str(n) for n in counts)
        + " |"
    )
    print("|---|" + "---|" * (len(MODELS) * len(counts) + 1))
    for path in sample_paths():
        project = load_project(path)
        runs = {
            (m, n): analyze(project.profile, project.conditions.replace(base_model=m, panels=n))
            for m in MODELS
            for n in counts
        }
        cfb = [runs[("body", n)].flow.base_estimate for n in counts]
        print(
            f"| {path.stem} | "
            + " | ".join(_cell(runs[(m, n)]) for m in MODELS for n in counts)
            + " | "
            + " / ".join("n/a" if e is None or e.c_fb is None else f"{e.c_fb:.4f}" for e in cfb)
            + " |"
        )


if __name__ == "__main__":
    main()
