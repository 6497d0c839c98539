"""A catalogue of bad input, through the entry points a user meets.

Each case checks that a ProfileBenchError (or a failed Analysis) is what comes back and that its
message names what is wrong *and* says how to fix it (key words of both). The "how to fix" words
are imperative verbs of a remedy (give, use, move, delete, ...): common practice, no source.
"""

from __future__ import annotations

import math
import re

import pytest
import shapely.geometry

import profilebench
from profilebench import Conditions, Node, Profile, analyze, load_project
from profilebench.cli import main
from profilebench.errors import (
    ConditionsError,
    GeometryError,
    InputError,
    ProfileBenchError,
    ProjectFileError,
)
from profilebench.io import MAX_PROJECT_BYTES, read_points_csv

from reliability_helpers import write_json

# words that tell the user what to do (common practice, no source)
FIX_WORDS = (
    r"\b(give|use|move|delete|remove|add|reduce|raise|turn|choose|check|restore|re-save|"
    r"upgrade|fix|set|convert|reorder|pick|keep|lower|increase|must be)\b"
)


def _says(message: str, *what: str) -> None:
    """The message names the problem (every word of ``what``) and a remedy (a FIX_WORDS verb)."""
    low = message.lower()
    for w in what:
        assert w.lower() in low, f"{w!r} not in message: {message}"
    assert re.search(FIX_WORDS, low), f"no remedy in message: {message}"


BOX = [(0.0, 0.2), (2.0, 0.2), (2.0, 1.2), (0.0, 1.2)]  # a 2 m x 1 m box 0.2 m above the ground


def _failed(profile, conditions=None):
    a = analyze(profile, conditions)
    assert not a.success
    assert a.status is profilebench.assess.results.AnalysisStatus.INVALID_GEOMETRY
    assert a.drag is None
    return a.message


# --- outlines -------------------------------------------------------------------------------


def test_self_intersecting_outline():
    pts = [(0.0, 0.2), (2.0, 1.2), (2.0, 0.2), (0.0, 1.2)]  # a bow tie
    # shapely (GEOS) independently finds the polygon invalid, crossing at (1.0, 0.7)
    assert not shapely.geometry.Polygon(pts).is_valid
    msg = _failed(Profile.from_points(pts))
    _says(msg, "crosses itself", "(1000.0, 700.0) mm")


@pytest.mark.parametrize("gap", [0.0, 1e-9, 1e-6], ids=["duplicate", "1 nm apart", "1 um apart"])
def test_duplicate_or_near_coincident_nodes(gap):
    pts = [BOX[0], BOX[1], (BOX[1][0] + gap, BOX[1][1]), BOX[2], BOX[3]]
    msg = _failed(Profile.from_points(pts))
    _says(msg, "node 1", "node 2", "coincide")


@pytest.mark.parametrize("n", [0, 1, 2])
def test_too_few_nodes(n):
    msg = _failed(Profile.from_points(BOX[:n]))
    _says(msg, f"{n} node", "at least 3")


@pytest.mark.parametrize(
    "pts",
    [
        [(0.0, 0.2), (1.0, 0.2), (2.0, 0.2)],  # collinear
        [(0.0, 0.2), (1.0, 0.7), (2.0, 1.2), (3.0, 1.7)],  # collinear, sloping
    ],
    ids=["flat", "sloping"],
)
def test_zero_area_collinear_outline(pts):
    assert shapely.geometry.Polygon(pts).area == 0.0  # shapely: the polygon encloses no area
    msg = _failed(Profile.from_points(pts))
    _says(msg, "no area", "collinear")


def test_radius_too_large_for_its_neighbours():
    # Fillet between two lines at 90 degrees: setback r tan(theta/2) = r (standard fillet
    # geometry). The 1 m side between nodes 1 and 2 keeps 1.0 - 0.8 = 0.2 m for node 1.
    prof = Profile.from_points(BOX, radii=[0.0, 0.8, 0.8, 0.0])
    msg = _failed(prof)
    _says(msg, "too large", "node 1", "largest radius that fits there is 200.0 mm")


def test_radius_too_large_raises_when_built_directly():
    with pytest.raises(GeometryError) as info:
        profilebench.geometry.rounded_box(2.0, 1.0, radius=0.8, clearance=0.2)
    _says(str(info.value), "too large", "largest radius that fits")
    # 1 m side shared by two 0.8 m radii: 1.0 - 0.8 = 0.2 m is left (setback r tan 45 deg = r)
    assert info.value.largest == pytest.approx(0.2, abs=1e-9)


