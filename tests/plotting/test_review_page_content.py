"""What the review page and the results JSON state: the run, the baseline, the Cp scale, notes
said once, a legend on the page, tables that fit, and image files readable like CSV and JSON."""

import dataclasses
import datetime
import json
import os
import stat

import numpy as np
import pytest

import profilebench
from fake_analysis import fake_analysis
from profilebench.errors import InputError
from profilebench.io.export import (
    results_to_dict,
    run_record,
    write_results_json,
    write_surface_csv,
)
from profilebench.plotting import draw_profile, review_figure, save_figure
from profilebench.plotting.profile_view import BASELINE_GID, CP_FLOOR
from profilebench.plotting.review import NOTES_GID, RUN_GID, new_figure
from profilebench.plotting.summary import MARGIN_DEFINITION, corner_notes, corner_rows

WHEN = datetime.datetime(2026, 12, 2, 12, 30, tzinfo=datetime.timezone.utc)


def _with_conditions(a, **changes):
    return dataclasses.replace(a, conditions=a.conditions.replace(**changes))


def _texts(fig, gid):
    return "\n".join(t.get_text() for t in fig.texts if t.get_gid() == gid)


def _cells(fig):
    return [
        c.get_text().get_text()
        for ax in fig.axes
        for t in ax.tables
        for c in t.get_celld().values()
    ]


def test_run_block_states_every_condition_version_and_date():
    a = _with_conditions(
        fake_analysis(),
        speed=25.0,
        altitude=1000.0,
        temperature_offset=5.0,
        transition=0.4,
        h_separation=2.2,
        base_pressure=-0.3,
        panels=180,
        model_scale=0.25,
        tunnel_speed=40.0,
    )
    run = _texts(review_figure(a, created=WHEN), RUN_GID).replace("\n    ", " ")
    for text in (
        "90.0 km/h",  # 25 m/s x 3.6
        "ISO 2533 air at 1000 m, +5 K",
        "ground on",
        "transition forced at s = 0.4 m",
        "H = 2.2",
        "Cp_b = -0.3",
        "180 panels",
        "frontal area 2 m^2",
        "model scale 1:4 at 144.0 km/h",
        "r/t table: square sections",
        f"profilebench {profilebench.__version__}",
        "made 2026-12-02 12:30:00 UTC",
    ):
        assert text in run, text


def test_run_block_for_given_air_and_free_air():
    a = _with_conditions(
        fake_analysis(ground=False),
        density=1.1,
        kinematic_viscosity=1.6e-5,
        frontal_area=None,
        width=1.8,
    )
    run = _texts(review_figure(a, created=WHEN), RUN_GID)
    assert "air given: rho 1.1 kg/m^3, nu 1.6e-05 m^2/s" in run
    assert "free air (no ground)" in run
    assert "width 1.8 m" in run


def test_json_run_record():
    a = fake_analysis()
    data = results_to_dict(a)
    run = data["run"]
    assert run["conditions"] == a.conditions.to_dict()
    # ISO 2533 sea level: rho = 1.225 kg/m^3, nu = 1.4607e-5 m^2/s (ISO 2533:1975, table)
    assert run["air"]["density_kg_m3"] == pytest.approx(1.225, rel=1e-4)
    assert run["air"]["kinematic_viscosity_m2_s"] == pytest.approx(1.4607e-5, rel=1e-3)
    assert run["tables"] == ["square sections"]
    assert run["profilebench_version"] == profilebench.__version__
    made = datetime.datetime.fromisoformat(run["created_utc"])
    assert abs((datetime.datetime.now(datetime.timezone.utc) - made).total_seconds()) < 120


def test_run_record_date_can_be_given():
    assert run_record(fake_analysis(), created=WHEN)["created_utc"] == "2026-12-02T12:30:00+00:00"


def _baseline_of(a, cd):
    drag = dataclasses.replace(a.drag, cd=cd, cda=2.0 * cd, force=0.5 * 1.225 * 30**2 * 2.0 * cd)
    return dataclasses.replace(a, drag=drag, profile=a.profile.scaled(1.05))


def test_baseline_cd_and_deltas_on_the_page():
    a = fake_analysis()
    base = _baseline_of(a, 0.3)
    cells = _cells(review_figure(a, baseline=base))
    # by hand: variant Cd 0.3198 (fake) minus 0.3; CdA = 2 m^2 x Cd; F = 1/2 rho V^2 CdA
    assert "0.3000" in cells
    assert f"{a.drag.cd - 0.3:+.4f}" in cells
    assert f"{100 * (a.drag.cd - 0.3) / 0.3:+.2f}% of the baseline" in cells
    assert f"{2.0 * (a.drag.cd - 0.3):+.4f}" in cells
    assert f"{0.5 * 1.225 * 900 * 2.0 * (a.drag.cd - 0.3):+.2f}" in cells


