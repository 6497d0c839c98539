"""The command line, in-process through main([...]) with a hand-built analysis."""

import dataclasses
import json
import re
import sys

import pytest

import profilebench.cli as cli
from cli_helpers import summary_rows
from fake_analysis import N, fake_analysis
from profilebench.assess.results import Analysis, AnalysisStatus
from profilebench.io.export import CAUTION
from profilebench.io.samples import default_sample_path, sample_paths

SAMPLE = str(default_sample_path())


@pytest.fixture
def fake(monkeypatch):
    """Replace the analysis by the hand-built one, keeping the conditions the CLI passes."""
    seen = {}
    base = fake_analysis()

    def analyse(profile, conditions, table=None):
        seen.setdefault("conditions", []).append(conditions)
        return dataclasses.replace(base, conditions=conditions, profile=profile)

    monkeypatch.setattr(cli, "_analyse", analyse)
    return base, seen


def test_analyse_prints_the_analysis_numbers(fake, capsys):
    base, _ = fake
    assert cli.main(["analyse", SAMPLE]) == 0
    out = capsys.readouterr().out
    rows = summary_rows(out)
    d = base.drag
    # printed to 4 decimals for coefficients, 2 for the force, 3 for kW: equal within that rounding
    assert float(rows["Cd"]) == pytest.approx(d.cd, abs=5e-5)
    assert float(rows["friction"]) == pytest.approx(d.cd_friction, abs=5e-5)
    assert float(rows["pressure"]) == pytest.approx(d.cd_pressure, abs=5e-5)
    assert float(rows["base"]) == pytest.approx(d.cd_base, abs=5e-5)
    assert float(rows["corners"]) == pytest.approx(d.cd_corners, abs=5e-5)
    assert float(rows["CdA"]) == pytest.approx(d.cda, abs=5e-5)
    assert float(rows["drag force"]) == pytest.approx(d.force, abs=5e-3)
    assert float(rows["power"]) == pytest.approx(d.power / 1000, abs=5e-4)
    assert float(rows["Cl"]) == pytest.approx(d.cl, abs=5e-5)
    assert float(rows["Reynolds (full scale)"]) == pytest.approx(base.reynolds, rel=1e-3)
    assert float(rows["Reynolds (model)"]) == pytest.approx(base.model_reynolds, rel=1e-3)
    for c in base.corners:
        assert c.label in rows
    assert CAUTION in out


def test_corner_table_columns(fake, capsys):
    cli.main(["analyse", SAMPLE])
    out = capsys.readouterr().out
    header = next(l for l in out.splitlines() if l.startswith("corner"))
    assert re.split(r"\s{2,}", header) == list(cli_columns())


def cli_columns():
    from profilebench.plotting.summary import CORNER_COLUMNS

    return CORNER_COLUMNS


def test_speed_and_ground_options_reach_the_conditions(fake):
    _, seen = fake
    assert cli.main(["analyse", SAMPLE, "--speed", "72", "--no-ground", "--transition", "0.4"]) == 0
    cond = seen["conditions"][-1]
    assert cond.speed == pytest.approx(20.0)  # 72 km/h = 20 m/s (exact unit conversion)
    assert cond.ground is False and cond.transition == 0.4


def test_side_relief_option_reaches_the_conditions(fake):
    _, seen = fake
    assert cli.main(["analyse", SAMPLE]) == 0
    assert seen["conditions"][-1].side_relief is True  # the sample's (the default)
    assert cli.main(["analyse", SAMPLE, "--no-side-relief"]) == 0
    assert seen["conditions"][-1].side_relief is False


def test_base_from_option_reaches_the_conditions(fake):
    _, seen = fake
    assert cli.main(["analyse", SAMPLE]) == 0
    assert seen["conditions"][-1].base_model == "constant"  # the sample's (the default)
    assert cli.main(["analyse", SAMPLE, "--base-from", "body"]) == 0
    assert seen["conditions"][-1].base_model == "body"


