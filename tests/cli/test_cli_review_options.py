"""Command-line options and messages of the review: speeds refused in km/h, --area/--width,
compare at different conditions and --same-conditions, --cp-min, the baseline on the page,
notes said once, the run block, and image files readable like CSV and JSON."""

import dataclasses
import os
import re
import stat

import pytest

import profilebench.cli as cli
import profilebench.plotting.review as review
from fake_analysis import fake_analysis
from profilebench.io.project import load_project, save_project
from profilebench.io.samples import default_sample_path
from profilebench.plotting.stations import is_analysis

SAMPLE = str(default_sample_path())
REYNOLDS_NOTE = "the table's Reynolds range does not hold these conditions"


@pytest.fixture
def fake(monkeypatch):
    """The hand-built analysis at the conditions the CLI passes; every corner shares one
    disagreement (as the built-in table's Reynolds range gives on the samples)."""
    seen = []
    base = fake_analysis()
    corners = tuple(dataclasses.replace(c, disagreement=REYNOLDS_NOTE) for c in base.corners)

    def analyse(profile, conditions, table=None):
        seen.append(conditions)
        return dataclasses.replace(base, conditions=conditions, profile=profile, corners=corners)

    monkeypatch.setattr(cli, "_analyse", analyse)
    return seen


@pytest.mark.parametrize("kmh", ["600", "-5", "0", "540.4"])
def test_speed_refused_in_km_h(fake, capsys, kmh):
    assert cli.main(["analyse", SAMPLE, "--speed", kmh]) == cli.EXIT_BAD_INPUT
    err = capsys.readouterr().err
    # 150 m/s (the conditions' upper limit) = 540 km/h (1 km/h = 1/3.6 m/s)
    assert f"--speed {float(kmh):g} km/h is outside (0, 540] km/h" in err
    assert "m/s" not in err
    assert not fake


def test_speed_at_the_limit_accepted(fake, capsys):
    assert cli.main(["analyse", SAMPLE, "--speed", "540"]) == cli.EXIT_OK
    assert fake[0].speed == pytest.approx(150.0)  # 540 / 3.6


def test_area_option(fake, capsys):
    assert cli.main(["analyse", SAMPLE, "--area", "2.5"]) == cli.EXIT_OK
    assert fake[0].frontal_area == 2.5 and fake[0].width is None


def test_width_option(fake, capsys):
    assert cli.main(["analyse", SAMPLE, "--width", "1.8"]) == cli.EXIT_OK
    assert fake[0].width == 1.8 and fake[0].frontal_area is None


def test_area_and_width_together_refused(fake, capsys):
    assert cli.main(["analyse", SAMPLE, "--area", "2", "--width", "1.8"]) == cli.EXIT_BAD_INPUT
    assert "not allowed with argument --area" in capsys.readouterr().err


@pytest.mark.parametrize("value", ["0", "-1.5"])
def test_area_must_be_positive(fake, capsys, value):
    assert cli.main(["analyse", SAMPLE, "--area", value]) == cli.EXIT_BAD_INPUT
    assert "give a positive number in m^2" in capsys.readouterr().err


def test_imported_outline_gets_cda_with_width(tmp_path, capsys):
    """A CSV outline has no area; --width gives CdA = Cd x width x h (real analysis)."""
    pts = tmp_path / "box.csv"
    # a 2000 x 500 mm box 50 mm above the ground, corners rounded by the fitter's tolerance
    pts.write_text(
        "x_mm,y_mm\n"
        + "\n".join(f"{x},{y}" for x, y in [(0, 50), (2000, 50), (2000, 550), (0, 550)])
        + "\n"
    )
    assert cli.main(["analyse", str(pts), "--width", "1.5", "--panels", "120"]) == cli.EXIT_OK
    out = capsys.readouterr().out
    rows = {
        m.group(1).strip(): m.group(2) for m in re.finditer(r"^(\S[^\n]*?)\s{2,}(\S+)", out, re.M)
    }
    cd, h_mm, cda = float(rows["Cd"]), float(rows["reference height h"]), float(rows["CdA"])
    assert cda == pytest.approx(cd * 1.5 * h_mm / 1000, abs=1e-4)  # CdA = Cd A, A = width h
    assert rows["drag force"] != "n/a"


def _project_at(tmp_path, name, kmh):
    p = load_project(SAMPLE)
    p = dataclasses.replace(p, conditions=p.conditions.replace(speed=kmh / 3.6))
    return str(save_project(p, tmp_path / name))


def test_compare_says_when_conditions_differ(fake, tmp_path, capsys):
    a, b = _project_at(tmp_path, "a.json", 90.0), _project_at(tmp_path, "b.json", 100.0)
    assert cli.main(["compare", a, b]) == cli.EXIT_OK
    out = capsys.readouterr().out
    assert "WARNING: the conditions differ (speed 90.0 km/h vs 100.0 km/h)" in out
    assert "--same-conditions" in out
    assert [c.speed for c in fake] == pytest.approx([25.0, 100 / 3.6])


