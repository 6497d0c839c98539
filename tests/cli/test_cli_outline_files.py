"""The command line with CSV outlines (analyse, corners, compare, import) and corners --smallest
on outlines with smooth runs. In-process through main([...])."""

import re

import pytest

from profilebench.cli import EXIT_BAD_INPUT, EXIT_OK, main
from profilebench.io import load_project, sample_paths

# a box van side outline in mm, clockwise, sharp corners except two chamfers (an invented shape)
BOX_MM = [(0, 300), (0, 1500), (300, 1800), (3500, 1800), (4000, 1500), (4000, 300), (0.5, 300)]


def _write_csv(path, points, header="x_mm,y_mm", scale=1.0):
    lines = [header] + [f"{x * scale:.6g},{y * scale:.6g}" for x, y in points[:-1]]
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.fixture
def box_csv(tmp_path):
    return _write_csv(tmp_path / "box.csv", BOX_MM)


def test_analyse_takes_a_csv_outline(box_csv, capsys):
    assert main(["analyse", str(box_csv)]) == EXIT_OK
    out = capsys.readouterr().out
    assert "box" in out and "Cd" in out


def test_the_same_outline_in_metres_gives_the_same_table(box_csv, tmp_path, capsys):
    metres = _write_csv(tmp_path / "box_m.csv", BOX_MM, header="x_m,y_m", scale=1e-3)
    assert main(["analyse", str(box_csv)]) == EXIT_OK
    mm_out = capsys.readouterr().out
    assert main(["analyse", str(metres), "--units", "m"]) == EXIT_OK
    m_out = capsys.readouterr().out

    # the same lines but for the file's name and the time each run was made (a second apart
    # when the fit takes a second)
    def same(text, name):
        return re.sub(r"made \S+ \S+ UTC", "made (time)", text.replace(name, "X")).split("\n")[2:]

    assert same(mm_out, "box.csv") == same(m_out, "box_m.csv")


def test_import_writes_a_project_that_analyses_like_the_csv(box_csv, tmp_path, capsys):
    target = tmp_path / "box.json"
    assert main(["import", str(box_csv), str(target), "--speed", "100"]) == EXIT_OK
    project = load_project(target)
    assert len(project.profile.nodes) == 6
    assert project.conditions.speed == pytest.approx(100 / 3.6)
    # the file is never overwritten
    before = target.read_bytes()
    assert main(["import", str(box_csv), str(target)]) == EXIT_BAD_INPUT
    assert target.read_bytes() == before
    assert "exists" in capsys.readouterr().err


def test_import_refuses_an_outline_below_the_ground_and_writes_nothing(tmp_path, capsys):
    low = _write_csv(
        tmp_path / "low.csv", [(0, -10), (0, 1500), (4000, 1500), (4000, -10), (0, -10)]
    )
    target = tmp_path / "low.json"
    assert main(["import", str(low), str(target)]) == EXIT_BAD_INPUT
    assert not target.exists()
    assert "ground" in capsys.readouterr().err


def test_compare_takes_csv_outlines(box_csv, tmp_path, capsys):
    other = _write_csv(
        tmp_path / "taller.csv", [(x, y * 1.05 if y > 1000 else y) for x, y in BOX_MM]
    )
    assert main(["compare", str(box_csv), str(other)]) == EXIT_OK
    assert "delta Cd" in capsys.readouterr().out


@pytest.mark.parametrize("sample", sorted(p.stem for p in sample_paths()))
def test_corners_smallest_lists_smooth_runs_instead_of_aborting(sample, capsys):
    path = next(p for p in sample_paths() if p.stem == sample)
    assert main(["corners", str(path), "--smallest", "--panels", "120"]) in (EXIT_OK, 1)
    out, err = capsys.readouterr()
    assert "is smooth" not in err
    project = load_project(path)
    smooth_peaks = [n for n in project.profile.nodes if n.smooth]
    if "curvature peak" in out:
        assert "smooth" in out.split("Smallest radius keeping the flow attached")[1]
    assert smooth_peaks or "curvature peak" not in out


@pytest.mark.parametrize(
    "rows, expect",
    [
        (["x_mm,y_mm", "0,300", "4000,300"], "at least 3"),
        (["a,b", "0,300", "0,1500", "4000,1500", "4000,300"], None),
        (["x_mm,y_mm", "0,300", "4000,1500", "4000,300", "0,1500"], "cross"),
        (["x_mm,y_mm", "0,-10", "0,1500", "4000,1500", "4000,-10"], "ground"),
    ],
)
def test_outline_files_that_are_not_outlines_are_refused_with_a_message(
    tmp_path, capsys, rows, expect
):
    path = tmp_path / "bad.csv"
    path.write_text("\n".join(rows) + "\n")
    code = main(["analyse", str(path)])
    err = capsys.readouterr().err
    if expect is None:
        # a two-column header naming no x and y: read as x, y in that order (it raised a
        # TypeError before)
        assert code == EXIT_OK, err
    else:
        assert code == EXIT_BAD_INPUT
        assert expect in err


