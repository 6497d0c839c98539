"""Round trip of the outline fit: a built outline, digitised, fitted back, analysed the same.

Each sample's built outline (and a randomly perturbed family of boxes) is sampled every 5 mm
with 1 mm of normal noise and fitted back at a 5 mm tolerance. The reference is the analysis
of the outline the points were sampled from: the fit must give back every corner's radius
within 10 %, the Cd within 1 % and the same verdict on every corner (the round-trip rule of this
project, no source). The largest deviation is measured with shapely's distances.
"""

import numpy as np
import pytest
import shapely

from profilebench import analyze
from profilebench.assess.conditions import Conditions
from profilebench.geometry import build_outline, rounded_box
from profilebench.geometry.fit import fit_outline
from profilebench.io import load_project, sample_paths

STEP, NOISE, TOLERANCE = 0.005, 0.001, 0.005


def _digitise(profile, seed=0):
    o = build_outline(profile)
    n = int(o.length / STEP)
    return o.sample(n) + np.random.default_rng(seed).normal(0.0, NOISE, (n, 2))


def _round_trip_failures(profile, conditions, seed=0, cd_rel=0.01, from_drawing=False):
    """What the fit of the digitised profile gets wrong, as messages with the numbers.

    ``from_drawing``: the radii the fit reports as not fixed by the points are taken from the
    original (as a user told so would take them from the drawing), once the range the fit
    reports for each is checked to hold the original's radius."""
    pts = _digitise(profile, seed)
    fit = fit_outline(pts, tolerance=TOLERANCE)
    fitted = fit.profile
    if from_drawing:
        fitted, failures = _radii_from_drawing(profile, fit)
        if failures:
            return failures
    # the fit's own deviation, checked with shapely: every point within the tolerance
    ring = shapely.LinearRing(build_outline(fitted).sample(4 * len(pts)))
    worst = float(np.max(shapely.distance(shapely.points(pts), ring)))
    assert worst <= TOLERANCE + 1e-4, f"a point lies {worst * 1e3:.2f} mm from the fitted outline"
    a, b = analyze(profile, conditions), analyze(fitted, conditions)
    assert a.success and b.success
    failures = []
    if abs(b.drag.cd / a.drag.cd - 1.0) > cd_rel:
        failures.append(f"Cd {a.drag.cd:.4f} -> {b.drag.cd:.4f}")
    if len(b.corners) != len(a.corners):
        failures.append(f"{len(a.corners)} corners -> {len(b.corners)}")
    here_a, here_b = _places(profile, a), _places(fitted, b)
    for c, pa in zip(a.corners, here_a):
        # the fitted corner nearest this one on the outline (a fillet's middle, not its node,
        # which for a large fillet lies well off the outline); radii as the assessment reports
        # them (a node's radius, or the curvature radius of a peak on a spline)
        k = int(np.argmin([np.hypot(*(pb - pa)) for pb in here_b]))
        got = b.corners[k]
        where = f"({c.x * 1e3:.0f}, {c.y * 1e3:.0f}) mm"
        if abs(got.radius - c.radius) > 0.10 * c.radius + 1e-12:
            failures.append(f"r {c.radius * 1e3:.0f} -> {got.radius * 1e3:.1f} mm at {where}")
        if got.verdict != c.verdict and not _flips_with_radius(profile, conditions, c, got):
            failures.append(f"{c.verdict.name} -> {got.verdict.name} at {where}")
    return failures


def _places(profile, analysis):
    """Where each corner of ``analysis`` sits on ``profile``'s outline (m): a fillet's middle, a
    sharp node, or a curvature peak's point."""
    outline = build_outline(profile)
    arcs = {arc.node: arc for arc in outline.arcs}
    out = []
    for c in analysis.corners:
        node = profile.nodes[c.node] if c.node < len(profile.nodes) else None
        arc = arcs.get(c.node) if node is not None and not node.smooth else None
        if arc is None:
            out.append(np.array([c.x, c.y]))
        else:
            out.append(outline.points_at([0.5 * (arc.s_start + arc.s_end)])[0])
    return out


def _radii_from_drawing(profile, fit):
    """(fitted profile with its unresolved radii set to the original's, failures): a failure
    where an original corner's radius lies outside the range the fit reports for it."""
    fitted, failures = fit.profile, []
    for node in profile.nodes:
        if node.smooth:
            continue
        got = min(fit.radius_ranges, key=lambda r: np.hypot(r.x - node.x, r.y - node.y))
        if np.hypot(got.x - node.x, got.y - node.y) > 0.05:
            continue  # not fitted as a corner node (the radius test above says so)
        if not got.contains(node.radius):
            failures.append(
                f"{node.label}: r {node.radius * 1e3:.0f} mm outside the range the fit reports, "
                f"{got.low * 1e3:.0f} to {got.high * 1e3:.0f} mm"
            )
        elif not got.resolved:
            fitted = fitted.with_radius(got.node, node.radius)
    return fitted, failures


