"""Property-based tests of the whole pipeline (hypothesis, derandomised for repeatable CI).

Over random valid profiles (rounded boxes, perturbed samples, random smooth/sharp flags), random
invalid ones (random polygons, near nodes, radii too large) and random conditions,
``profilebench.analyze`` must either return a successful Analysis whose every number is finite,
or a failed Analysis with a non-empty message, or raise a ProfileBenchError with a message; never
another exception, never NaN or inf in a successful result. The invariant is the package's own
contract (DEVELOPERS.md); the finiteness test is numpy's isfinite.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from reliability_helpers import SETTINGS
from hypothesis import event as _hypothesis_event
from hypothesis.control import currently_in_test_context
from hypothesis import strategies as st

from profilebench import Conditions, Profile, analyze, load_project
from profilebench.assess.results import AnalysisStatus
from profilebench.errors import ProfileBenchError
from profilebench.geometry import rounded_box
from profilebench.io.samples import sample_paths


SAMPLES = [load_project(p).profile for p in sample_paths()]


# --- strategies -------------------------------------------------------------------------------


def event(text):
    """Tally an outcome in hypothesis' statistics; the pinned cases below run outside it."""
    if currently_in_test_context():
        _hypothesis_event(text)


def conditions(max_panels=160):
    transition = st.one_of(
        st.sampled_from(["free", "turbulent"]), st.floats(0.0, 3.0, allow_nan=False)
    )
    return st.builds(
        Conditions,
        speed=st.floats(1.0, 150.0),
        altitude=st.floats(-2000.0, 20000.0),
        ground=st.booleans(),
        transition=transition,
        h_separation=st.floats(1.8, 2.8),
        panels=st.integers(40, max_panels),
    )


@st.composite
def boxes(draw):
    length = draw(st.floats(0.5, 6.0))
    height = draw(st.floats(0.3, 2.5))
    limit = 0.49 * min(length, height)  # two radii on the shorter side fit: 2 r < side
    # a sharp edge or a radius of at least 1 mm (a radius far below a panel length is a separate,
    # explicit case below)
    radius = st.one_of(st.just(0.0), st.floats(0.001, limit))
    radii = tuple(draw(radius) for _ in range(4))
    clearance = draw(st.floats(0.02, 0.6))
    return rounded_box(length, height, radius=radii, clearance=clearance)


@st.composite
def perturbed_samples(draw):
    base = draw(st.sampled_from(SAMPLES))
    ys = [n.y for n in base.nodes]
    h = max(ys) - min(ys)
    nodes = []
    for n in base.nodes:
        dx = draw(st.floats(-0.01, 0.01)) * h
        dy = draw(st.floats(-0.01, 0.01)) * h
        smooth = n.smooth
        radius = n.radius
        flip = draw(st.sampled_from(["keep", "keep", "keep", "smooth", "sharp"]))
        if flip == "smooth":
            smooth, radius = True, 0.0
        elif flip == "sharp":
            smooth, radius = False, 0.0
        nodes.append(replace(n, x=n.x + dx, y=n.y + dy, smooth=smooth, radius=radius))
    return Profile(tuple(nodes), name=base.name, trailing_edge=base.trailing_edge)


@st.composite
def random_polygons(draw):
    """Random outlines that may cross themselves, have near nodes or radii too large."""
    n = draw(st.integers(3, 8))
    coord = st.floats(-0.5, 3.0)
    pts = [(draw(coord), draw(coord)) for _ in range(n)]
    if draw(st.booleans()):  # a node next to another
        i = draw(st.integers(0, n - 1))
        eps = draw(st.sampled_from([0.0, 1e-9, 1e-6, 1e-4]))
        pts.insert(i + 1, (pts[i][0] + eps, pts[i][1]))
    radii = [draw(st.sampled_from([0.0, 0.0, 0.05, 0.5, 5.0])) for _ in pts]
    smooth = [draw(st.booleans()) if r == 0.0 else False for r in radii]
    return Profile.from_points(pts, radii=radii, smooth=smooth)


# --- the invariant ----------------------------------------------------------------------------


def _finite(value, what):
    arr = np.asarray(value, dtype=float)
    assert np.all(np.isfinite(arr)), f"{what} is not finite: {value!r}"


