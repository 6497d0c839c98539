"""profilebench variants: adding variants to a project (atomic, version 2), the ranking table,
its CSV and review page, exit codes, and bad input refused with nothing written."""

import csv
import dataclasses
import json
import shutil

import pytest

import profilebench.cli as cli
from profilebench.geometry.outline import canonical_outline
from profilebench.geometry.profile import Node, Profile
from profilebench.io import Project, load_project, sample_paths, save_project
from profilebench.io.points import write_points_csv
from profilebench.studies import PointCache, rank_project

BODY = next(p for p in sample_paths() if p.name == "kestrel_test_body.json")
FAST = ["--panels", "150", "--workers", "1"]


# each test starts with an empty point cache (the process-wide one the CLI uses)
pytestmark = pytest.mark.usefixtures("fresh_point_cache")


def _run(capsys, *argv):
    code = cli.main(["variants", *map(str, argv)])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def _variant_file(tmp_path, name, edit):
    """A project file whose profile is the test body's with ``edit`` applied."""
    project = load_project(BODY)
    path = tmp_path / f"{name}.json"
    save_project(dataclasses.replace(project, profile=edit(project.profile)), path)
    return path


def _taller(profile, dy=0.15):
    # the roof raised by dy (m): a larger frontal height, so a larger area (width x h)
    for i in (2, 3):
        n = profile.nodes[i]
        profile = profile.moved(i, n.x, n.y + dy)
    return profile


@pytest.fixture
def project(tmp_path, capsys):
    """The test body sample copied, with three variants added through the command line."""
    path = tmp_path / "body.json"
    shutil.copyfile(BODY, path)
    sources = {
        "as drawn": BODY,
        "round front": _variant_file(tmp_path, "round", lambda p: p.with_radius(3, 0.2)),
        "tall round": _variant_file(
            tmp_path, "tall", lambda p: _taller(p.with_radius(3, 0.25).with_radius(0, 0.15))
        ),
    }
    for name, source in sources.items():
        code, out, err = _run(capsys, path, "--add", name, source, "--note", f"from {source.name}")
        assert code == 0, err
    return path


def test_add_writes_version_2_with_the_variants_in_order(project):
    data = json.loads(project.read_text())
    assert data["version"] == 2
    assert [v["name"] for v in data["variants"]] == ["as drawn", "round front", "tall round"]
    loaded = load_project(project)
    assert loaded.variants[0].profile == load_project(BODY).profile
    assert loaded.variants[1].profile.nodes[3].radius == 0.2
    assert loaded.variants[2].note == "from tall.json"
    # the rest of the project is as it was
    assert loaded.profile == load_project(BODY).profile
    assert loaded.conditions == load_project(BODY).conditions


def test_add_from_a_csv_outline_fits_it(tmp_path, project, capsys):
    outline = canonical_outline(load_project(BODY).profile.with_radius(3, 0.15)).sample(200)
    points = write_points_csv(tmp_path / "outline.csv", outline, units="mm")
    code, out, err = _run(capsys, project, "--add", "from points", points)
    assert code == 0, err
    assert "variant 'from points' added" in out and "4. from points" in out
    fitted = load_project(project).variant("from points").profile
    # the fit's front upper corner is the 150 mm radius the points were sampled from (within
    # the fit's 5 mm default tolerance)
    radii = sorted(n.radius for n in fitted.nodes if not n.smooth)
    assert radii[-1] == pytest.approx(0.15, abs=0.005)


