"""Corner labels on the review page, checked geometrically in display coordinates.

Each label's box (its drawn bbox patch) must not intersect another label's box, the outline
(the body, filled), the ground band or the separated-flow hatching; every label has a leader
line to its corner. Intersections are computed by shapely (a general-purpose geometry library),
not by the placement code's own raster. Checked on every sample and on outlines imported by the
fitter from points sampled on a sample's outline.
"""

import numpy as np
import pytest
from shapely.geometry import Polygon, box

analysis_module = pytest.importorskip("profilebench.assess.analysis", exc_type=ImportError)

from profilebench.geometry.fit import fit_outline  # noqa: E402
from profilebench.io.project import load_project  # noqa: E402
from profilebench.io.samples import sample_paths  # noqa: E402
from profilebench.plotting import review_figure  # noqa: E402
from profilebench.plotting.labels import FRONT_FRACTION, LABEL_GID, LEADER_GID  # noqa: E402
from profilebench.plotting.profile_view import GROUND_GID, SEPARATED_GID  # noqa: E402
from profilebench.plotting.stations import outline_of  # noqa: E402

SAMPLES = sample_paths()
_PAGES = {}


def _sample_page(path):
    if path not in _PAGES:
        project = load_project(path)
        a = analysis_module.analyze(project.profile, project.conditions)
        _PAGES[path] = (a, review_figure(a, baseline=project.baseline))
    return _PAGES[path]


def _imported_page(path):
    """The sample's outline as 600 digitised points, fitted back to a profile and analysed."""
    key = ("imported", path)
    if key not in _PAGES:
        project = load_project(path)
        o = outline_of(project.profile)
        s = np.concatenate([[0.0], np.cumsum(np.hypot(np.diff(o.x), np.diff(o.y)))])
        t = np.linspace(0.0, s[-1], 600, endpoint=False)
        pts = np.column_stack([np.interp(t, s, o.x), np.interp(t, s, o.y)])
        fit = fit_outline(pts, tolerance=0.005, ground=project.conditions.ground, name="imported")
        a = analysis_module.analyze(fit.profile, project.conditions)
        assert a.success, a.message
        _PAGES[key] = (a, review_figure(a))
    return _PAGES[key]


def _geometry(a, fig):
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    ax = fig.axes[0]
    labels = [t for t in ax.texts if t.get_gid() == LABEL_GID]
    boxes = []
    for t in labels:
        bb = t.get_bbox_patch().get_window_extent(r)
        boxes.append(box(bb.x0, bb.y0, bb.x1, bb.y1))
    o = outline_of(a)
    body = Polygon(ax.transData.transform(np.column_stack([o.x, o.y]))).buffer(0)
    hatched = []
    for p in ax.patches:
        if p.get_gid() in (GROUND_GID, SEPARATED_GID):
            path = p.get_path().transformed(p.get_transform())
            hatched += [Polygon(poly).buffer(0) for poly in path.to_polygons() if len(poly) >= 3]
    leaders = [ln for ln in ax.lines if ln.get_gid() == LEADER_GID]
    front_x = float(np.min(o.x)) + FRONT_FRACTION * float(np.ptp(o.x))
    keep = o.x <= front_x
    front = box(
        *ax.transData.transform(
            [(float(np.min(o.x)), 0.0), (front_x, float(np.max(o.y[keep])))]
        ).ravel()
    )
    return ax, boxes, body, hatched, leaders, front


def _check(a, fig):
    ax, boxes, body, hatched, leaders, front = _geometry(a, fig)
    assert len(boxes) == len(a.corners)
    for i, b in enumerate(boxes):
        assert not b.intersects(body), f"label {i} covers the outline"
        for h in hatched:
            assert not b.intersects(h), f"label {i} sits on hatching"
        for b2 in boxes[i + 1 :]:
            assert not b.intersects(b2), "two labels overlap"
    # one leader per label that is not at its corner already (all are, at these sizes)
    assert len(leaders) == len(boxes)
    return sum(b.intersects(front) for b in boxes)


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_sample_labels_clear_of_each_other_outline_and_hatching(path):
    a, fig = _sample_page(path)
    in_front = _check(a, fig)
    # the samples leave room in front of the nose and above: no label over the front end
    assert in_front == 0


@pytest.mark.parametrize(
    "path", [p for p in SAMPLES if "van" in p.stem or "hatch" in p.stem], ids=lambda p: p.stem
)
def test_imported_outline_labels_clear(path):
    a, fig = _imported_page(path)
    _check(a, fig)


def test_the_raster_marks_the_cells_inside_a_path_as_matplotlib_does():
    # reference: matplotlib's own point-in-path test over every cell centre at once (the raster
    # tests only the cells within the path's extent, a few thousand at a time)
    import numpy as np
    from matplotlib.path import Path

    from profilebench.plotting.labels import _Raster

    ang = np.linspace(0.0, 2.0 * np.pi, 300, endpoint=False)
    ring = np.column_stack(
        [400 + 250 * np.cos(ang) * (1 + 0.3 * np.sin(5 * ang)), 300 + 120 * np.sin(ang)]
    )
    path = Path(np.vstack([ring, ring[:1]]), closed=True)
    raster = _Raster((0.0, 0.0, 900.0, 640.0))
    got = raster.fill_path(raster.empty(), path)
    want = path.contains_points(raster.centres).reshape(raster.ny, raster.nx)
    assert got.any() and np.array_equal(got, want)