def test_bare_baseline_profile_gives_no_delta_rows():
    a = fake_analysis()
    cells = _cells(review_figure(a, baseline=a.profile.scaled(1.05)))
    assert "Cd baseline" not in cells


def test_baseline_outline_drawn_over_the_cp_band():
    a = fake_analysis()
    fig = new_figure()
    ax = fig.add_subplot(111)
    out = draw_profile(ax, a, baseline=a.profile.scaled(1.05))
    line = next(ln for ln in ax.lines if ln.get_gid() == BASELINE_GID)
    assert line.get_zorder() > out["cp"].get_zorder()
    assert line.get_zorder() > out["outline"].get_zorder()
    assert line.get_path_effects()  # the white halo that keeps it visible on dark colours


def _cp_low(a, cp_low):
    """The fake with its suction peak scaled to reach cp_low."""
    inv = a.flow.inviscid
    cp = np.asarray(inv.cp, float)
    scaled = np.where(cp < 0, cp * cp_low / cp.min(), cp)
    return dataclasses.replace(
        a, flow=dataclasses.replace(a.flow, inviscid=dataclasses.replace(inv, cp=scaled))
    )


def test_cp_colour_scale_is_the_same_for_different_analyses():
    norms = []
    for low in (-1.2, -4.5):
        fig = new_figure()
        out = draw_profile(fig.add_subplot(111), _cp_low(fake_analysis(), low))
        norms.append((out["cp"].norm.vmin, out["cp"].norm.vmax))
    assert norms[0] == norms[1] == (CP_FLOOR, 1.0)


def test_cp_colour_scale_set_by_the_user():
    fig = new_figure()
    out = draw_profile(fig.add_subplot(111), fake_analysis(), cp_min=-2.0)
    assert out["cp"].norm.vmin == -2.0
    assert out["cp"].norm(0.0) == pytest.approx(0.5)  # Cp = 0 still the middle of the map


@pytest.mark.parametrize("bad", [0.0, 0.5, -50.0, float("nan"), "low"])
def test_bad_cp_scale_is_an_input_error(bad):
    fig = new_figure()
    with pytest.raises(InputError, match="Cp colour scale"):
        draw_profile(fig.add_subplot(111), fake_analysis(), cp_min=bad)


def _same_table_notes(a, verdict, disagreement):
    corners = tuple(
        dataclasses.replace(c, table_verdict=verdict, disagreement=disagreement) for c in a.corners
    )
    return dataclasses.replace(a, corners=corners)


def test_shared_corner_notes_said_once():
    verdict = "no critical ratio in the table's data"
    reynolds = "the table's Reynolds range does not hold these conditions"
    a = _same_table_notes(fake_analysis(), verdict, reynolds)
    assert all(row[6] == "(see note)" for row in corner_rows(a))
    assert corner_notes(a) == [
        f"table verdict, every corner: {verdict}",
        f"every corner: {reynolds}",
    ]
    fig = review_figure(a)
    notes = _texts(fig, NOTES_GID).replace("\n", " ")
    assert notes.count(verdict) == 1 and notes.count(reynolds) == 1
    assert not any(verdict in c for c in _cells(fig))


def test_corner_notes_that_differ_stay_on_their_rows():
    a = fake_analysis()  # its corners' table verdicts differ
    assert [row[6] for row in corner_rows(a)] == [c.table_verdict for c in a.corners]
    assert corner_notes(a) == []


def test_margin_is_defined_on_the_page():
    notes = _texts(review_figure(fake_analysis()), NOTES_GID).replace("\n", " ")
    assert "separation margin:" in notes and "not a margin on the radius" in notes
    assert "not a margin on the radius" in MARGIN_DEFINITION


def test_legend_inside_the_page():
    fig = review_figure(fake_analysis())
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    legends = [ax.get_legend() for ax in fig.axes if ax.get_legend() is not None]
    assert legends
    for leg in legends:
        bb = leg.get_window_extent(r)
        assert bb.x0 >= 0 and bb.y0 >= 0 and bb.x1 <= fig.bbox.width and bb.y1 <= fig.bbox.height