def check_contract(profile, cond):
    try:
        a = analyze(profile, cond)
    except ProfileBenchError as exc:
        assert str(exc).strip(), "a ProfileBenchError without a message"
        event(f"raised {type(exc).__name__}")
        return "raised"
    assert isinstance(a.status, AnalysisStatus)
    if not a.success:
        assert isinstance(a.message, str) and a.message.strip()
        event(a.status.name)
        return a.status.name
    d = a.drag
    for name in (
        "cd_friction",
        "cd_pressure",
        "cd_base",
        "cd_corners",
        "cd",
        "cl",
        "reference_height",
        "base_pressure",
    ):
        _finite(getattr(d, name), f"drag.{name}")
    for name in ("cda", "force", "power", "reference_area"):
        if getattr(d, name) is not None:
            _finite(getattr(d, name), f"drag.{name}")
    # Cd is the sum of its breakdown (DragBreakdown's definition)
    assert d.cd == pytest.approx(
        d.cd_friction + d.cd_pressure + d.cd_base + d.cd_corners, rel=1e-9, abs=1e-12
    )
    for c in a.corners:
        for name in ("radius", "turning_angle_deg", "thickness", "r_over_t", "margin", "delta_cd"):
            _finite(getattr(c, name), f"corner {c.node} {name}")
        if c.table_critical_ratio is not None:
            _finite(c.table_critical_ratio, f"corner {c.node} table_critical_ratio")
    inv = a.flow.inviscid
    _finite(inv.cp, "inviscid cp")
    _finite(inv.ue, "inviscid ue")
    # Bernoulli, Cp = 1 - (Ue/V)^2 (incompressible potential flow), where the flow is attached
    # (separated stations carry the base-pressure model instead)
    attached = ~np.asarray(a.flow.separated, dtype=bool)
    np.testing.assert_allclose(
        np.asarray(inv.cp)[attached], 1.0 - np.asarray(inv.ue)[attached] ** 2, atol=1e-9
    )
    for sfl in a.flow.surfaces:
        for name in ("theta", "H", "cf", "margin"):
            _finite(getattr(sfl.bl, name), f"{sfl.name} bl.{name}")
    _finite(a.reynolds, "reynolds")
    for e in a.events:
        _finite([e.s, e.x, e.y], f"event {e.kind}")
    event("SUCCESS")
    return "success"


# --- properties -------------------------------------------------------------------------------


@settings(max_examples=120, **SETTINGS)
@given(profile=boxes(), cond=conditions())
def test_random_rounded_boxes(profile, cond):
    outcome = check_contract(profile, cond)
    # a rounded box with clearance >= 0.02 m is a valid outline (rounded_box built it)
    assert outcome != "INVALID_GEOMETRY"


@settings(max_examples=60, **SETTINGS)
@given(profile=perturbed_samples(), cond=conditions())
def test_perturbed_samples(profile, cond):
    check_contract(profile, cond)


@settings(max_examples=120, **SETTINGS)
@given(data=st.data(), cond=conditions(max_panels=80))
def test_random_invalid_or_odd_outlines(data, cond):
    try:
        profile = data.draw(random_polygons())
    except ProfileBenchError as exc:  # e.g. a smooth node given a radius is refused at once
        assert str(exc).strip()
        return
    check_contract(profile, cond)


@settings(max_examples=40, **SETTINGS)
@given(
    speed=st.one_of(
        st.floats(allow_nan=True, allow_infinity=True),
        st.integers(),
        st.text(max_size=3),
        st.none(),
    ),
    altitude=st.floats(allow_nan=True, allow_infinity=True),
    panels=st.one_of(st.integers(-10, 5000), st.floats(allow_nan=True)),
)
def test_random_conditions_never_escape(speed, altitude, panels):
    try:
        cond = Conditions(speed=speed, altitude=altitude, panels=panels)
    except ProfileBenchError as exc:
        assert str(exc).strip()
        return
    # accepted: then every field is in its documented range and finite
    assert 0 < cond.speed <= 150 and math.isfinite(cond.altitude)
    assert 40 <= cond.panels <= 2000
    _finite([cond.rho, cond.nu], "air")


# --- bugs found by the properties above, pinned as explicit cases -----------------------------


@pytest.mark.parametrize("tiny", [1e-103, 1e-300])
def test_tiny_corner_radius_is_a_sharp_edge_or_a_clear_message(tiny):
    prof = rounded_box(4.722, 0.567, radius=(0.0, 0.01, 0.0731, tiny), clearance=0.5)
    a = analyze(
        prof,
        Conditions(
            speed=112.1, altitude=11917.0, transition="turbulent", h_separation=1.846, panels=55
        ),
    )
    # the analysis' own contract (analyze's docstring): an invalid outline comes back as a status
    assert a.success or (a.status is AnalysisStatus.INVALID_GEOMETRY and "radius" in a.message)


@pytest.mark.parametrize(
    "radii, length, height, clearance, cond",
    [
        (
            (0.0, 0.1, 0.0, 0.0),
            2.789555367539794,
            0.3,
            0.5270299852303418,
            dict(speed=1.0, transition="turbulent", h_separation=2.79, panels=79),
        ),
        (
            (0.12379948415042767, 0.246, 0.024263697569133005, 0.42417163588687296),
            1.721913490878506,
            0.99999,
            0.2918619901253975,
            dict(
                speed=72.87576395345694,
                altitude=1.1,
                transition=0.0,
                h_separation=2.790866776263034,
                panels=138,
            ),
        ),
    ],
    ids=["math domain error", "complex cf"],
)
def test_turbulent_march_on_rounded_boxes(radii, length, height, clearance, cond):
    prof = rounded_box(length, height, radius=radii, clearance=clearance)
    check_contract(prof, Conditions(**cond))


def test_turbulent_march_on_a_thin_triangle():
    prof = Profile.from_points(
        [
            (0.8069631560214272, 0.018),
            (1.8904076501746494, 0.5333065870447395),
            (1.4153327274567773e-23, 0.4541604604272891),
        ]
    )
    check_contract(
        prof,
        Conditions(
            speed=1.5,
            altitude=2.61,
            ground=False,
            transition="turbulent",
            h_separation=2.2898000352053085,
            panels=40,
        ),
    )