def test_the_ranking_table_csv_and_page(tmp_path, project, capsys):
    out_csv, out_png = tmp_path / "rank.csv", tmp_path / "rank.png"
    code, out, err = _run(capsys, project, *FAST, "--csv", out_csv, "--image", out_png)
    assert code == 0, err
    assert "ranked by drag force" in out and "Screening estimate" in out
    # the printed and written ranking is the library's on the same project and conditions
    p = load_project(project)
    expected = rank_project(
        p, conditions=p.conditions.replace(panels=150), workers=1, cache=PointCache()
    )
    with open(out_csv, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert [r["variant"] for r in rows] == [r.name for r in expected.rows]
    assert [float(r["force_N"]) for r in rows] == pytest.approx([r.force for r in expected.rows])
    forces = [float(r["force_N"]) for r in rows]
    assert forces == sorted(forces)
    assert [r["baseline"] for r in rows].count("yes") == 1
    assert rows[[r["variant"] for r in rows].index("as drawn")]["baseline"] == "yes"
    for r in expected.rows:
        assert f"{r.force:.1f}" in out
    assert "Corner verdicts" in out and "front upper edge" in out
    # a PNG file: its signature (PNG specification, section 5.2)
    assert out_png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _ranked_names(path):
    with open(path, newline="") as fh:
        return [r["variant"] for r in csv.DictReader(fh)]


def test_the_issue_case_the_taller_variant_with_the_lower_cd(tmp_path, project, capsys):
    p = load_project(project)
    table = rank_project(
        p, conditions=p.conditions.replace(panels=150), workers=1, cache=PointCache()
    )
    tall, base = table.row("tall round"), table.row("as drawn")
    # what this test needs of the pair, computed rather than assumed: the taller variant has
    # the larger frontal height, so the larger area (width x h), the lower Cd and yet the
    # higher drag force
    assert tall.reference_height > base.reference_height
    assert tall.cd < base.cd and tall.force > base.force
    by_force, by_cd = tmp_path / "force.csv", tmp_path / "cd.csv"
    assert _run(capsys, project, *FAST, "--csv", by_force)[0] == 0
    code, out, _ = _run(capsys, project, *FAST, "--by", "cd", "--csv", by_cd)
    assert code == 0 and "ranked by Cd, as asked" in out
    force_order, cd_order = _ranked_names(by_force), _ranked_names(by_cd)
    assert force_order.index("tall round") > force_order.index("as drawn")
    assert cd_order.index("tall round") < cd_order.index("as drawn")
    assert "the larger frontal area outweighs the lower Cd" in out


def test_another_baseline_for_one_ranking(project, capsys, tmp_path):
    out_csv = tmp_path / "r.csv"
    code, out, err = _run(capsys, project, *FAST, "--baseline", "ROUND front", "--csv", out_csv)
    assert code == 0, err
    with open(out_csv, newline="") as fh:
        rows = {r["variant"]: r for r in csv.DictReader(fh)}
    assert rows["round front"]["baseline"] == "yes"
    assert float(rows["round front"]["delta_force_N"]) == 0.0
    # the file's baseline is unchanged (none: the first)
    assert load_project(project).baseline_variant is None


def test_a_failed_variant_exits_1_with_the_table_and_files_written(tmp_path, project, capsys):
    p = load_project(project)
    crossed = Profile((Node(0.0, 0.2), Node(2.0, 1.0), Node(2.0, 0.2), Node(0.0, 1.0)))
    from profilebench.io import Variant

    save_project(dataclasses.replace(p, variants=p.variants + (Variant("x", crossed),)), project)
    out_csv = tmp_path / "r.csv"
    code, out, err = _run(capsys, project, *FAST, "--csv", out_csv)
    assert code == 1
    assert "1 of 4 variants did not succeed" in err
    assert "x: invalid geometry" in out
    with open(out_csv, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert rows[-1]["variant"] == "x" and rows[-1]["status"] == "invalid geometry"
    assert rows[-1]["cd"] == "" and rows[-1]["rank"] == ""


def test_a_project_without_variants_is_bad_input(capsys):
    code, _, err = _run(capsys, BODY, *FAST)
    assert code == 2
    assert "holds no variants" in err and "--add NAME FILE" in err


@pytest.mark.parametrize(
    "args, words",
    [
        (["--add", "As drawn ", "{BODY}"], "names must differ"),
        (["--add", "  ", "{BODY}"], "empty"),
        (["--add", "new", "{CROSSED}"], "not a valid outline"),
        (["--add", "new", "{BODY}", "--csv", "x.csv"], "--csv in a second call"),
        (["--add", "new", "{BODY}", "--speed", "90"], "--speed in a second call"),
        (["--add", "new", "{BODY}", "--no-ground"], "--no-ground in a second call"),
        (["--add", "new", "{BODY}", "--simplify", "2"], "not one (nothing was written)"),
        (["--add", "new", "{MISSING}"], "missing.json"),
        (["--baseline", "nobody"], "no variant named 'nobody'"),
        (["--note", "n"], "--note goes with --add"),
        (["--csv", "x.txt"], "must end in .csv"),
        (["--image", "x.gif"], ".gif"),
        (["--workers", "0"], "at least 1"),
    ],
    ids=[
        "duplicate name",
        "empty name",
        "invalid outline",
        "add and csv",
        "add and speed",
        "add and no ground",
        "simplify a project",
        "missing file",
        "unknown baseline",
        "note alone",
        "csv name",
        "image type",
        "workers",
    ],
)
def test_bad_input_exits_2_and_leaves_the_project_as_it_was(project, tmp_path, capsys, args, words):
    crossed = tmp_path / "crossed.json"
    save_project(
        Project(
            Profile((Node(0.0, 0.2), Node(2.0, 1.0), Node(2.0, 0.2), Node(0.0, 1.0))),
            load_project(BODY).conditions,
        ),
        crossed,
    )
    places = {"{BODY}": BODY, "{CROSSED}": crossed, "{MISSING}": tmp_path / "missing.json"}
    args = [str(places.get(a, a)) for a in args]
    before = project.read_bytes()
    code, out, err = _run(capsys, project, *([] if "--add" in args else FAST), *args)
    assert code == 2, out + err
    assert words in err
    assert "Traceback" not in err
    assert project.read_bytes() == before


def test_a_csv_outline_is_not_a_project_to_keep_variants_in(tmp_path, capsys):
    points = write_points_csv(tmp_path / "o.csv", [(0, 0.1), (2, 0.1), (2, 0.6), (0, 0.6)])
    code, _, err = _run(capsys, points, "--add", "a", BODY)
    assert code == 2 and "kept in a project file (.json)" in err
