"""One point of a study: its inputs, its analysis in a worker process, its compact result, and
the cache that remembers results by outline and conditions.

:func:`analyse_point` is a top-level function of pickle-able arguments (a :class:`PointSpec`)
returning a pickle-able :class:`PointResult`, so that it runs the same in this process, in a
forked worker and in a spawned one. A point never raises: bad input at that point (a speed below
the methods' Reynolds range, say) comes back as the status "refused", an unexpected error as
"error", each with its message.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

from profilebench.assess.conditions import Conditions
from profilebench.assess.results import AnalysisStatus, RadiusSearch, Verdict
from profilebench.enums import TextEnum
from profilebench.errors import ProfileBenchError
from profilebench.lru import LruCache
from profilebench.geometry.profile import Profile

__all__ = [
    "PointStatus",
    "PointSpec",
    "CornerPoint",
    "PointResult",
    "analyse_point",
    "PointCache",
    "POINT_CACHE",
    "DRAG_FIELDS",
]

#: the drag numbers a point carries (names of DragBreakdown fields)
DRAG_FIELDS = ("cd", "cd_friction", "cd_pressure", "cd_base", "cd_corners", "cda", "force", "power")


class PointStatus(TextEnum):
    """Outcome of one study point: an analysis status, or what kept the point from one."""

    SUCCESS = AnalysisStatus.SUCCESS.value
    INVALID_GEOMETRY = AnalysisStatus.INVALID_GEOMETRY.value
    INVISCID_FAILED = AnalysisStatus.INVISCID_FAILED.value
    BOUNDARY_LAYER_FAILED = AnalysisStatus.BOUNDARY_LAYER_FAILED.value
    PANELLING_FAILED = AnalysisStatus.PANELLING_FAILED.value
    IMPLAUSIBLE = AnalysisStatus.IMPLAUSIBLE.value
    BASE_PRESSURE_FAILED = AnalysisStatus.BASE_PRESSURE_FAILED.value
    REFUSED = "refused"  # the analysis refused this point's input (its message says why)
    ERROR = "error"  # an unexpected error in the analysis (a fault to report)
    CANCELLED = "cancelled"  # not run: the study was cancelled first
    WORKER_LOST = "worker lost"  # the worker process running it ended without an answer


@dataclass(frozen=True)
class PointSpec:
    """What one point analyses: a profile at conditions, with the analysis options, and the
    corner whose smallest attached radius is searched (None: no search)."""

    profile: Profile
    conditions: Conditions
    thickness: float | None = None
    table: object = None
    search_node: int | None = None

    def key(self):
        """The cache key: the outline (every node's position, radius, smooth flag and label, and
        the trailing edge), the conditions and the options; None when the table is not
        hashable (such a point is not cached)."""
        key = (
            self.profile.nodes,
            self.profile.trailing_edge,
            self.conditions,
            self.thickness,
            self.table,
            self.search_node,
        )
        try:
            hash(key)
        except TypeError:
            return None
        return key


@dataclass(frozen=True)
class CornerPoint:
    """One corner's assessment at one point (lengths in m, margin 0..1)."""

    node: int
    label: str
    verdict: Verdict
    margin: float
    radius: float
    r_over_t: float


@dataclass(frozen=True)
class PointResult:
    """The compact result of one point: status and message, the drag numbers (None where the
    analysis failed or gave none: CdA, force and power need a frontal area or width), each
    corner's verdict and margin, the searched corner's smallest attached radius, and the
    reference height h (m) and area (m^2, None without a frontal area or width) the numbers are
    based on."""

    status: PointStatus
    message: str
    cd: float | None = None
    cd_friction: float | None = None
    cd_pressure: float | None = None
    cd_base: float | None = None
    cd_corners: float | None = None
    cda: float | None = None
    force: float | None = None
    power: float | None = None
    corners: tuple[CornerPoint, ...] = ()
    search: RadiusSearch | None = None
    seconds: float = 0.0
    reference_height: float | None = None
    reference_area: float | None = None

    @property
    def success(self) -> bool:
        return self.status is PointStatus.SUCCESS


def analyse_point(spec: PointSpec) -> PointResult:
    """Analyse one point (``profilebench.assess.analysis.analyze``) and, when asked, search its
    corner's smallest attached radius (``cached_radius_search``); never raises."""
    from profilebench.assess.analysis import analyze
    from profilebench.assess.radius_search import cached_radius_search

    t0 = time.perf_counter()
    try:
        a = analyze(spec.profile, spec.conditions, thickness=spec.thickness, table=spec.table)
        if not a.success:
            return PointResult(
                PointStatus(a.status.value), a.message, seconds=time.perf_counter() - t0
            )
        search = None
        if spec.search_node is not None:
            search = next((s for s in a.radius_searches if s.node == spec.search_node), None)
            if search is None:
                search = cached_radius_search(
                    spec.profile, spec.conditions, spec.search_node, thickness=spec.thickness
                )
        corners = tuple(
            CornerPoint(
                c.node, c.label, c.verdict, float(c.margin), float(c.radius), float(c.r_over_t)
            )
            for c in a.corners
        )
        numbers = {
            f: (None if getattr(a.drag, f) is None else float(getattr(a.drag, f)))
            for f in DRAG_FIELDS
        }
        return PointResult(
            PointStatus.SUCCESS,
            a.message,
            corners=corners,
            search=search,
            seconds=time.perf_counter() - t0,
            reference_height=float(a.drag.reference_height),
            reference_area=(
                None if a.drag.reference_area is None else float(a.drag.reference_area)
            ),
            **numbers,
        )
    except ProfileBenchError as exc:
        return PointResult(PointStatus.REFUSED, str(exc), seconds=time.perf_counter() - t0)
    except Exception as exc:  # noqa: BLE001  a fault at one point must not end the study
        return PointResult(
            PointStatus.ERROR, f"{type(exc).__name__}: {exc}", seconds=time.perf_counter() - t0
        )


class PointCache(LruCache):
    """Point results remembered by :meth:`PointSpec.key` (thread-safe, least recently used
    dropped first). Results of cancelled points and of lost workers are not stored."""

    def __init__(self, size=4096):
        super().__init__(size, "points")

    def get(self, key):
        return None if key is None else super().get(key)

    def put(self, key, result):
        if key is None or result.status in (PointStatus.CANCELLED, PointStatus.WORKER_LOST):
            return
        super().put(key, result)


#: the cache the studies of a process share unless given another
POINT_CACHE = PointCache()