def test_unknown_base_from_exits_2(fake, capsys):
    assert cli.main(["analyse", SAMPLE, "--base-from", "wake"]) == 2
    err = capsys.readouterr().err
    assert "base_model" in err and "'constant', 'body', 'section'" in err


def test_run_line_gives_the_base_pressure_found_from_the_layer(capsys):
    # a real analysis of the sample: the run line names the Cp_b it used and where it came from
    assert cli.main(["analyse", SAMPLE, "--base-from", "body"]) == 0
    run = next(line for line in capsys.readouterr().out.splitlines() if line.startswith("Run:"))
    found = re.search(r"base pressure Cp_b = (-0\.\d{3}) from the boundary layer", run)
    assert found and "body form" in run
    assert -0.30 <= float(found.group(1)) < 0.0  # within the correlation's span (0.30 at most)
    assert cli.main(["analyse", SAMPLE]) == 0
    assert "base pressure Cp_b = -0.25;" in capsys.readouterr().out


def test_compare_names_a_base_model_difference():
    from profilebench import Conditions

    diff = cli.conditions_differences(Conditions(), Conditions(base_model="body"))
    assert diff == ["base pressure from constant vs body"]


def test_compare_names_a_side_relief_difference():
    from profilebench import Conditions

    diff = cli.conditions_differences(Conditions(), Conditions(side_relief=False))
    assert diff == ["underbody side relief on vs off"]


def test_outputs_written(fake, tmp_path, capsys):
    img, csv_, js = tmp_path / "r.png", tmp_path / "s.csv", tmp_path / "r.json"
    assert (
        cli.main(["analyse", SAMPLE, "--image", str(img), "--csv", str(csv_), "--json", str(js)])
        == 0
    )
    assert img.stat().st_size > 0
    assert len(csv_.read_text().splitlines()) == N + 1  # header + one row per station
    assert json.loads(js.read_text())["caution"] == CAUTION


def test_failed_analysis_exits_1(monkeypatch, capsys):
    monkeypatch.setattr(
        cli,
        "_analyse",
        lambda p, c, table=None: Analysis(
            AnalysisStatus.INVISCID_FAILED, "singular panel system", p, c
        ),
    )
    assert cli.main(["analyse", SAMPLE]) == 1
    err = capsys.readouterr().err
    assert "singular panel system" in err and "Traceback" not in err


@pytest.mark.parametrize(
    "args, message",
    [
        (["analyse", "no_such_file.json"], "no project file"),
        (["analyse", SAMPLE, "--image", "out.bmp"], "unknown extension '.bmp'"),
        (["analyse", SAMPLE, "--csv", "out.txt"], "must end in .csv"),
        (["analyse", SAMPLE, "--speed", "-10"], "speed"),
        (["analyse", SAMPLE, "--transition", "sometimes"], "--transition"),
    ],
)
def test_bad_input_exits_2(fake, capsys, args, message):
    assert cli.main(args) == 2
    err = capsys.readouterr().err
    assert message in err and "Traceback" not in err


@pytest.mark.parametrize("content", ["{not json", '{"format": "something-else", "version": 1}', ""])
def test_corrupt_project_exits_2(fake, tmp_path, capsys, content):
    bad = tmp_path / "bad.json"
    bad.write_text(content)
    assert cli.main(["analyse", str(bad)]) == 2
    assert capsys.readouterr().err.startswith("profilebench: error:")


def test_usage_error_exits_2(capsys):
    assert cli.main(["analyse"]) == 2
    assert "usage" in capsys.readouterr().err


