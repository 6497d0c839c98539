"""The shipped sample profiles: they load, round-trip, and are sensible outlines above the ground."""

import json
import math

import numpy as np
import pytest
from shapely.geometry import LinearRing, Polygon

from profilebench.assess.conditions import Conditions
from profilebench.io import default_sample_path, load_project, sample_paths, save_project

SAMPLES = sample_paths()
IDS = [p.name for p in SAMPLES]


def test_at_least_four_samples_and_default_among_them():
    names = {p.name for p in SAMPLES}
    assert len(names) >= 4
    assert default_sample_path() in SAMPLES
    assert {
        "kestrel_courier_van.json",
        "kestrel_hatch.json",
        "kestrel_shuttle_minibus.json",
        "kestrel_test_body.json",
    } <= names


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_round_trips_unchanged(path, tmp_path):
    project = load_project(path)
    assert project.variants == () and project.baseline_variant is None
    out = tmp_path / path.name
    save_project(project, out)
    assert load_project(out) == project
    # the samples stay version 1 files on disk (they test that version 1 loads unchanged); each
    # is exactly what save_project writes, less the two keys version 2 added (no hand edits
    # drifted from the format)
    data = json.loads(out.read_text(encoding="utf-8"))
    assert data["version"] == 2
    assert data.pop("variants") == [] and data.pop("baseline_variant") is None
    data["version"] = 1
    assert json.loads(path.read_text(encoding="utf-8"))["version"] == 1
    as_v1 = json.dumps(data, indent=2, allow_nan=False, ensure_ascii=True) + "\n"
    assert as_v1.encode("ascii") == path.read_bytes()


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_is_a_simple_ccw_outline_above_the_ground(path):
    profile = load_project(path).profile
    xy = np.array(profile.xy)
    ring = LinearRing(xy)
    # shapely (GEOS) decides simplicity and orientation independently of profilebench
    assert ring.is_simple
    assert ring.is_ccw  # the documented node order of the samples (profilebench.io docstring)
    poly = Polygon(xy)
    assert poly.is_valid and poly.area > 0
    assert poly.bounds[1] > 0.0  # wholly above the ground y = 0 (this project's convention)
    assert 4 <= len(profile) <= 20


def _tangent_lengths(xy, radii):
    """Distance from each corner node to its fillet's tangent points, r * tan(turn / 2).

    Circular arc tangent to two lines meeting at turning angle phi: tangent length r tan(phi/2)
    (elementary geometry). Segments are taken straight (smooth nodes as polygon vertices).
    """
    d_in = xy - np.roll(xy, 1, axis=0)
    d_out = np.roll(xy, -1, axis=0) - xy
    cross = d_in[:, 0] * d_out[:, 1] - d_in[:, 1] * d_out[:, 0]
    dot = np.einsum("ij,ij->i", d_in, d_out)
    turn = np.abs(np.arctan2(cross, dot))
    return radii * np.tan(turn / 2)


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_fillets_fit_their_segments(path):
    profile = load_project(path).profile
    xy = np.array(profile.xy)
    radii = np.array([n.radius for n in profile.nodes])
    t = _tangent_lengths(xy, radii)
    seg = np.linalg.norm(np.roll(xy, -1, axis=0) - xy, axis=1)
    # the two fillets at the ends of a segment must not overlap on it
    assert np.all(t + np.roll(t, -1) <= seg)


# Overall size of each invented vehicle: (length m, top of profile m, ground clearance m).
# These are the brief's design targets for the invented samples (common practice, no source).
SIZES = {
    "kestrel_courier_van.json": (4.4, 1.9, 0.18),
    "kestrel_hatch.json": (4.0, 1.45, 0.14),
    "kestrel_shuttle_minibus.json": (6.0, 2.6, 0.22),
    "kestrel_test_body.json": (2.0, 0.55, 0.05),
}


@pytest.mark.parametrize("name", sorted(SIZES))
def test_sample_overall_size(name):
    path = next(p for p in SAMPLES if p.name == name)
    xy = np.array(load_project(path).profile.xy)
    length, top, clearance = SIZES[name]
    assert xy[:, 0].max() - xy[:, 0].min() == pytest.approx(length, rel=0.02)
    assert xy[:, 1].max() == pytest.approx(top, rel=0.02)
    assert xy[:, 1].min() == pytest.approx(clearance, abs=1e-9)


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_conditions_are_road_or_tunnel_speeds(path):
    c = load_project(path).conditions
    assert isinstance(c, Conditions)
    assert c.ground is True
    # 90..120 km/h road speeds (the brief's scenario; 1 km/h = 1/3.6 m/s by definition)
    assert 90 / 3.6 - 1e-9 <= c.speed <= 120 / 3.6 + 1e-9
    assert c.frontal_area is not None or c.width is not None


def test_test_body_has_a_scale_test_and_sharp_rear():
    path = next(p for p in SAMPLES if p.name == "kestrel_test_body.json")
    project = load_project(path)
    c = project.conditions
    assert c.model_scale < 1.0 and c.tunnel_speed is not None
    radii = [n.radius for n in project.profile.nodes]
    labels = [n.label for n in project.profile.nodes]
    assert radii[labels.index("front lower edge")] == radii[labels.index("front upper edge")] > 0
    assert radii[labels.index("rear lower edge")] == radii[labels.index("rear upper edge")] == 0
    assert all(not n.smooth for n in project.profile.nodes)


def test_hatch_uses_smooth_nodes_and_a_sharp_tail():
    project = load_project(default_sample_path())
    nodes = {n.label: n for n in project.profile.nodes}
    assert nodes["roof"].smooth and nodes["bonnet"].smooth and nodes["windscreen"].smooth
    assert nodes["roof to tail"].radius > 0
    assert nodes["tail upper"].radius == 0 and not nodes["tail upper"].smooth
    assert math.isclose(project.conditions.speed, 120 / 3.6)


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_builds_into_a_simple_outline_above_the_ground(path):
    outline_module = pytest.importorskip("profilebench.geometry.outline")
    profile = load_project(path).profile
    outline = outline_module.build_outline(profile)  # raises if a fillet radius does not fit
    pts = outline.sample(1500)
    ring = LinearRing(pts)
    # shapely (GEOS) checks the built curve independently of the geometry package
    assert ring.is_simple and ring.is_ccw
    assert pts[:, 1].min() > 0.0


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_sample_passes_the_geometry_validity_check(path):
    validity = pytest.importorskip("profilebench.geometry.validity")
    project = load_project(path)
    assert project.conditions.ground is True
    assert validity.explain(project.profile, ground=True) == []  # every problem, none expected
    validity.validate(project.profile, ground=True)  # raises the first problem if any
