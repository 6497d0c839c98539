"""Regenerate docs/images/variants_page.png: the variants review page of five invented variants
of the hatchback sample, written by the command line (``profilebench variants --image``).

The variants are added with ``profilebench variants PROJECT --add NAME FILE`` from project files
made here: the sample as drawn, its bonnet leading edge sharpened to 30 mm or rounded to 220 mm,
the nose rounded (bonnet edge 220 mm, bumper lower 140 mm), and the same nose under a roof 120 mm
higher (a larger frontal area: its Cd is lower, its drag force higher). The width, not a fixed
frontal area, is given, so that each variant's area is the width times its own height. Run:
``python tools/variants_page.py``.
"""

from __future__ import annotations

import dataclasses
import os
import shutil
import sys
import tempfile
from pathlib import Path

os.environ.setdefault("MPLBACKEND", "Agg")

OUT = Path(__file__).resolve().parent.parent / "docs" / "images" / "variants_page.png"
WIDTH_M = "1.75"  # the sample's width
ROOF_NODES = (4, 5, 6, 7)  # tail upper, roof to tail, roof, windscreen header


def _raised(profile, dy, nodes):
    for i in nodes:
        n = profile.nodes[i]
        profile = profile.moved(i, n.x, n.y + dy)
    return profile


def main() -> int:
    from profilebench.cli import main as cli
    from profilebench.io import load_project, sample_paths, save_project

    sample = next(p for p in sample_paths() if p.stem == "kestrel_hatch")
    base = load_project(sample)
    prof = base.profile
    bonnet = next(i for i, n in enumerate(prof.nodes) if n.label == "bonnet leading edge")
    bumper = next(i for i, n in enumerate(prof.nodes) if n.label == "front bumper lower")
    nose = prof.with_radius(bonnet, 0.22).with_radius(bumper, 0.14)
    variants = [
        ("as drawn", prof, "the sample's front end"),
        ("sharp bonnet edge", prof.with_radius(bonnet, 0.03), "bonnet leading edge 30 mm"),
        ("round bonnet edge", prof.with_radius(bonnet, 0.22), "bonnet leading edge 220 mm"),
        ("round nose", nose, "bonnet edge 220 mm, bumper lower 140 mm"),
        ("high roof, round nose", _raised(nose, 0.12, ROOF_NODES), "the roof 120 mm higher"),
    ]
    with tempfile.TemporaryDirectory() as tmp:
        project = Path(tmp) / "hatch_variants.json"
        shutil.copyfile(sample, project)
        for k, (name, profile, note) in enumerate(variants):
            source = Path(tmp) / f"v{k}.json"
            save_project(dataclasses.replace(base, profile=profile), source)
            code = cli(["variants", str(project), "--add", name, str(source), "--note", note])
            if code:
                return code
        return cli(["variants", str(project), "--width", WIDTH_M, "--image", str(OUT)])


if __name__ == "__main__":
    sys.exit(main())
