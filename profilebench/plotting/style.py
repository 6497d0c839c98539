"""Colours, markers and labels shared by every profilebench figure.

Colours are the Okabe-Ito palette (Okabe & Ito, "Color Universal Design", 2008), chosen so that
the marker kinds stay distinguishable with the common forms of colour blindness; each marker kind
also has its own shape, so a figure printed in grey still reads.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "OKABE_ITO",
    "MarkerStyle",
    "EVENT_STYLES",
    "BUBBLE_STYLE",
    "SEPARATED_COLOUR",
    "BASELINE_COLOUR",
    "CP_COLORMAP",
    "SURFACE_COLOURS",
    "CAUTION",
]

OKABE_ITO = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky_blue": "#56B4E9",
    "bluish_green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish_purple": "#CC79A7",
}


@dataclass(frozen=True)
class MarkerStyle:
    """How one kind of flow event is drawn: matplotlib marker, face and edge colour, legend text."""

    marker: str
    face: str
    edge: str
    label: str
    size: float = 9.0


# Keys are the FlowEvent kinds of profilebench.assess.results.
EVENT_STYLES = {
    "stagnation": MarkerStyle("o", "white", OKABE_ITO["black"], "stagnation point"),
    "transition": MarkerStyle("^", OKABE_ITO["blue"], OKABE_ITO["black"], "transition"),
    "laminar_separation": MarkerStyle(
        "D", OKABE_ITO["orange"], OKABE_ITO["black"], "laminar separation", 8.0
    ),
    "reattachment": MarkerStyle(
        "P", OKABE_ITO["bluish_green"], OKABE_ITO["black"], "bubble reattachment", 10.0
    ),
    "turbulent_separation": MarkerStyle(
        "X", OKABE_ITO["vermillion"], OKABE_ITO["black"], "turbulent separation", 10.0
    ),
    "edge_separation": MarkerStyle(
        "s", OKABE_ITO["reddish_purple"], OKABE_ITO["black"], "sharp-edge separation", 8.0
    ),
    "bubble_separation": MarkerStyle(
        "v", "white", OKABE_ITO["vermillion"], "separation, reattaches", 9.0
    ),
}

# The laminar bubble (laminar separation followed by reattachment on the same surface) is drawn
# as a thick line along the surface between its two ends.
BUBBLE_STYLE = {
    "color": OKABE_ITO["orange"],
    "linewidth": 5.0,
    "alpha": 0.8,
    "label": "laminar bubble",
}

SEPARATED_COLOUR = "#7f7f7f"
BASELINE_COLOUR = "#9a9a9a"
# Diverging map for Cp (ColorBrewer PuOr, listed as colour-blind safe by ColorBrewer).
CP_COLORMAP = "PuOr_r"
SURFACE_COLOURS = {"upper": OKABE_ITO["blue"], "lower": OKABE_ITO["vermillion"]}

from profilebench.io.export import CAUTION  # noqa: E402  (one caution text for every output)
