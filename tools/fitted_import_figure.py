"""Draw docs/images/fitted_import.png: a digitised box van outline (invented: sampled every 5 mm
from a rounded box, 1 mm of noise) and the profile fitted to it, nodes marked with their radii.

Run: ``python tools/fitted_import_figure.py``.
"""

from __future__ import annotations

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from profilebench.geometry import build_outline, rounded_box  # noqa: E402
from profilebench.geometry.fit import fit_outline  # noqa: E402


def main(out=Path(__file__).resolve().parent.parent / "docs" / "images" / "fitted_import.png"):
    van = rounded_box(4.0, 1.8, (0.2, 0.05, 0.05, 0.1), clearance=0.2)
    o = build_outline(van)
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(0).normal(0.0, 0.001, (n, 2))
    fit = fit_outline(pts, tolerance=0.005)
    line = build_outline(fit.profile).sample(3000)
    fig, ax = plt.subplots(figsize=(9, 4.6), dpi=110)
    ax.plot(pts[:, 0], pts[:, 1], ".", ms=1.5, color="#888888", label=f"{n} digitised points")
    ax.plot(
        np.append(line[:, 0], line[0, 0]),
        np.append(line[:, 1], line[0, 1]),
        "-",
        color="#0072B2",
        lw=1.5,
        label="fitted outline",
    )
    for nd in fit.profile.nodes:
        ax.plot(nd.x, nd.y, "s", color="#D55E00", ms=6)
        ax.annotate(
            f"r = {nd.radius * 1e3:.0f} mm",
            (nd.x, nd.y),
            textcoords="offset points",
            xytext=(6, 6),
            fontsize=8,
        )
    ax.axhline(0.0, color="k", lw=0.8)
    ax.set_aspect("equal")
    ax.set_xlabel("x (m)")
    ax.set_ylabel("y (m)")
    ax.set_title(
        f"{len(fit.profile.nodes)} nodes, within {fit.max_deviation * 1e3:.1f} mm of the "
        f"points (tolerance {fit.tolerance * 1e3:.0f} mm)",
        fontsize=10,
    )
    ax.legend(loc="center", fontsize=8)
    fig.tight_layout()
    fig.savefig(out)
    print(f"written: {out}")


if __name__ == "__main__":
    main()
