"""The flow: inviscid panel method with ground, stagnation split, boundary layers, wake model."""

from profilebench.flow.panel import (  # inviscid panel method
    InviscidSolution,
    InviscidStatus,
    solve_inviscid,
    solve_inviscid_bodies,
)
from profilebench.flow.stagnation import (  # stagnation points, surface split
    SplitStatus,
    Surface,
    SurfaceEnd,
    SurfaceSplit,
    split_surfaces,
)
from profilebench.flow.boundary_layer import (  # boundary layer
    BoundaryLayerResult,
    Event,
    MarchStatus,
    Regime,
    march_boundary_layer,
)
from profilebench.flow.profile_flow import (  # both surfaces of a profile
    FlowStatus,
    ProfileFlow,
    SurfaceFlow,
    solve_profile_flow,
)

__all__ = [
    "InviscidSolution",
    "InviscidStatus",
    "solve_inviscid",
    "solve_inviscid_bodies",
    "SplitStatus",
    "Surface",
    "SurfaceEnd",
    "SurfaceSplit",
    "split_surfaces",
    "BoundaryLayerResult",
    "Event",
    "MarchStatus",
    "Regime",
    "march_boundary_layer",
    "FlowStatus",
    "ProfileFlow",
    "SurfaceFlow",
    "solve_profile_flow",
]