# the bad outlines the issue lists: each refused by `import` and by `analyse` with exit 2 and a
# message saying what is wrong, and `import` writes nothing
_BAD_OUTLINES = {
    "too few points": (["x_mm,y_mm", "0,300", "4000,300"], [], ["at least 3"]),
    "a header without x and y": (
        ["a,b,c", "0,300,1", "0,1500,1", "4000,1500,1", "4000,300,1"],
        [],
        ["header", "'x'", "'y'"],
    ),
    "mixed units in the header": (
        ["x_mm,y_m", "0,0.3", "0,1.5", "4000,1.5", "4000,0.3"],
        [],
        ["both mm and m"],
    ),
    "units contradicting the header": (
        ["x_mm,y_mm", "0,300", "0,1500", "4000,1500", "4000,300"],
        ["--units", "m"],
        ["units='m'", "'mm'"],
    ),
    # the crossing named by its segments' points and where (the square's diagonals cross at
    # (2000, 900) mm)
    "a self-crossing point list": (
        ["x_mm,y_mm", "0,300", "4000,1500", "4000,300", "0,1500"],
        [],
        ["cross", "point 1 to point 2", "point 3 to point 4", "(2000.0, 900.0) mm"],
    ),
    "an outline below the ground": (
        ["x_mm,y_mm", "0,-10", "0,1500", "4000,1500", "4000,-10"],
        [],
        ["ground", "(0.0, -10.0) mm"],
    ),
}


@pytest.mark.parametrize("command", ["import", "analyse"])
@pytest.mark.parametrize("case", sorted(_BAD_OUTLINES))
def test_each_bad_outline_gets_a_clear_message_and_exit_2(tmp_path, capsys, command, case):
    rows, options, expect = _BAD_OUTLINES[case]
    path = tmp_path / "bad.csv"
    path.write_text("\n".join(rows) + "\n")
    target = tmp_path / "bad.json"
    args = [command, str(path)] + ([str(target)] if command == "import" else ["--panels", "120"])
    assert main(args + options) == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    for words in expect:
        assert words in err, err
    assert "Traceback" not in err
    assert not target.exists()


def test_import_says_which_radii_the_points_leave_open_and_keeps_it_in_the_project(
    tmp_path, capsys
):
    # the courier van sample digitised every 5 mm with 1 mm of noise: its underbody rear fillet
    # (r 50 mm, turning the outline by about 22 degrees) lies about 1 mm off its sharp corner,
    # so the points allow it sharp or twice as large (profilebench.geometry.radius_bounds)
    import numpy as np

    from profilebench.geometry import build_outline

    van = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))
    o = build_outline(van.profile)
    n = int(o.length / 0.005)
    pts = (o.sample(n) + np.random.default_rng(0).normal(0.0, 0.001, (n, 2))) * 1e3
    csv = _write_csv(tmp_path / "van.csv", [tuple(p) for p in pts] + [tuple(pts[0])])
    target = tmp_path / "van.json"
    assert main(["import", str(csv), str(target)]) == EXIT_OK
    out = capsys.readouterr()
    said = out.out + out.err
    assert "Radii the points do not fix" in said
    # the line gives the Cd at both ends of the range: sharp, and the largest radius allowed
    line = next(s for s in said.splitlines() if "(4100, 180) mm" in s)
    assert "fitted sharp" in line and "sharp: Cd" in line and "across the range" in line
    notes = load_project(target).notes
    assert "(4100, 180) mm: fitted sharp, but the points allow any radius up to" in notes
    assert "take its radius from the drawing" in notes
    # analyse on the CSV says the same, and its JSON carries the ranges and the Cd at their ends
    capsys.readouterr()
    js = tmp_path / "van.results.json"
    page = tmp_path / "van.png"
    assert main(["analyse", str(csv), "--json", str(js), "--image", str(page)]) == EXIT_OK
    assert page.stat().st_size > 0  # the page's notes: tests/plotting/test_review_page_content.py
    assert line.split(";")[0] in capsys.readouterr().out
    import json

    rows = json.loads(js.read_text())["open_radii"]
    rear = next(r for r in rows if abs(r["x_m"] - 4.1) < 0.01 and abs(r["y_m"] - 0.18) < 0.01)
    assert rear["fitted_radius_m"] == 0.0 and rear["lowest_radius_m"] == 0.0
    assert rear["highest_radius_m"] > 0.05 and len(rear["ends"]) == 2
    cds = [e["cd"] for e in rear["ends"]]
    assert rear["cd_spread"] == pytest.approx(
        (max(cds + [rear["cd_fitted"]]) - min(cds + [rear["cd_fitted"]])) / rear["cd_fitted"]
    )


def test_compare_of_two_digitised_outlines_warns_when_an_open_radius_outweighs_the_difference(
    tmp_path, capsys
):
    # the courier van and a variant with a 200 mm windscreen header (150 mm in the sample), both
    # digitised (5 mm, 1 mm of noise): the header moves the Cd by about 0.001, the underbody
    # rear radius that the points leave open by about 0.06 (sharp against 110 mm); corners on
    # a CSV lists the open radii too
    import numpy as np

    from profilebench.geometry import build_outline

    van = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))
    header = next(i for i, nd in enumerate(van.profile.nodes) if nd.label == "windscreen header")
    paths = []
    for name, prof, seed in (
        ("base", van.profile, 0),
        ("header", van.profile.with_radius(header, 0.2), 1),
    ):
        o = build_outline(prof)
        n = int(o.length / 0.005)
        pts = (o.sample(n) + np.random.default_rng(seed).normal(0.0, 0.001, (n, 2))) * 1e3
        paths.append(
            _write_csv(tmp_path / f"{name}.csv", [tuple(p) for p in pts] + [tuple(pts[0])])
        )
    conditions = ["--speed", "90", "--width", "1.8"]
    assert main(["compare", str(paths[0]), str(paths[1]), *conditions]) == EXIT_OK
    out = capsys.readouterr().out
    assert "baseline (base):" in out and "variant (header):" in out
    assert out.count("Radii the points do not fix") == 2
    assert "WARNING: the difference in Cd" in out and "take those radii from the drawing" in out
    assert main(["corners", str(paths[0]), *conditions]) == EXIT_OK
    assert "Radii the points do not fix" in capsys.readouterr().out
