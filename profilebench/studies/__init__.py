"""Screening studies: sweeps of one corner's radius, one node's position, the speed, and a
radius x speed grid, and the ranking of a project's named variants, run in parallel,
interruptible and cached (no Qt here).

Each is a screening estimate, to be confirmed by wind tunnel or validated CFD.
"""

from profilebench.studies.points import POINT_CACHE, PointCache, PointResult, PointSpec, PointStatus
from profilebench.studies.runner import RunStats, default_workers, run_points
from profilebench.studies.sweep import (
    GridTable,
    Knee,
    SweepPlan,
    SweepTable,
    corner_node,
    find_knee,
    position_plan,
    position_sweep,
    radius_plan,
    radius_range,
    radius_speed_grid,
    radius_sweep,
    speed_plan,
    speed_sweep,
)
from profilebench.studies.variants import (
    RANK_KEYS,
    VariantRow,
    VariantTable,
    rank_project,
    rank_variants,
)

__all__ = [
    "POINT_CACHE",
    "PointCache",
    "PointResult",
    "PointSpec",
    "PointStatus",
    "RunStats",
    "default_workers",
    "run_points",
    "GridTable",
    "Knee",
    "SweepPlan",
    "SweepTable",
    "corner_node",
    "find_knee",
    "position_sweep",
    "radius_range",
    "radius_speed_grid",
    "radius_sweep",
    "speed_sweep",
    "radius_plan",
    "position_plan",
    "speed_plan",
    "RANK_KEYS",
    "VariantRow",
    "VariantTable",
    "rank_project",
    "rank_variants",
]
