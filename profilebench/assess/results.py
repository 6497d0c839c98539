"""Result types of the assessment: corner verdicts, drag breakdown, the whole analysis.

All are frozen dataclasses holding plain floats, strings, tuples and read-only numpy arrays, so a
background analysis can hand them to the editor without copying.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, field

from typing import TYPE_CHECKING


from profilebench.enums import TextEnum

if TYPE_CHECKING:  # for the annotations only (no import at run time: no circle)
    from profilebench.assess.conditions import Conditions
    from profilebench.flow.profile_flow import ProfileFlow
    from profilebench.geometry.measures import Measures
    from profilebench.geometry.panelling import Panelling
    from profilebench.geometry.profile import Profile

__all__ = [
    "FlowEventKind",
    "AnalysisStatus",
    "SearchStatus",
    "Verdict",
    "CornerResult",
    "RadiusSearch",
    "DragBreakdown",
    "FlowEvent",
    "Analysis",
]


class AnalysisStatus(enum.Enum):
    """Outcome of :func:`profilebench.analyze`."""

    SUCCESS = "success"
    INVALID_GEOMETRY = "invalid geometry"  # the outline failed a validity check
    INVISCID_FAILED = "inviscid solve failed"  # singular panel system
    BOUNDARY_LAYER_FAILED = "boundary-layer march failed"
    PANELLING_FAILED = "panelling failed"  # the panel count cannot resolve the outline
    IMPLAUSIBLE = "implausible result"  # the numbers fail a physical check (see analysis)
    # the base pressure from the layer at separation is outside its correlation's range
    BASE_PRESSURE_FAILED = "base pressure not found"


class Verdict(enum.Enum):
    """The solver's verdict on the flow round one corner."""

    ATTACHED = "attached"
    BUBBLE_REATTACHES = "laminar bubble, reattaches"
    LAMINAR_SEPARATION = "separates (laminar)"
    TURBULENT_SEPARATION = "separates (turbulent)"
    EDGE_SEPARATION = "sharp-edge separation"
    IN_WAKE = "in separated flow upstream"
    CONCAVE = "concave corner"
    CONCAVE_BUBBLE = "concave corner, bubble reattaches"  # separates ahead of it, reattaches

    @property
    def separated(self) -> bool:
        """True when the flow leaves the surface at this corner."""
        return self in (
            Verdict.LAMINAR_SEPARATION,
            Verdict.TURBULENT_SEPARATION,
            Verdict.EDGE_SEPARATION,
        )


@dataclass(frozen=True)
class CornerResult:
    """Assessment of one corner (a node with a radius, or a sharp node).

    Lengths in metres. ``thickness`` is the reference thickness t of r/t: by default the
    profile's frontal height h. ``margin`` runs from 1 (far from separation) to 0 (at the
    criterion); it is 0 for a corner the flow leaves. ``delta_cd`` is the corner's drag
    correction from the empirical table (0 when the solver finds it attached).
    """

    node: int
    label: str
    x: float
    y: float
    radius: float
    turning_angle_deg: float
    convex: bool
    thickness: float
    thickness_definition: str
    r_over_t: float
    surface: str  # "upper", "lower" or "" (e.g. at a stagnation point)
    s_start: float  # arc length on that surface where the corner's region starts
    s_end: float  # ... and where it ends (the next convex corner or the surface end)
    verdict: Verdict
    margin: float
    detail: str
    table_name: str
    table_critical_ratio: float | None
    table_verdict: str  # "below critical", "at or above critical", or "no table"
    disagreement: str  # "" when solver and table agree, else a sentence saying how
    delta_cd: float


class SearchStatus(enum.Enum):
    FOUND = "found"
    ALWAYS_ATTACHED = "attached even when sharp"
    NONE_FITS = "none within the largest radius that fits"
    FAILED = "failed"


@dataclass(frozen=True)
class RadiusSearch:
    """Result of the smallest-attached-radius search for one corner (metres)."""

    node: int
    status: SearchStatus
    radius: float | None  # smallest attached radius, None unless FOUND/ALWAYS_ATTACHED
    largest_fitting: float  # the largest radius that fits between the corner's neighbours
    bracket: tuple[float, float]  # (separated, attached) radii that bound the answer
    tolerance: float
    solves: int
    message: str
    # the boundary layer's thickness (m) at the corner's arc on the try at ``radius`` (None where
    # not found or separated there); a radius below it is one a real layer meets as a sharp edge
    layer_thickness: float | None = None

    @property
    def success(self) -> bool:
        return self.status in (
            SearchStatus.FOUND,
            SearchStatus.ALWAYS_ATTACHED,
            SearchStatus.NONE_FITS,
        )


@dataclass(frozen=True)
class DragBreakdown:
    """Section drag and lift coefficients (per unit width, on the frontal height h) and forces.

    ``cd = cd_friction + cd_pressure + cd_base + cd_corners``. With a reference area (frontal area,
    or width times h) the CdA (m^2), drag force (N) and power (W) at the conditions' speed are given,
    else they are None.
    """

    cd_friction: float
    cd_pressure: float
    cd_base: float
    cd_corners: float
    cd: float
    cl: float
    reference_height: float
    reference_area: float | None
    cda: float | None
    force: float | None
    power: float | None
    base_pressure: float
    notes: tuple[str, ...] = ()


class FlowEventKind(TextEnum):
    """Kinds of the events shown on a profile: the boundary layer's own
    (:class:`profilebench.flow.boundary_layer.EventKind`), a corner bubble's separation and the
    front stagnation point."""

    STAGNATION = "stagnation"
    TRANSITION = "transition"
    LAMINAR_SEPARATION = "laminar_separation"
    REATTACHMENT = "reattachment"
    TURBULENT_SEPARATION = "turbulent_separation"
    EDGE_SEPARATION = "edge_separation"
    BUBBLE_SEPARATION = "bubble_separation"  # a separation behind which the layer reattaches


@dataclass(frozen=True)
class FlowEvent:
    """A boundary-layer event placed on the profile: kind, surface, arc length and position (m)."""

    kind: FlowEventKind
    surface: str  # "upper", "lower" (a SurfaceName), or "" at the stagnation point
    s: float  # arc length on that surface from the stagnation point
    x: float
    y: float
    detail: str = ""

    def __post_init__(self):
        object.__setattr__(self, "kind", FlowEventKind(self.kind))


@dataclass(frozen=True)
class Analysis:
    """Everything :func:`profilebench.analyze` found for one profile at one set of conditions."""

    status: AnalysisStatus
    message: str
    profile: Profile
    conditions: Conditions
    measures: Measures | None = None
    panelling: Panelling | None = None
    flow: ProfileFlow | None = None
    corners: tuple[CornerResult, ...] = ()
    drag: DragBreakdown | None = None
    events: tuple[FlowEvent, ...] = ()
    reynolds: float | None = None  # full scale, on the profile length
    model_reynolds: float | None = None  # the scale test's, on the model length
    warnings: tuple[str, ...] = ()
    radius_searches: tuple[RadiusSearch, ...] = ()  # searches run to place corner corrections
    # corners whose smallest attached radius came from a nearby outline (searches="nearby")
    provisional: tuple[int, ...] = ()
    timings: dict = field(default_factory=dict, compare=False)

    @property
    def success(self) -> bool:
        return self.status is AnalysisStatus.SUCCESS