def test_long_corner_table_fits_above_the_notes():
    a = fake_analysis()
    many = tuple(
        dataclasses.replace(a.corners[k % 3], node=k, label=f"corner {k}") for k in range(40)
    )
    fig = review_figure(dataclasses.replace(a, corners=many))
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    cells = _cells(fig)
    more = [c for c in cells if c.startswith("+ ") and c.endswith("more (CLI, JSON)")]
    assert len(more) == 1
    shown = sum(1 for k in range(40) if f"corner {k}" in cells)
    assert more[0] == f"+ {40 - shown} more (CLI, JSON)"
    notes = next(t for t in fig.texts if t.get_gid() == NOTES_GID).get_window_extent(r)
    table = next(
        t
        for ax in fig.axes
        for t in ax.tables
        if "corner 0" in [c.get_text().get_text() for c in t.get_celld().values()]
    )
    table = table.get_window_extent(r)
    assert table.y0 >= notes.y1


def test_image_mode_matches_csv_and_json(tmp_path):
    old = os.umask(0o022)
    try:
        a = fake_analysis()
        img = save_figure(review_figure(a), tmp_path / "page.png")
        js = write_results_json(a, tmp_path / "r.json")
        csv = write_surface_csv(a, tmp_path / "s.csv")
    finally:
        os.umask(old)
    modes = {stat.S_IMODE(p.stat().st_mode) for p in (img, js, csv)}
    assert modes == {0o644}  # 0666 less the umask 022, as open() gives a new file (POSIX)


def test_image_replacing_a_file_keeps_its_mode(tmp_path):
    target = tmp_path / "page.png"
    target.write_bytes(b"old")
    os.chmod(target, 0o640)
    save_figure(review_figure(fake_analysis()), target)
    assert stat.S_IMODE(target.stat().st_mode) == 0o640


def test_json_written_has_the_run(tmp_path):
    data = json.loads(write_results_json(fake_analysis(), tmp_path / "r.json").read_text())
    assert set(data["run"]) == {
        "conditions",
        "base_pressure_used",
        "base_pressure_note",
        "air",
        "tables",
        "profilebench_version",
        "created_utc",
    }


def test_a_refinement_check_heads_the_page_notes():
    from profilebench.assess.refinement import RefinementCheck

    moved = "bonnet leading edge: smallest attached radius 44.0 mm at 250 panels, 48.3 mm at 500"
    fails = RefinementCheck("p", 250, 500, 0.318, 0.3168, -0.004, (), (moved,))
    notes = _texts(review_figure(fake_analysis(), refinement=fails), NOTES_GID)
    notes = notes.replace("\n", " ")
    assert notes.startswith("Notes: Refinement check (250 against 500 panels): DOES NOT HOLD")
    assert moved in notes
    holds = RefinementCheck("p", 250, 500, 0.318, 0.3168, -0.004, (), ())
    notes = _texts(review_figure(fake_analysis(), refinement=holds), NOTES_GID)
    assert "the answers hold when the panels are doubled" in notes.replace("\n", " ")
    # without a check the page says nothing of one
    assert "Refinement check" not in _texts(review_figure(fake_analysis()), NOTES_GID)


def test_the_radii_a_digitised_outline_leaves_open_are_on_the_page_after_the_check():
    # an open range on a fitted outline (profilebench.assess.open_radii): the page says where,
    # which radii the points allow and how far the Cd moves across them, before the corner notes
    from profilebench.assess.open_radii import OpenRadiusEffect
    from profilebench.geometry.radius_bounds import RadiusRange

    rng = RadiusRange(
        node=0,
        label="rear lower corner 1",
        x=4.1,
        y=0.18,
        radius=0.0,
        low=0.0,
        high=0.109,
        high_is_limit=False,
        tolerance=0.005,
    )
    effect = OpenRadiusEffect(
        range=rng,
        cd=0.2933,
        ends=((0.0, 0.2933, "sharp-edge separation", ""), (0.109, 0.3507, "attached", "")),
    )
    notes = _texts(review_figure(fake_analysis(), open_radii=[effect]), NOTES_GID)
    notes = notes.replace("\n", " ")
    # (0.3507 - 0.2933) / 0.2933 = 19.6 %
    assert (
        "Radius not fixed by the points: rear lower corner 1 (4100, 180) mm, 0 to 109 mm, "
        "Cd moves 19.6 % across it; take it from the drawing" in notes
    )
    assert notes.index("Radius not fixed") < notes.index("separation margin:")