def test_compare_same_conditions(fake, tmp_path, capsys):
    a, b = _project_at(tmp_path, "a.json", 90.0), _project_at(tmp_path, "b.json", 100.0)
    assert cli.main(["compare", a, b, "--same-conditions"]) == cli.EXIT_OK
    out = capsys.readouterr().out
    assert "conditions differ" not in out
    assert "Both analysed at the baseline's conditions." in out
    assert fake[0] == fake[1] and fake[0].speed == pytest.approx(25.0)


def test_compare_same_file_no_warning(fake, capsys):
    assert cli.main(["compare", SAMPLE, SAMPLE]) == cli.EXIT_OK
    assert "conditions differ" not in capsys.readouterr().out


def test_conditions_differences_names_each_field():
    from profilebench.assess.conditions import Conditions

    a = Conditions(speed=25.0)
    b = a.replace(speed=30.0, ground=False, transition=0.5, frontal_area=2.0)
    assert cli.conditions_differences(a, b) == [
        "speed 90.0 km/h vs 108.0 km/h",
        "ground on vs off",
        "transition free vs at s = 0.5 m",
        "frontal area none vs 2 m^2",
    ]


@pytest.fixture
def page_args(monkeypatch):
    """The keyword arguments the CLI gives review_figure."""
    got = {}
    real = review.review_figure

    def spy(analysis, **kw):
        got.update(kw)
        return real(analysis, **kw)

    monkeypatch.setattr(review, "review_figure", spy)
    return got


def test_cp_min_reaches_the_page(fake, page_args, tmp_path, capsys):
    assert (
        cli.main(["analyse", SAMPLE, "--image", str(tmp_path / "p.png"), "--cp-min", "-2"])
        == cli.EXIT_OK
    )
    assert page_args["cp_min"] == -2.0


def test_default_cp_scale_on_every_page(fake, page_args, tmp_path, capsys):
    assert cli.main(["analyse", SAMPLE, "--image", str(tmp_path / "p.png")]) == cli.EXIT_OK
    assert page_args["cp_min"] == -3.0


def test_bad_cp_min_before_any_work(fake, tmp_path, capsys):
    assert (
        cli.main(["analyse", SAMPLE, "--image", str(tmp_path / "p.png"), "--cp-min", "0.5"])
        == cli.EXIT_BAD_INPUT
    )
    assert "Cp colour scale" in capsys.readouterr().err
    assert not fake and not (tmp_path / "p.png").exists()


def test_baseline_analysed_for_the_page(fake, page_args, tmp_path, capsys):
    p = load_project(SAMPLE)
    with_base = save_project(
        dataclasses.replace(p, baseline=p.profile.scaled(1.02)), tmp_path / "b.json"
    )
    assert cli.main(["analyse", str(with_base), "--image", str(tmp_path / "p.png")]) == cli.EXIT_OK
    assert is_analysis(page_args["baseline"])
    assert page_args["baseline"].conditions == fake[0]  # at the same conditions
    assert len(fake) == 2


def test_shared_note_printed_once_and_run_block(fake, capsys):
    assert cli.main(["analyse", SAMPLE]) == cli.EXIT_OK
    out = capsys.readouterr().out
    assert out.count(REYNOLDS_NOTE) == 1
    assert "Run: 120.0 km/h" in out  # the sample hatch's speed
    assert "separation margin:" in out


def test_cli_image_mode_like_csv_and_json(fake, tmp_path, capsys):
    old = os.umask(0o022)
    try:
        files = [tmp_path / "p.png", tmp_path / "s.csv", tmp_path / "r.json"]
        assert (
            cli.main(
                [
                    "analyse",
                    SAMPLE,
                    "--image",
                    str(files[0]),
                    "--csv",
                    str(files[1]),
                    "--json",
                    str(files[2]),
                ]
            )
            == cli.EXIT_OK
        )
    finally:
        os.umask(old)
    assert {stat.S_IMODE(f.stat().st_mode) for f in files} == {0o644}  # 0666 less umask 022


def test_force_rise_from_speed_not_blamed_on_the_area(monkeypatch, tmp_path, capsys):
    """Cd and CdA fall but the speed rises: F = 1/2 rho V^2 CdA rises with V^2, and the
    warning names the dynamic pressure, not the frontal area."""
    base = fake_analysis()

    def analyse(profile, conditions, table=None):
        cd = 0.30 if conditions.speed < 26 else 0.28  # the variant (100 km/h) has the lower Cd
        area = 2.0
        q = 0.5 * 1.225 * conditions.speed**2
        drag = dataclasses.replace(
            base.drag,
            cd=cd,
            cda=cd * area,
            force=q * cd * area,
            power=q * cd * area * conditions.speed,
        )
        return dataclasses.replace(base, conditions=conditions, profile=profile, drag=drag)

    monkeypatch.setattr(cli, "_analyse", analyse)
    a, b = _project_at(tmp_path, "a.json", 90.0), _project_at(tmp_path, "b.json", 100.0)
    assert cli.main(["compare", a, b]) == cli.EXIT_OK
    out = capsys.readouterr().out
    # by hand: q rises by (100/90)^2 = 1.235, CdA falls by 0.28/0.30: F rises by 15 %
    assert "but the drag force rises by" in out and "dynamic pressure (speed or air) differs" in out
    assert "CdA rises" not in out
