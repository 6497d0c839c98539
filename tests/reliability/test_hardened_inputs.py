"""Every way in refuses bad data with a message of the project's own error type, never a
traceback: huge numbers, text no file or terminal can hold, output paths that cannot be written
or would destroy an input, closed pipes and Ctrl-C, devices and pipes given as tables, files of
absurd node counts."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

import profilebench.cli as cli
import profilebench.io.project as project_module
from profilebench import Conditions, Node, load_project
from profilebench.assess.tables import MAX_TABLE_BYTES, load_table
from profilebench.cli import main
from profilebench.errors import ConditionsError, ProfileBenchError, ProjectFileError, TableError
from profilebench.io import MAX_PROJECT_BYTES, import_points_csv
from profilebench.io.project import MAX_NODES
from profilebench.io.samples import default_sample_path

from reliability_helpers import write_json

PANELS = "60"  # a quick analysis; these tests are about the ways in, not the numbers


def _no_traceback(capsys):
    err = capsys.readouterr().err
    assert "Traceback" not in err
    return err


# --- numbers no field can use ---------------------------------------------------------------


def _with_text_number(tmp_path, sample_dict, where, digits):
    """The sample with one field replaced by a whole number of ``digits`` digits (as text: Python
    itself refuses to build an int of over 4300 digits from text, Python docs, "Integer string
    conversion length limitation")."""
    d = sample_dict
    *keys, last = where
    for k in keys:
        d = d[k]
    d[last] = 123456.5
    path = write_json(tmp_path, "p.json", sample_dict)
    path.write_text(path.read_text().replace("123456.5", "9" * digits), encoding="utf-8")
    return path


@pytest.mark.parametrize(
    "where, digits, named",
    [
        (("profile", "nodes", 0, "x"), 5000, "profile.nodes[0].x"),
        (("notes",), 5000, "notes"),
        (("conditions", "speed"), 400, "conditions.speed"),
        (("conditions", "transition"), 400, "conditions.transition"),
        (("profile", "trailing_edge"), 400, "profile.trailing_edge"),
    ],
    ids=["node-x-5000", "notes-5000", "speed-400", "transition-400", "trailing-edge-400"],
)
def test_a_number_of_hundreds_of_digits_is_refused_by_field(
    tmp_path, sample_dict, where, digits, named, capsys
):
    path = _with_text_number(tmp_path, sample_dict, where, digits)
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert info.value.path == named and f"{digits} digits" in str(info.value)
    assert main(["analyse", str(path), "--panels", PANELS]) == cli.EXIT_BAD_INPUT
    err = _no_traceback(capsys)
    assert named in err and "9" * 30 not in err  # the number is not echoed in full


@pytest.mark.parametrize(
    "where, value, named",
    [
        (("conditions", "temperature_offset"), 1e308, "temperature_offset"),
        (("profile", "nodes", 0, "x"), 1e308, "node x"),
        (("profile", "nodes", 2, "radius"), 1e308, "node radius"),
        (("conditions", "frontal_area"), 1e308, "frontal_area"),
        (("conditions", "width"), 1e308, "width"),
    ],
    ids=["temperature-offset", "node-x", "radius", "frontal-area", "width"],
)
def test_a_finite_but_absurd_value_is_refused_naming_its_field(
    tmp_path, sample_dict, where, value, named, capsys
):
    d = sample_dict
    *keys, last = where
    for k in keys:
        d = d[k]
    d[last] = value
    path = write_json(tmp_path, "p.json", sample_dict)
    with pytest.raises(ProfileBenchError) as info:
        load_project(path)
    assert named in str(info.value)
    assert main(["analyse", str(path), "--panels", PANELS]) == cli.EXIT_BAD_INPUT
    assert named in _no_traceback(capsys)


def test_hottest_air_is_bounded_in_the_api():
    # ISO 2533 sea-level temperature 288.15 K: +211.85 K is the 500 K bound, +1e308 K is absurd
    Conditions(temperature_offset=211.0)
    with pytest.raises(ConditionsError, match="temperature_offset"):
        Conditions(temperature_offset=1e308)


def test_a_csv_point_beyond_any_vehicle_is_refused_with_its_line(tmp_path, capsys):
    path = tmp_path / "outline.csv"
    path.write_text("x,y\n0,0.2\n1e308,0.2\n2,1.2\n0,1.2\n", encoding="utf-8")
    with pytest.raises(ProjectFileError, match="line 3"):
        import_points_csv(path)
    assert main(["analyse", str(path), "--panels", PANELS]) == cli.EXIT_BAD_INPUT
    assert "line 3" in _no_traceback(capsys)


def test_a_long_csv_cell_is_not_echoed_in_full(tmp_path):
    path = tmp_path / "outline.csv"
    path.write_text("x,y\n0,0.2\n" + "9" * 400 + "z,0.2\n2,1.2\n0,1.2\n", encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        import_points_csv(path)
    assert "line 3" in str(info.value) and "9" * 100 not in str(info.value)


@pytest.mark.parametrize("option", ["--panels", "--speed"])
def test_a_command_line_number_that_no_field_can_use(option, capsys):
    value = "9" * 400 if option == "--panels" else "1e400"  # 1e400 reads as inf (IEEE 754)
    code = main(["analyse", str(default_sample_path()), option, value])
    assert code == cli.EXIT_BAD_INPUT
    err = _no_traceback(capsys)
    assert option in err and "9" * 30 not in err


# --- text no file or terminal can hold --------------------------------------------------------


@pytest.mark.parametrize(
    "where", [("profile", "nodes", 0, "label"), ("profile", "name"), ("notes",)]
)
def test_a_lone_surrogate_is_refused_naming_the_field(tmp_path, sample_dict, where, capsys):
    d = sample_dict
    *keys, last = where
    for k in keys:
        d = d[k]
    d[last] = "front \ud800 corner"  # json.dumps writes it as the escape \ud800
    path = write_json(tmp_path, "p.json", sample_dict)
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert info.value.path == ".".join(str(k) for k in where).replace(".0.", "[0].")
    assert main(["analyse", str(path), "--panels", PANELS]) == cli.EXIT_BAD_INPUT
    assert "surrogate" in _no_traceback(capsys)


def test_terminal_escapes_in_labels_are_printed_as_text(tmp_path, sample_dict, capsys):
    sample_dict["profile"]["name"] = "\x1b[2J\x1b[31mwiped"
    for node in sample_dict["profile"]["nodes"]:
        if node.get("label"):
            node["label"] = "\x1b]0;owned\x07" + node["label"]
    path = write_json(tmp_path, "p.json", sample_dict)
    assert main(["analyse", str(path), "--panels", PANELS]) == cli.EXIT_OK
    out = capsys.readouterr().out
    # ECMA-48: ESC (0x1b), BEL (0x07) start and end terminal control sequences
    assert "\x1b" not in out and "\x07" not in out
    assert "\\x1b[2J\\x1b[31mwiped" in out and "\\x1b]0;owned\\x07" in out


# --- output paths -----------------------------------------------------------------------------


def _outputs_cases(tmp_path):
    (tmp_path / "a_file").write_text("not a folder")
    return {
        "file-as-folder": str(tmp_path / "a_file" / "out.{ext}"),
        "proc": "/proc/profilebench-out.{ext}",  # the kernel refuses new files there
        "name-300": str(tmp_path / ("n" * 296 + ".{ext}")),  # over the 255-byte name limit
        "empty": "",
    }


@pytest.mark.parametrize("case", ["file-as-folder", "proc", "name-300", "empty"])
@pytest.mark.parametrize("option, ext", [("--json", "json"), ("--csv", "csv"), ("--image", "png")])
def test_an_output_that_cannot_be_written_is_refused_before_any_work(
    tmp_path, case, option, ext, monkeypatch, capsys
):
    target = _outputs_cases(tmp_path)[case].format(ext=ext)
    analysed = []
    monkeypatch.setattr(cli, "_analyse", lambda *a, **k: analysed.append(a))
    code = main(["analyse", str(default_sample_path()), option, target])
    assert code == cli.EXIT_BAD_INPUT
    err = _no_traceback(capsys)
    assert option in err or "cannot" in err
    assert not analysed  # refused before the analysis


@pytest.mark.parametrize("option", ["--json", "--csv"])
@pytest.mark.parametrize("how", ["same", "symlink", "hardlink"])
def test_an_output_that_is_an_input_is_refused(tmp_path, option, how, capsys):
    ext = option[2:]
    project = tmp_path / f"in.{ext}"
    if ext == "csv":  # a CSV outline is an input too: the sample's nodes as points
        nodes = load_project(default_sample_path()).profile.nodes
        project.write_text("x,y\n" + "".join(f"{n.x},{n.y}\n" for n in nodes), encoding="utf-8")
    else:
        project.write_bytes(Path(default_sample_path()).read_bytes())
    before = project.read_bytes()
    out = tmp_path / f"out.{ext}"
    if how == "same":
        out = project
    elif how == "symlink":
        out.symlink_to(project)
    else:
        os.link(project, out)
    code = main(["analyse", str(project), option, str(out), "--panels", PANELS])
    assert code == cli.EXIT_BAD_INPUT
    assert "input" in _no_traceback(capsys)
    assert project.read_bytes() == before


def test_an_output_that_is_the_table_is_refused(tmp_path, capsys):
    table = tmp_path / "t.json"
    table.write_text("{}")
    code = main(
        ["analyse", str(default_sample_path()), "--table", str(table), "--json", str(table)]
    )
    assert code == cli.EXIT_BAD_INPUT
    assert "input" in _no_traceback(capsys) and table.read_text() == "{}"


# --- a closed pipe and Ctrl-C -----------------------------------------------------------------


def test_a_reader_that_stops_early_cuts_only_the_printed_text(tmp_path):
    out = tmp_path / "r.json"
    proc = subprocess.Popen(
        [
            sys.executable,
            "-m",
            "profilebench",
            "analyse",
            str(default_sample_path()),
            "--panels",
            PANELS,
            "--json",
            str(out),
        ],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    )
    proc.stdout.close()  # as `| head -0` does: every write to stdout meets EPIPE
    _, err = proc.communicate(timeout=120)
    assert b"Traceback" not in err and b"BrokenPipe" not in err, err.decode()
    assert proc.returncode == cli.EXIT_OK
    assert json.loads(out.read_text())["summary"]["success"] is True


def test_ctrl_c_prints_one_line_and_exits_130(monkeypatch, capsys):
    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(cli, "_analyse", interrupted)
    try:
        code = main(["analyse", str(default_sample_path())])
    except KeyboardInterrupt:  # caught here, or pytest would take it as the user's Ctrl-C
        pytest.fail("KeyboardInterrupt escaped main()")
    assert code == 130  # 128 + SIGINT (2), as POSIX shells report it
    err = _no_traceback(capsys)
    assert "interrupted" in err and len(err.strip().splitlines()) == 1


# --- tables: bounded reading ------------------------------------------------------------------


@pytest.mark.parametrize("device", ["/dev/zero", "/dev/urandom"])
def test_a_device_as_table_is_refused_without_reading(device):
    t0 = time.perf_counter()
    with pytest.raises(TableError, match="not a regular file"):
        load_table(device)
    assert time.perf_counter() - t0 < 1.0


def test_a_pipe_as_table_is_refused_without_waiting(tmp_path):
    fifo = tmp_path / "table.csv"
    os.mkfifo(fifo)
    code = (
        "import sys\nfrom profilebench.assess.tables import load_table\n"
        "try:\n    load_table(sys.argv[1])\nexcept Exception as e:\n"
        "    print(type(e).__name__, e)\n"
    )
    # a child process, so that a reader that waits for a writer cannot hang the suite
    done = subprocess.run(
        [sys.executable, "-c", code, str(fifo)], capture_output=True, text=True, timeout=60
    )
    assert done.stdout.startswith("TableError") and "not a regular file" in done.stdout


def test_an_oversized_table_is_refused_before_reading(tmp_path):
    path = tmp_path / "t.csv"
    with open(path, "wb") as fh:  # sparse: no disk used
        fh.truncate(MAX_TABLE_BYTES + 1)
    with pytest.raises(TableError, match="limit"):
        load_table(path)


# --- node counts and links --------------------------------------------------------------------


def _circle_nodes(n):
    return [
        {"x": 1.0 + math.cos(2 * math.pi * k / n), "y": 1.5 + math.sin(2 * math.pi * k / n)}
        for k in range(n)
    ]


def test_one_node_over_the_limit_is_refused_before_any_node_is_built(
    tmp_path, sample_dict, monkeypatch
):
    sample_dict["profile"]["nodes"] = _circle_nodes(MAX_NODES + 1)
    sample_dict["profile"]["trailing_edge"] = None
    path = write_json(tmp_path, "p.json", sample_dict)
    built = []
    real = project_module._node_from_dict
    monkeypatch.setattr(project_module, "_node_from_dict", lambda *a: built.append(1) or real(*a))
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(MAX_NODES) in str(info.value) and not built


def test_a_million_nodes_are_refused_quickly(tmp_path, sample_dict):
    sample_dict["profile"]["nodes"] = []
    text = json.dumps(sample_dict).replace(
        '"nodes": []', '"nodes": [' + ",".join(['{"x":1.5,"y":0.5}'] * 10**6) + "]"
    )
    path = tmp_path / "p.json"
    path.write_text(text, encoding="utf-8")
    assert path.stat().st_size < MAX_PROJECT_BYTES  # under the size limit
    t0 = time.perf_counter()
    with pytest.raises(ProjectFileError, match="JSON objects"):
        load_project(path)
    assert time.perf_counter() - t0 < 5.0  # was 100 s before the limit


@pytest.mark.parametrize("kind", ["loop", "dangling"])
def test_a_broken_link_says_what_it_is(tmp_path, kind):
    path = tmp_path / "p.json"
    if kind == "loop":
        other = tmp_path / "q.json"
        path.symlink_to(other)
        other.symlink_to(path)
    else:
        path.symlink_to(tmp_path / "gone.json")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    message = str(info.value)
    assert "no project file" not in message
    assert ("symbolic links" in message) if kind == "loop" else ("gone.json" in message)


@pytest.mark.parametrize(
    "make",
    [
        lambda: Conditions(speed=10**400),
        lambda: Conditions(transition=10**400),
        lambda: Conditions(width=10**400),
        lambda: Conditions(panels=10**400),
        lambda: Node(10**400, 0.5),
        lambda: Node(0.5, -(10**400)),
    ],
    ids=["speed", "transition", "width", "panels", "node-x", "node-y"],
)
def test_a_python_int_beyond_any_float_is_refused_in_the_api(make):
    # float(10**400) raises OverflowError (IEEE 754 doubles end near 1.8e308)
    with pytest.raises(ProfileBenchError) as info:
        make()
    assert "0" * 100 not in str(info.value)


def test_an_editor_field_does_not_echo_a_number_of_thousands_of_digits():
    from profilebench.editor.fields import parse_number

    with pytest.raises(ProfileBenchError) as info:
        parse_number("9" * 5000, "speed", "km/h")
    assert "speed" in str(info.value) and "9" * 100 not in str(info.value)


def test_import_checks_its_project_file_before_fitting(tmp_path, monkeypatch, capsys):
    outline = tmp_path / "outline.csv"
    outline.write_text("x,y\n0,0.2\n2,0.2\n2,1.2\n0,1.2\n", encoding="utf-8")
    fitted = []
    monkeypatch.setattr(cli, "_import_csv", lambda *a, **k: fitted.append(a))
    code = main(["import", str(outline), "/proc/profilebench-p.json"])  # no new files in /proc
    assert code == cli.EXIT_BAD_INPUT and "/proc" in _no_traceback(capsys)
    assert not fitted  # refused before the (slow) fit


def test_an_underlay_path_through_a_loop_of_links_is_refused(tmp_path):
    from profilebench.io import Project, Underlay, resolve_underlay

    (tmp_path / "a.png").symlink_to(tmp_path / "b.png")
    (tmp_path / "b.png").symlink_to(tmp_path / "a.png")
    base = load_project(default_sample_path())
    project = Project(
        base.profile,
        base.conditions,
        underlay=Underlay("a.png", ((0, 0), (100, 0)), ((0.0, 0.0), (1.0, 0.0))),
    )
    with pytest.raises(ProjectFileError) as info:  # Python < 3.13 raised RuntimeError here
        resolve_underlay(project, tmp_path / "p.json")
    assert info.value.path == "underlay.path"


@pytest.mark.parametrize("option, value", [("--panels", "9" * 5000), ("--speed", "x" * 500)])
def test_a_usage_error_does_not_echo_a_huge_value(option, value, capsys):
    assert main(["analyse", str(default_sample_path()), option, value]) == cli.EXIT_BAD_INPUT
    err = _no_traceback(capsys)
    assert option in err and value[:100] not in err


def test_a_point_file_too_dense_to_fit_is_refused_before_the_fit(tmp_path):
    from profilebench.io.points import MAX_POINTS

    n = MAX_POINTS + 1
    rows = "".join(
        f"{2 + 2 * math.cos(2 * math.pi * k / n):.6f},"
        f"{0.9 + 0.7 * math.sin(2 * math.pi * k / n):.6f}\n"
        for k in range(n)
    )
    path = tmp_path / "dense.csv"
    path.write_text("x,y\n" + rows, encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        import_points_csv(path)
    assert str(MAX_POINTS) in str(info.value) and "thin" in str(info.value)