def test_body_below_the_ground():
    prof = Profile.from_points([(x, y - 0.3) for x, y in BOX])
    msg = _failed(prof)
    _says(msg, "below the ground", "100.0 mm")
    # turned off, the ground no longer applies and the same outline analyses
    assert analyze(prof, Conditions(ground=False, panels=60)).success


def test_body_touching_the_ground():
    prof = Profile.from_points([(x, y - 0.2) for x, y in BOX])
    msg = _failed(prof)
    _says(msg, "touches")
    assert "-0.0" not in msg


@pytest.mark.parametrize("field", ["x", "y", "radius"])
@pytest.mark.parametrize("value", [math.nan, math.inf, -math.inf])
def test_non_finite_node_values(field, value):
    kwargs = {"x": 1.0, "y": 1.0, "radius": 0.0, field: value}
    with pytest.raises(GeometryError) as info:
        Node(**kwargs)
    _says(str(info.value), f"node {field}", "finite")


# --- conditions -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "kwargs, what",
    [
        (dict(speed=0.0), "speed"),
        (dict(speed=-10.0), "speed"),
        (dict(speed=math.nan), "speed"),
        (dict(speed=math.inf), "speed"),
        # 150 m/s is about Mach 0.44 at sea level (ISO 2533 a0 = 340.294 m/s): beyond incompressible
        (dict(speed=200.0), "speed"),
        (dict(density=1.225, kinematic_viscosity=0.0), "kinematic_viscosity"),
        (dict(density=1.225, kinematic_viscosity=-1.5e-5), "kinematic_viscosity"),
        (dict(density=1.225, kinematic_viscosity=math.nan), "kinematic_viscosity"),
        (dict(density=0.0, kinematic_viscosity=1.5e-5), "density"),
        (dict(density=1.225), "kinematic_viscosity"),
        # ISO 2533 tabulates from -2000 m (from memory); 20 km is the top of its first two layers
        (dict(altitude=-5000.0), "altitude"),
        (dict(altitude=1e6), "altitude"),
        (dict(altitude=math.nan), "altitude"),
        # ISO 2533 sea-level temperature 288.15 K: an offset of -400 K is below absolute zero
        (dict(temperature_offset=-400.0), "temperature"),
        (dict(h_separation=3.5), "h_separation"),
        (dict(transition="laminar"), "transition"),
        (dict(transition=-1.0), "transition"),
        (dict(speed="30"), "speed"),
        (dict(ground="yes"), "ground"),
        (dict(model_scale=0.0), "model_scale"),
        (dict(base_pressure=-3.0), "base_pressure"),
    ],
    ids=lambda v: v if isinstance(v, str) else None,
)
def test_absurd_conditions(kwargs, what):
    with pytest.raises(ConditionsError) as info:
        Conditions(**kwargs)
    _says(str(info.value), what)


@pytest.mark.parametrize(
    "panels",
    [0, 10, 39, 2001, 100000, 250.0, True],
    ids=["0", "10", "39", "2001", "1e5", "float", "bool"],
)
def test_panel_counts_too_small_or_too_large(panels):
    with pytest.raises(ConditionsError) as info:
        Conditions(panels=panels)
    _says(str(info.value), "panels", "40..2000")


@pytest.mark.parametrize("thickness", [0.0, -1.0, math.nan, math.inf])
def test_bad_reference_thickness(thickness):
    with pytest.raises(InputError) as info:
        analyze(Profile.from_points(BOX), Conditions(panels=60), thickness=thickness)
    assert "thickness" in str(info.value) and "positive length in metres" in str(info.value)


@pytest.mark.parametrize(
    "profile, conditions", [("box.json", None), (BOX, None), (None, {"speed": 30})]
)
def test_wrong_types_to_analyze(profile, conditions):
    prof = Profile.from_points(BOX) if profile is None else profile
    with pytest.raises(InputError) as info:
        analyze(prof, conditions)
    assert "must be a profilebench" in str(info.value)


# --- project files ----------------------------------------------------------------------------


