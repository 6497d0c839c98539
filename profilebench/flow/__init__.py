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