def test_samples_lists_every_sample(capsys):
    assert cli.main(["samples"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert [l.split()[0] for l in lines] == [str(p) for p in sample_paths()]
    assert sum("(default)" in l for l in lines) == 1


def test_compare_warns_when_cd_falls_but_force_rises(monkeypatch, capsys):
    base = fake_analysis()
    d = base.drag
    # the variant: 10% lower Cd on a 25% larger frontal area -> CdA and force rise
    area = 1.25 * d.reference_area
    cd = 0.9 * d.cd
    variant_drag = dataclasses.replace(
        d,
        cd=cd,
        reference_area=area,
        cda=cd * area,
        force=d.force / d.cda * cd * area,
        power=d.power / d.cda * cd * area,
    )
    variant = dataclasses.replace(base, drag=variant_drag)
    calls = iter([base, variant])
    monkeypatch.setattr(cli, "_analyse", lambda p, c, table=None: next(calls))
    assert cli.main(["compare", SAMPLE, SAMPLE]) == 0
    out = capsys.readouterr().out
    rows = summary_rows(out)
    assert float(rows["delta Cd"]) == pytest.approx(cd - d.cd, abs=5e-5)
    assert float(rows["delta Cd (%)"]) == pytest.approx(-10.0, abs=5e-3)
    assert float(rows["delta CdA"]) == pytest.approx(cd * area - d.cda, abs=5e-5)
    assert "WARNING: Cd falls" in out
    assert CAUTION in out


def test_compare_with_failed_variant_exits_1(monkeypatch, capsys):
    base = fake_analysis()
    failed = Analysis(
        AnalysisStatus.BOUNDARY_LAYER_FAILED, "march stalled", base.profile, base.conditions
    )
    calls = iter([base, failed])
    monkeypatch.setattr(cli, "_analyse", lambda p, c, table=None: next(calls))
    assert cli.main(["compare", SAMPLE, SAMPLE]) == 1
    assert "march stalled" in capsys.readouterr().err


def test_corners_lists_each_corner(fake, capsys):
    base, _ = fake
    assert cli.main(["corners", SAMPLE]) == 0
    rows = summary_rows(capsys.readouterr().out)
    for c in base.corners:
        assert float(rows[c.label]) == pytest.approx(c.radius * 1000, abs=0.05)


def test_no_subcommand_without_editor_exits_2(monkeypatch, capsys):
    monkeypatch.setitem(sys.modules, "profilebench.gui.app", None)  # import fails
    assert cli.main([]) == 2
    assert "desktop editor is not available" in capsys.readouterr().err


def test_no_subcommand_starts_editor(monkeypatch):
    import types

    started = []
    mod = types.ModuleType("profilebench.gui.app")
    mod.run = lambda argv=None: started.append(argv) or 0
    monkeypatch.setitem(sys.modules, "profilebench.gui.app", mod)
    assert cli.main([]) == 0
    assert cli.main([SAMPLE]) == 0
    # run() takes a sys.argv-style list: the program name, then the project file if any
    assert started == [["profilebench"], ["profilebench", SAMPLE]]


def _search(status, radius, message):
    from profilebench.assess.results import RadiusSearch

    return lambda profile, cond, node: RadiusSearch(
        node, status, radius, 0.4, (0.0, 0.4), 1e-3, 7, message
    )


def test_corners_smallest_prints_each_convex_corner(fake, monkeypatch, capsys):
    import profilebench.assess.radius_search as radius_search
    from profilebench.assess.results import SearchStatus

    base, _ = fake
    monkeypatch.setattr(
        radius_search, "cached_radius_search", _search(SearchStatus.FOUND, 0.123, "found it")
    )
    assert cli.main(["corners", SAMPLE, "--smallest"]) == 0
    out = capsys.readouterr().out
    section = out.split("Smallest radius")[1]
    rows = [l for l in section.splitlines() if "found it" in l]
    assert len(rows) == sum(c.convex for c in base.corners)
    assert all("123.0" in r for r in rows)  # 0.123 m shown in mm


def test_corners_smallest_failure_exits_1(fake, monkeypatch, capsys):
    import profilebench.assess.radius_search as radius_search
    from profilebench.assess.results import SearchStatus

    monkeypatch.setattr(
        radius_search,
        "cached_radius_search",
        _search(SearchStatus.FAILED, None, "flow could not be solved"),
    )
    assert cli.main(["corners", SAMPLE, "--smallest"]) == 1
    assert "flow could not be solved" in capsys.readouterr().err
