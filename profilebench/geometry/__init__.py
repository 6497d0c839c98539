"""Geometry: the profile model, outline building, panelling, validity, measures, standard shapes."""

from profilebench.geometry.measures import Measures, measure
from profilebench.geometry.outline import CornerArc, Outline, SharpEdge, build_outline
from profilebench.geometry.panelling import MAX_PANELS, MIN_PANELS, CornerSpan, Panelling, panelize
from profilebench.geometry.profile import Node, Profile
from profilebench.geometry.shapes import (
    circle,
    circle_points,
    ellipse,
    ellipse_points,
    naca4,
    naca4_surface,
    rounded_box,
)
from profilebench.geometry.validity import explain, problems, validate

__all__ = [
    "Node",
    "Profile",
    "Outline",
    "CornerArc",
    "SharpEdge",
    "build_outline",
    "Panelling",
    "CornerSpan",
    "panelize",
    "MIN_PANELS",
    "MAX_PANELS",
    "validate",
    "explain",
    "problems",
    "Measures",
    "measure",
    "circle",
    "ellipse",
    "circle_points",
    "ellipse_points",
    "rounded_box",
    "naca4",
    "naca4_surface",
]