def test_truncated_project(tmp_path, sample_dict):
    import json

    text = json.dumps(sample_dict, indent=2)
    path = tmp_path / "cut.json"
    path.write_text(text[: len(text) // 2], encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    _says(str(info.value), "truncated")


def test_project_of_a_newer_version(tmp_path, sample_dict):
    sample_dict["version"] = 3
    with pytest.raises(ProjectFileError) as info:
        load_project(write_json(tmp_path, "v3.json", sample_dict))
    _says(str(info.value), "version 3", "newer")
    assert info.value.path == "version"


@pytest.mark.parametrize(
    "where, value, json_path, expected",
    [
        (("profile", "nodes", 0, "x"), "abc", "profile.nodes[0].x", "expected a number"),
        (
            ("profile", "nodes", 0, "smooth"),
            "yes",
            "profile.nodes[0].smooth",
            "expected true or false",
        ),
        (("profile", "nodes"), {"x": 1}, "profile.nodes", "expected a list"),
        (("profile", "trailing_edge"), 1.5, "profile.trailing_edge", "expected a node index"),
        (("profile", "name"), 7, "profile.name", "expected a string"),
        (("conditions", "speed"), "fast", "conditions.speed", "must be a number"),
        (("conditions", "panels"), 3, "conditions.panels", "outside the allowed range"),
        (("notes",), ["a"], "notes", "expected a string"),
    ],
    ids=lambda v: v if isinstance(v, str) and "." in v else None,
)
def test_project_with_wrong_types(tmp_path, sample_dict, where, value, json_path, expected):
    d = sample_dict
    for key in where[:-1]:
        d = d[key]
    d[where[-1]] = value
    with pytest.raises(ProjectFileError) as info:
        load_project(write_json(tmp_path, "p.json", sample_dict))
    msg = str(info.value)
    assert msg.startswith(json_path + ":")
    # "expected ..." names both what is wrong (the value) and what to give instead
    assert expected in msg


@pytest.mark.parametrize(
    "where",
    [
        ("profile",),
        ("conditions",),
        ("format",),
        ("version",),
        ("profile", "nodes"),
        ("profile", "nodes", 2, "y"),
    ],
    ids=lambda w: ".".join(map(str, w)),
)
def test_project_with_missing_fields(tmp_path, sample_dict, where):
    d = sample_dict
    for key in where[:-1]:
        d = d[key]
    del d[where[-1]]
    with pytest.raises(ProjectFileError) as info:
        load_project(write_json(tmp_path, "p.json", sample_dict))
    msg = str(info.value)
    assert "missing" in msg
    assert str(where[-1]) in msg
    assert re.search(r"\badd\b|expected", msg)  # the remedy: add the field / what is expected


@pytest.mark.parametrize(
    "text",
    ["hello, this is not JSON", "x,y\n0,0.2\n", "{'format': 1}"],
    ids=["prose", "csv", "python dict"],
)
def test_project_that_is_not_json(tmp_path, text):
    path = tmp_path / "p.json"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    _says(str(info.value), "not valid json")


@pytest.mark.parametrize(
    "content", [b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", b"\xff\xfe\x00\x01"], ids=["png", "binary"]
)
def test_project_that_is_binary(tmp_path, content):
    path = tmp_path / "p.json"
    path.write_bytes(content)
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert "not utf-8 text" in str(info.value).lower()
    assert "not a profilebench project file" in str(info.value)


def test_project_that_is_empty(tmp_path):
    path = tmp_path / "p.json"
    path.write_text("  \n", encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert "is empty" in str(info.value)


def test_project_that_is_huge(tmp_path):
    path = tmp_path / "huge.json"
    with open(path, "wb") as fh:
        fh.truncate(MAX_PROJECT_BYTES + 1)  # sparse: nothing is written or read
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    _says(str(info.value), "limit")


def test_project_that_is_huge_is_refused_before_reading(tmp_path):
    path = tmp_path / "huge.json"
    with open(path, "wb") as fh:
        fh.truncate(MAX_PROJECT_BYTES + 1)
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert "20 MiB" in str(info.value) and "limit" in str(info.value)  # 20 * 2**20 bytes


@pytest.mark.parametrize("make", ["missing", "folder"])
def test_project_path_not_a_file(tmp_path, make):
    path = tmp_path / "p.json"
    if make == "folder":
        path.mkdir()
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    _says(str(info.value), "folder" if make == "folder" else "no project file")


# --- CSV point files --------------------------------------------------------------------------

EXPECTED_M = [[0.0, 0.2], [2.0, 0.2], [2.0, 1.2]]


@pytest.mark.parametrize(
    "text, units",
    [
        ("x,y\n0,0.2\n2,0.2\n2,1.2\n", "auto"),  # header, commas
        ("x;y\n0;0,2\n2;0,2\n2;1,2\n", "auto"),  # semicolons, decimal commas
        ("x_mm,y_mm\n0,200\n2000,200\n2000,1200\n", "auto"),  # mm from the header
        ("0 200\n2000 200\n2000 1200\n", "auto"),  # mm from the extent
        ("0\t200\n2000\t200\n2000\t1200\n", "mm"),  # tabs, asked for mm
        ("\n0,0.2\n\n2,0.2 # a comment\n\n2,1.2\n\n", "m"),  # blank lines, comments
    ],
    ids=["header-commas", "semicolons", "mm-header", "mm-extent", "tabs-mm", "blank-lines"],
)
def test_csv_variants_read_the_same_points(tmp_path, text, units):
    import numpy as np

    path = tmp_path / "pts.csv"
    path.write_text(text, encoding="utf-8")
    pts = read_points_csv(path, units=units)
    # 1 mm = 0.001 m (SI definition)
    np.testing.assert_allclose(pts, EXPECTED_M, atol=1e-12)


@pytest.mark.parametrize(
    "text, what",
    [
        ("0,0.2\n2,nan\n2,1.2\n", "not a finite number"),
        ("0,0.2\n2,0.2\n", "at least 3"),
        ("x_mm,y_mm\n0,200\n2000,200\n2000,1200\n", "says 'mm'"),  # read with units="m"
    ],
    ids=["nan", "two points", "unit clash"],
)
def test_csv_bad_content_with_remedy(tmp_path, text, what):
    path = tmp_path / "pts.csv"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        read_points_csv(path, units="m" if "x_mm" in text else "auto")
    msg = str(info.value)
    assert what in msg
    assert re.search(FIX_WORDS + r"|needs at least", msg.lower())


@pytest.mark.parametrize(
    "text, what",
    [
        ("0,0.2\n2,abc\n2,1.2\n", "line 2, column 2"),
        ("0,0.2\n2,0.2,5\n2,1.2\n", "line 2"),
        ("# only a comment\n\n", "no points"),
    ],
    ids=["non-numeric", "three columns", "no points"],
)
def test_csv_bad_content_without_remedy(tmp_path, text, what):
    path = tmp_path / "pts.csv"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        read_points_csv(path)
    _says(str(info.value), what)


def test_csv_bad_units_argument(tmp_path):
    path = tmp_path / "pts.csv"
    path.write_text("0,0.2\n2,0.2\n2,1.2\n", encoding="utf-8")
    with pytest.raises(InputError) as info:
        read_points_csv(path, units="inch")
    assert "'auto', 'mm' or 'm'" in str(info.value)


# --- the command line: exit code 2, message on stderr, no traceback ---------------------------


@pytest.mark.parametrize(
    "mutate, args, words",
    [
        (lambda d: d.update(version=3), [], ["version 3", "upgrade"]),
        (lambda d: d["conditions"].update(speed=-1.0), [], ["conditions.speed", "give a value"]),
        (
            lambda d: d["profile"]["nodes"][0].update(x="abc"),
            [],
            ["profile.nodes[0].x", "expected a number"],
        ),
        (None, ["--speed", "0"], ["speed", "give a value"]),
        (None, ["--panels", "5"], ["panels", "give a panel count"]),
        (None, ["--h-separation", "9"], ["h_separation", "give a value"]),
        (None, ["--transition", "sometimes"], ["--transition", "give 'free'"]),
        (None, ["--altitude", "99999"], ["altitude", "give a value"]),
    ],
    ids=[
        "version",
        "speed in file",
        "type in file",
        "speed 0",
        "panels 5",
        "H 9",
        "transition",
        "altitude",
    ],
)
def test_cli_bad_input_exits_2(tmp_path, sample_dict, capsys, mutate, args, words):
    if mutate is not None:
        mutate(sample_dict)
    path = write_json(tmp_path, "p.json", sample_dict)
    assert main(["analyse", str(path), *args]) == 2
    captured = capsys.readouterr()
    assert captured.err.startswith("profilebench: error: ")
    assert "Traceback" not in captured.err
    for w in words:
        assert w in captured.err


def test_cli_missing_file_exits_2(tmp_path, capsys):
    assert main(["analyse", str(tmp_path / "none.json")]) == 2
    err = capsys.readouterr().err
    assert "no project file" in err and "check the path" in err


def test_every_error_class_is_a_profilebench_error():
    # the one class a caller needs to catch
    for cls in (GeometryError, InputError, ConditionsError, ProjectFileError):
        assert issubclass(cls, ProfileBenchError)
