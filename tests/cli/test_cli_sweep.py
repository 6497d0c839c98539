"""profilebench sweep: the table, the CSV and the chart of a radius, position and speed sweep
and of a radius x speed grid; exit codes; bad input refused before any work."""

import csv

import pytest

import profilebench.cli as cli
from profilebench.assess.radius_search import SearchCache, cached_radius_search
from profilebench.io.project import load_project
from profilebench.io.samples import sample_paths

BODY = str(next(p for p in sample_paths() if p.name == "kestrel_test_body.json"))
FAST = ["--panels", "150", "--workers", "1"]


# each test starts with an empty point cache (the process-wide one the CLI uses)
pytestmark = pytest.mark.usefixtures("fresh_point_cache")


def _run(capsys, *argv):
    code = cli.main(["sweep", BODY, *argv, *FAST])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_radius_sweep_table_csv_and_image(tmp_path, capsys):
    out_csv, out_png = tmp_path / "s.csv", tmp_path / "s.png"
    code, out, err = _run(
        capsys,
        "--corner",
        "front upper edge",
        "--radius",
        "0:0.2:5",
        "--csv",
        str(out_csv),
        "--image",
        str(out_png),
    )
    assert code == 0, err
    assert "knee at" in out and "smallest attached radius of front upper edge" in out
    with open(out_csv, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert [float(r["radius_m"]) for r in rows] == pytest.approx([0.0, 0.05, 0.1, 0.15, 0.2])
    assert all(r["status"] == "success" for r in rows)
    # the printed smallest attached radius is the solver's own search at these conditions
    project = load_project(BODY)
    cond = project.conditions.replace(panels=150)
    search = cached_radius_search(project.profile, cond, 3, cache=SearchCache())
    assert float(rows[0]["smallest_attached_radius_m"]) == pytest.approx(search.radius)
    assert f"{search.radius * 1e3:.1f} mm" in out
    # a PNG file: its signature (PNG specification, section 5.2)
    assert out_png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_radius_to_max_and_corner_by_node_number(capsys):
    code, out, _ = _run(capsys, "--corner", "3", "--radius", "0.1:max:2")
    assert code == 0
    assert "399.6" in out  # 0.999 of the 400 mm that fit between the corners


def test_position_sweep_reports_a_failed_point_and_exits_1(tmp_path, capsys):
    out_csv, out_png = tmp_path / "p.csv", tmp_path / "p.png"
    code, out, err = _run(
        capsys,
        "--position",
        "rear lower edge:-3:0:3",
        "--corner",
        "front upper edge",
        "--csv",
        str(out_csv),
        "--image",
        str(out_png),
    )
    assert code == cli.EXIT_FAILED
    assert "sweep points did not succeed" in err
    with open(out_csv, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert rows[0]["status"] == "success" and rows[-1]["status"] != "success"
    assert rows[-1]["cd"] == "" and rows[-1]["message"]
    assert "nan" not in out.lower() and "nan" not in out_csv.read_text().lower()
    assert out_png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # written despite the failure


def test_speed_sweep_and_grid(capsys):
    code, out, _ = _run(capsys, "--speeds", "72:144:2")
    assert code == 0 and "speed (km/h)" in out and "144.0" in out
    code, out, _ = _run(
        capsys, "--corner", "front upper edge", "--radius", "0:0.1:3", "--speeds", "72:108:2"
    )
    assert code == 0
    assert "speed 72.0 km/h" in out and "speed 108.0 km/h" in out
    assert "6 points: 6 analysed" in out


@pytest.mark.parametrize(
    "argv, message",
    [
        (["--radius", "0:0.2:5"], "--radius needs --corner"),
        (["--corner", "bonnet", "--radius", "0:0.2:5"], "no corner is called 'bonnet'"),
        (["--corner", "front upper edge", "--radius", "0:0.2"], "give 3 values"),
        (["--corner", "front upper edge", "--radius", "0:9:5"], "largest that fits"),
        (["--corner", "front upper edge", "--radius", "0:x:5"], "'x' is not a number"),
        (["--corner", "front upper edge", "--radius", "0:0.2:1"], "from 2 to 1000"),
        (["--position", "rear lower edge:1:0:3", "--speeds", "72:144:2"], "not both"),
        ([], "give what to sweep"),
        (["--speeds", "72:144:2", "--image", "chart.bmp"], "unknown extension"),
    ],
)
def test_bad_input_exits_2_with_the_reason(argv, message, capsys):
    code, out, err = _run(capsys, *argv)
    assert code == cli.EXIT_BAD_INPUT
    assert message in err


def test_help_documents_the_option_syntax(capsys):
    assert cli.main(["sweep", "--help"]) == 0
    out = capsys.readouterr().out
    for text in ("FIRST:LAST:N", "NODE:DX:DY:N", "'max'", "km/h", "2%"):
        assert text in out
