"""Real analyses of the sample profiles: figures, legend entries, export."""

import csv
import json

import matplotlib.image as mpimg
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

analysis_module = pytest.importorskip("profilebench.assess.analysis", exc_type=ImportError)

from profilebench.io.export import CAUTION, write_results_json, write_surface_csv  # noqa: E402
from profilebench.io.project import load_project  # noqa: E402
from profilebench.io.samples import sample_paths  # noqa: E402
from profilebench.plotting import (  # noqa: E402
    EVENT_STYLES,
    draw_boundary_layer,
    draw_cp,
    draw_profile,
    review_figure,
    save_figure,
)
from profilebench.plotting.labels import LABEL_GID  # noqa: E402
from profilebench.plotting.review import PAGE_DPI, PAGE_SIZE  # noqa: E402

SAMPLES = sample_paths()
_CACHE = {}


def analysed(path):
    if path not in _CACHE:
        project = load_project(path)
        _CACHE[path] = (project, analysis_module.analyze(project.profile, project.conditions))
    return _CACHE[path]


def page(path):
    key = ("page", path)
    if key not in _CACHE:
        project, a = analysed(path)
        _CACHE[key] = review_figure(a, baseline=project.baseline)
    return _CACHE[key]


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_review_page_of_each_sample(path, tmp_path):
    project, a = analysed(path)
    assert a.success, a.message
    out = save_figure(page(path), tmp_path / "r.png")
    assert out.stat().st_size > 10_000
    # the PNG as read back by matplotlib has the page's pixel size
    assert mpimg.imread(out).shape[:2] == (
        round(PAGE_SIZE[1] * PAGE_DPI),
        round(PAGE_SIZE[0] * PAGE_DPI),
    )


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_legend_entry_per_event_kind_of_each_sample(path):
    _, a = analysed(path)
    fig = Figure(figsize=(10, 5))
    FigureCanvasAgg(fig)
    out = draw_profile(fig.add_subplot(111), a)
    labels = [t.get_text() for t in out["legend"].get_texts()]
    kinds = {e.kind for e in a.events}
    for kind, st in EVENT_STYLES.items():
        assert labels.count(st.label) == (1 if kind in kinds else 0), kind


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_charts_of_each_sample(path):
    _, a = analysed(path)
    fig = Figure(figsize=(8, 8))
    FigureCanvasAgg(fig)
    ax1, ax2, ax3 = fig.subplots(3, 1)
    draw_cp(ax1, a)
    draw_boundary_layer(ax2, ax3, a)
    fig.canvas.draw()
    assert ax1.yaxis_inverted()


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_export_of_each_sample(path, tmp_path):
    _, a = analysed(path)
    with open(write_surface_csv(a, tmp_path / "s.csv"), newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == len(a.flow.inviscid.x)  # one row per panel station
    data = json.loads(write_results_json(a, tmp_path / "r.json").read_text())
    assert data["caution"] == CAUTION
    assert data["summary"]["cd"] == pytest.approx(a.drag.cd, rel=1e-15)


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_corner_labels_of_each_sample_do_not_overlap(path):
    _, a = analysed(path)
    fig = page(path)
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    ax = fig.axes[0]
    texts = [t for t in ax.texts if t.get_gid() == LABEL_GID]
    assert len(texts) == len(a.corners)
    boxes = [t.get_window_extent(r) for t in texts]
    frame = ax.get_window_extent(r)
    for i, b in enumerate(boxes):
        tol = 2.0  # px: a label may touch the frame, not leave it
        assert (
            frame.x0 - tol <= b.x0
            and b.x1 <= frame.x1 + tol
            and frame.y0 - tol <= b.y0
            and b.y1 <= frame.y1 + tol
        )
        for b2 in boxes[i + 1 :]:
            assert not b.overlaps(b2)