def _flips_with_radius(profile, conditions, corner, got):
    """True when the original outline, with only this corner's radius set to the fitted one,
    already gives the fitted verdict: the corner sits at its critical radius, where a radius
    error well inside the 10 % flips the verdict whatever the fit does (measured: a front lower
    fillet of 103.5 mm fitted at 105.2 mm, attached at 105.2 and a bubble at 103.5)."""
    node = profile.nodes[corner.node] if corner.node < len(profile.nodes) else None
    if node is None or node.smooth or node.radius <= 0.0 or got.radius <= 0.0:
        return False
    moved = analyze(profile.with_radius(corner.node, got.radius), conditions)
    same = [k for k in moved.corners if k.node == corner.node]
    return moved.success and bool(same) and same[0].verdict == got.verdict


# measured with this fit (5 mm tolerance, noise seed 0). The underbody's rear fillets turn the
# outline by 22 to 31 degrees only: their arcs are 19 to 33 mm long (4 to 7 points) and lie 0.9
# to 2.2 mm off the sharp corner, about the 1 mm noise. Fitted on the points within 120 mm of
# the corner with five noise seeds, their radius came out 17 to 69 mm (minibus, 60 mm), 19 to
# 79 mm (van, 50 mm) and 67 to 129 mm (hatch, 80 mm): the points do not fix it to 10 %, and the
# fit keeps such a corner sharp unless the rounding is significant (an F test).
_KNOWN = {
    "kestrel_courier_van": (
        "underbody rear r 50 mm fitted sharp (EDGE_SEPARATION for ATTACHED, the rear bumper "
        "lower IN_WAKE for TURBULENT_SEPARATION), Cd 0.3526 -> 0.2933 (-17 %: with the side "
        "relief the sharp and the rounded underbody rear differ by about 15 %, see "
        "docs/validation.md; -4.3 % as a 2D section); the other radii within 5 %"
    ),
    "kestrel_hatch": (
        "the windscreen base (r 100 mm turning 14 degrees, its arc 0.8 mm off its sharp corner) "
        "comes back as a curvature peak of a smooth run (r 330 mm, CONCAVE for CONCAVE_BUBBLE), "
        "and the bumper nose's curvature peak (r 365 mm, ATTACHED) is not found as a corner (the "
        "nearest is the bonnet leading edge's fillet, r 124 mm, BUBBLE_REATTACHES); underbody "
        "rear r 80 -> 139 mm (same verdict); Cd within 1 %"
    ),
    "kestrel_shuttle_minibus": (
        "underbody rear r 60 mm fitted sharp (EDGE_SEPARATION for ATTACHED, the rear bumper "
        "lower IN_WAKE for TURBULENT_SEPARATION), Cd 0.3519 -> 0.2851 (-19 %: with the side "
        "relief the sharp and the rounded underbody rear differ by about 20 %; -4.7 % as a 2D "
        "section); the other radii within 1 %"
    ),
}


@pytest.mark.parametrize(
    "name",
    [
        pytest.param(p.stem, marks=pytest.mark.xfail(strict=True, reason=_KNOWN[p.stem]))
        if p.stem in _KNOWN
        else p.stem
        for p in sample_paths()
    ],
)
def test_each_sample_digitised_and_fitted_back_keeps_its_radii_cd_and_verdicts(name):
    project = load_project(next(p for p in sample_paths() if p.stem == name))
    failures = _round_trip_failures(project.profile, project.conditions)
    assert failures == []


# the points cannot fix the underbody's rear fillets (above), and the fit says so: it reports,
# for each corner, the radii the points allow (profilebench.geometry.radius_bounds, a 99.73 %
# profile-likelihood range) and lists those not fixed to 10 %. The rest of the round trip must
# hold once those radii come from the drawing: the same Cd within 1 % and the same verdicts.
_KNOWN_FROM_DRAWING = {
    "kestrel_hatch": (
        "not a radius the fit left open: the windscreen base (r 100 mm turning 14 degrees) comes "
        "back inside a smooth run, not as a corner node (CONCAVE for CONCAVE_BUBBLE), and the "
        "bumper nose's curvature peak (r 365 mm) is not found as a corner"
    ),
}


@pytest.mark.parametrize(
    "name",
    [
        pytest.param(
            p.stem, marks=pytest.mark.xfail(strict=True, reason=_KNOWN_FROM_DRAWING[p.stem])
        )
        if p.stem in _KNOWN_FROM_DRAWING
        else p.stem
        for p in sample_paths()
    ],
)
def test_each_sample_round_trips_once_the_radii_the_points_leave_open_come_from_the_drawing(name):
    project = load_project(next(p for p in sample_paths() if p.stem == name))
    failures = _round_trip_failures(project.profile, project.conditions, from_drawing=True)
    assert failures == []


