"""Names of corners by where they sit on a vehicle outline, in this project's own words.

A digitised or imported outline has no node labels; "node 304" means nothing to an engineer.
``place_names(profile)`` names every corner (non-smooth) node from its position in the outline's
bounding box (the stream runs in +x, so the front is at the least x) and whether the outline
turns outward (convex) or inward (concave) there:

- lower band (below 30 % of the height): front lower corner, rear lower corner, underbody
  corner (a concave one: underbody step);
- upper band (above 85 %): roof front edge, roof rear edge (roof corner between them);
- between them: at the front (the first 20 % of the length) nose upper corner when it sits below
  half the height, else front upper corner; further back a convex corner is a bonnet leading
  edge in the first 35 % below 70 % of the height, a screen header in the front half higher
  up, and a tail corner in the rear half; a concave one is a windscreen base in the front half
  and a rear step in the rear half.

Where two corners get the same name they are numbered front to back ("underbody corner 1", ...).
The bands are a convention of this project (no source). A label the user gave always wins.
"""

from __future__ import annotations

import numpy as np

__all__ = ["place_names", "place_of"]


def place_of(u: float, v: float, convex: bool) -> str:
    """The place name of a corner at fractions ``u`` of the length (0 = front) and ``v`` of the
    height (0 = lowest point), turning outward when ``convex``."""
    if v < 0.30:
        if u < 0.20:
            return "front lower corner"
        if u > 0.80:
            return "rear lower corner"
        return "underbody corner" if convex else "underbody step"
    if v > 0.85:
        if not convex:
            return "roof step"
        if u < 0.35:
            return "roof front edge"
        if u > 0.65:
            return "roof rear edge"
        return "roof corner"
    if u < 0.20 and convex:
        return "nose upper corner" if v < 0.5 else "front upper corner"
    if u < 0.5:
        if not convex:
            return "windscreen base"
        if u < 0.35 and v < 0.70:
            return "bonnet leading edge"
        return "screen header"
    return "tail corner" if convex else "rear step"


def place_names(profile) -> dict[int, str]:
    """{node index: place name} of every corner node of ``profile`` (see the module notes)."""
    from profilebench.geometry.outline import build_outline

    o = build_outline(profile)
    ext = o.extreme_points()
    x0, x1 = float(ext[:, 0].min()), float(ext[:, 0].max())
    y0, y1 = float(ext[:, 1].min()), float(ext[:, 1].max())
    length, height = max(x1 - x0, 1e-12), max(y1 - y0, 1e-12)
    convex = {a.node: a.convex for a in o.arcs}
    convex.update({e.node: e.convex for e in o.sharp_edges})
    named = {}
    for i, nd in enumerate(profile.nodes):
        if nd.smooth or i not in convex:
            continue
        # a fillet's node lies off the outline (where its two sides meet): use the arc's middle
        at = o.points_at(np.array([o.node_s[i]]))[0]
        named[i] = place_of(
            (float(at[0]) - x0) / length, (float(at[1]) - y0) / height, bool(convex[i])
        )
    counts = {}
    for name in named.values():
        counts[name] = counts.get(name, 0) + 1
    for name, k in counts.items():
        if k > 1:
            same = sorted(
                (i for i, nm in named.items() if nm == name), key=lambda i: profile.nodes[i].x
            )
            for j, i in enumerate(same, start=1):
                named[i] = f"{name} {j}"
    return named