# the test body (2 m by 0.5 m, front radii 0.2 h, rear corners sharp) perturbed: length and
# height by 20 %, front radii 0.14 to 0.26 h, rear corners sharp or rounded. Smaller radii sit
# near a corner's critical r/t, where a few per cent of radius flips the verdict (measured: a
# 30 mm front upper radius on a 1.5 m by 0.5 m box turns from TURBULENT_SEPARATION to
# BUBBLE_REATTACHES at 31.5 mm, Cd -3 %): no fit to 10 % keeps that verdict.
#
# The members are drawn with numpy's generator from a fixed seed, not by hypothesis: hypothesis
# draws its floats partly from constants it finds in the modules already imported, so its
# "derandomized" members changed with the tests run before (measured: alone, the fourth member
# was one the whole suite never drew, and it failed; see the xfail below).
def _family(count, seed=2026):
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(count):
        length, height = rng.uniform(1.6, 2.4), rng.uniform(0.4, 0.6)
        front = tuple(float(f) for f in rng.uniform(0.14, 0.26, 2))
        sharp_rear = rng.random() < 0.5
        rear = (0.0, 0.0) if sharp_rear else tuple(float(r) for r in rng.uniform(0.12, 0.3, 2))
        clearance, noise_seed = rng.uniform(0.03, 0.1), int(rng.integers(0, 1001))
        out.append((float(length), float(height), front, rear, float(clearance), noise_seed))
    return out


def _family_body(length, height, front, rear, clearance):
    radii = (front[0] * height, rear[0] * height, rear[1] * height, front[1] * height)
    return rounded_box(length, height, radii, clearance=clearance)


@pytest.mark.parametrize("member", _family(4), ids=lambda m: f"seed{m[5]}")
def test_a_perturbed_family_of_test_bodies_round_trips(member):
    # radii within 10 %, the same corners and verdicts; the Cd within 3 %, not 1 %: over 30
    # random members (measured) the fit kept every radius within 6 % and every node within
    # 1.5 mm, yet 5 of 30 Cds moved by 1.0 to 2.6 % (median 0.2 %): the analysis itself moves
    # that much for such changes of the underbody near the ground (see the xfails below)
    length, height, front, rear, clearance, seed = member
    body = _family_body(length, height, front, rear, clearance)
    assert _round_trip_failures(body, Conditions(speed=30.0), seed, cd_rel=0.03) == []


@pytest.mark.xfail(
    strict=True,
    reason=(
        "the analysis at 250 panels, not the fit: the fitted nodes lie within 0.5 mm and its radii "
        "within 0.8 mm, and both outlines give a front lower bubble and Cd 0.3248 / 0.3247 at 500 "
        "and 1000 panels; only the original at 250 reads attached (margin 0.22, Cd 0.3146), the "
        "tangent-point resolution of docs/validation.md"
    ),
)
def test_a_member_whose_analysis_is_unconverged_at_250_panels_round_trips():
    # the member hypothesis drew when this file ran alone
    body = _family_body(
        2.022803998320436,
        0.5417099519031054,
        (0.22782720102635928, 0.15923506723582032),
        (0.2991006341744248, 0.24856085096136812),
        0.05151226720382751,
    )
    assert _round_trip_failures(body, Conditions(speed=30.0), 611, cd_rel=0.03) == []


@pytest.mark.xfail(
    strict=True,
    reason=(
        "the analysis, not the fit: the fitted nodes lie within 1.4 mm of the body's and its radii "
        "within 1 %, yet Cd 0.2891 -> 0.2838 (-1.8 %; 0.2924 / 0.2932 at 500 / 1000 panels); moving the rear lower node alone by its "
        "0.6 mm fit error moves the Cd by -1.0 % (friction 0.0217 -> 0.0181 on the underbody, "
        "40 mm above the ground)"
    ),
)
def test_a_family_member_keeps_its_cd_within_one_percent():
    body = _family_body(
        1.7038191595194385,
        0.5896656906583551,
        (0.12655760688281512 / 0.5896656906583551, 0.10866310691044705 / 0.5896656906583551),
        (0.14111391740989412 / 0.5896656906583551, 0.09998111221722424 / 0.5896656906583551),
        0.03965776510068687,
    )
    assert _round_trip_failures(body, Conditions(speed=30.0), seed=70) == []


@pytest.fixture(scope="module")
def van_fit():
    van = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van")).profile
    pts = _digitise(van)
    return pts, fit_outline(pts, tolerance=TOLERANCE).profile


@pytest.mark.parametrize("reverse, start_share", [(True, 0.0), (False, 0.6), (True, 0.6)])
def test_a_van_with_curved_runs_fits_the_same_whichever_way_and_from_wherever_given(
    van_fit, reverse, start_share
):
    # the Courier van (smooth bonnet and bumper runs) given clockwise, or from a point on the
    # roof (0.6 of the way round from the nose), gives the same nodes as given as sampled
    pts, base = van_fit
    other = pts[::-1] if reverse else pts
    other = np.roll(other, -int(start_share * len(pts)), axis=0)
    got = fit_outline(other, tolerance=TOLERANCE).profile
    a = np.array([(n.x, n.y, n.radius, n.smooth) for n in base.nodes])
    b = np.array([(n.x, n.y, n.radius, n.smooth) for n in got.nodes])
    assert a.shape == b.shape and np.allclose(a, b, atol=1e-9)
