"""CSV point import/export and profiles made from digitised points."""

import os

import numpy as np
import pytest
from shapely.geometry import LinearRing, Point

from profilebench.errors import InputError, ProjectFileError
from profilebench.io import (
    import_points_csv,
    profile_from_points,
    read_points_csv,
    write_points_csv,
)

# A small outline used by the format cases: a 4.0 m x 1.2 m box above the ground (m).
BOX_M = np.array([[0.0, 0.2], [4.0, 0.2], [4.0, 1.4], [0.0, 1.4]])


def _csv(tmp_path, text, name="pts.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


FORMATS = {
    # name: (file text, expected units, expected delimiter, decimal comma)
    "comma with header m": ("x,y\n0,0.2\n4,0.2\n4,1.4\n0,1.4\n", "m", ",", False),
    "semicolon mm header": ("x_mm;y_mm\n0;200\n4000;200\n4000;1400\n0;1400\n", "mm", ";", False),
    "tab with unit header": ("x [m]\ty [m]\n0\t0.2\n4\t0.2\n4\t1.4\n0\t1.4\n", "m", "\t", False),
    "decimal comma semicolons": (
        "X (m);Y (m)\n0,0;0,2\n4,0;0,2\n4,0;1,4\n0,0;1,4\n",
        "m",
        ";",
        True,
    ),
    "no header, mm by extent": ("0,200\n4000,200\n4000,1400\n0,1400\n", "mm", ",", False),
    "no header, m by extent": ("0 0.2\n4 0.2\n4   1.4\n0 1.4\n", "m", " ", False),
    "comments and blank lines": (
        "# digitised side view\n\nx,y  # metres\n\n0,0.2\n# skip\n4,0.2\n4,1.4\n\n0,1.4\n",
        "m",
        ",",
        False,
    ),
    "trailing separators": ("x;y;\n0;0.2;\n4;0.2;\n4;1.4;\n0;1.4;\n", "m", ";", False),
    "three columns named": (
        "id,x_mm,y_mm\n1,0,200\n2,4000,200\n3,4000,1400\n4,0,1400\n",
        "mm",
        ",",
        False,
    ),
    "y before x": ("y,x\n0.2,0\n0.2,4\n1.4,4\n1.4,0\n", "m", ",", False),
    "byte order mark": ("\ufeffx,y\n0,0.2\n4,0.2\n4,1.4\n0,1.4\n", "m", ",", False),
}


@pytest.mark.parametrize("case", sorted(FORMATS))
def test_formats_read_the_same_outline(tmp_path, case):
    text, units, delimiter, decimal_comma = FORMATS[case]
    result = import_points_csv(_csv(tmp_path, text))
    # expected values: the same box written in metres (1 mm = 0.001 m, SI definition)
    np.testing.assert_allclose(result.points, BOX_M, rtol=0, atol=1e-12)
    assert result.units == units
    assert result.delimiter == delimiter
    assert result.decimal_comma is decimal_comma
    assert result.units_reason


@pytest.mark.parametrize("units,factor", [("m", 1.0), ("mm", 1e-3)])
def test_explicit_units_override_the_extent_rule(tmp_path, units, factor):
    path = _csv(tmp_path, "0,10\n30,10\n30,20\n")
    pts = read_points_csv(path, units=units)
    np.testing.assert_allclose(pts, np.array([[0, 10], [30, 10], [30, 20]]) * factor)


def test_auto_reports_why_it_chose(tmp_path):
    r = import_points_csv(_csv(tmp_path, "0,0\n51,0\n51,1\n"))
    assert r.units == "mm" and "51" in r.units_reason
    r = import_points_csv(_csv(tmp_path, "0,0\n50,0\n50,1\n"))
    assert r.units == "m"  # the documented rule: extent above 50 means mm, 50 itself is m


def test_explicit_unit_contradicting_header(tmp_path):
    with pytest.raises(ProjectFileError, match="header"):
        read_points_csv(_csv(tmp_path, "x_mm,y_mm\n0,1\n2,1\n2,3\n"), units="m")


BAD = {
    "non-numeric cell": ("x,y\n0,0.2\n4,abc\n4,1.4\n", r"line 3, column 2: 'abc' is not a number"),
    "non-numeric after comment lines": ("# a\n\n0,0\n1,0\n1,one\n", r"line 5, column 2"),
    "nan": ("0,0\n1,nan\n1,1\n", r"line 2, column 2: 'nan' is not a finite number"),
    "infinity": ("0,0\n1,0\ninf,1\n", r"line 3, column 1"),
    "too few points": ("x,y\n0,0\n1,0\n", r"2 point\(s\); an outline needs at least 3"),
    "wrong column count": ("0,0\n1,0,5\n1,1\n", r"line 2: 3 column\(s\), expected 2"),
    "only comments": ("# nothing\n\n", r"holds no points"),
    "header without x and y": ("a,b,c\n1,2,3\n4,5,6\n7,8,9\n", r"name exactly one 'x' and one 'y'"),
    "header with both units": ("x_mm,y_m\n0,0\n1,0\n1,1\n", r"both mm and m"),
    "decimal comma with comma separator": ("0,5,1,5\n1,0,2,0\n", r"4 column\(s\)"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_point_files(tmp_path, case):
    text, pattern = BAD[case]
    with pytest.raises(ProjectFileError, match=pattern):
        read_points_csv(_csv(tmp_path, text))


def test_missing_file_folder_and_bad_units_argument(tmp_path):
    with pytest.raises(ProjectFileError, match="no point file"):
        read_points_csv(tmp_path / "none.csv")
    with pytest.raises(ProjectFileError, match="folder"):
        read_points_csv(tmp_path)
    with pytest.raises(InputError, match="units"):
        read_points_csv(_csv(tmp_path, "0,0\n1,0\n1,1\n"), units="inch")


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes are POSIX only")
def test_a_pipe_is_refused_before_reading_it(tmp_path):
    # reading a pipe nobody writes to would never end: it is refused as not a regular file
    fifo = tmp_path / "points.csv"
    os.mkfifo(fifo)
    with pytest.raises(ProjectFileError, match="not a regular file; choose a CSV point file"):
        read_points_csv(fifo)


@pytest.mark.parametrize("units", ["m", "mm"])
def test_write_then_read_is_exact(tmp_path, units):
    rng = np.random.default_rng(7)
    pts = rng.uniform(0.0, 5.0, size=(40, 2))
    path = write_points_csv(tmp_path / "out.csv", pts, units=units)
    back = read_points_csv(path)  # the header names the unit
    # repr(float) round-trips a binary64 exactly; *1000 then /1000 may differ in the last ulp
    np.testing.assert_allclose(back, pts, rtol=4e-16 if units == "m" else 1e-15, atol=0)
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


def test_write_failure_leaves_old_file(tmp_path, monkeypatch):
    path = write_points_csv(tmp_path / "out.csv", BOX_M)
    before = path.read_bytes()

    def fail(*a, **k):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr("profilebench.io.atomic.os.replace", fail)
    with pytest.raises(ProjectFileError):
        write_points_csv(path, BOX_M * 2)
    monkeypatch.undo()
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


# --------------------------------------------------------------------------- profiles from points
def _ellipse(n, a=2.0, b=0.6, yc=0.8):
    t = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([a + a * np.cos(t), yc + b * np.sin(t)])


def test_gentle_outline_gives_smooth_nodes_and_polygon_gives_sharp():
    # regular polygon with n sides turns by 360/n degrees at each vertex (exterior angle sum)
    smooth = profile_from_points(_ellipse(36, 1.0, 1.0), sharp_angle=30.0)  # 10 degrees each
    assert all(n.smooth for n in smooth.nodes)
    pentagon = profile_from_points(_ellipse(5, 1.0, 1.0), sharp_angle=30.0)  # 72 degrees each
    assert not any(n.smooth for n in pentagon.nodes)
    assert all(n.radius == 0.0 for n in pentagon.nodes)


def test_dense_box_becomes_four_sharp_corners():
    edges = [np.linspace(BOX_M[i], BOX_M[(i + 1) % 4], 50, endpoint=False) for i in range(4)]
    dense = np.vstack(edges)
    plain = profile_from_points(dense)
    assert len(plain) == 200
    assert sum(not n.smooth for n in plain.nodes) == 4  # collinear points turn by 0 degrees
    reduced = profile_from_points(dense, simplify_tolerance=1e-6)
    np.testing.assert_allclose(np.array(reduced.xy), BOX_M, atol=1e-12)
    assert not any(n.smooth for n in reduced.nodes)


@pytest.mark.parametrize("tol", [0.002, 0.01, 0.05])
def test_simplify_keeps_every_point_within_tolerance(tol):
    dense = _ellipse(2000)
    prof = profile_from_points(dense, simplify_tolerance=tol)
    ring = LinearRing(prof.xy)
    # Douglas-Peucker bound, measured with shapely's exact point-to-ring distance
    dist = max(ring.distance(Point(p)) for p in dense[::7])
    assert dist <= tol * (1 + 1e-9)
    assert 3 <= len(prof) < 200


def test_huge_tolerance_gives_a_triangle_within_tolerance():
    # GEOS keeps a valid ring (at least a triangle) when topology is preserved
    dense = _ellipse(400)
    prof = profile_from_points(dense, simplify_tolerance=100.0)
    assert len(prof) == 3
    assert LinearRing(prof.xy).is_simple


def test_closing_and_repeated_points_are_dropped():
    pts = np.vstack([BOX_M, BOX_M[:1]])
    pts = np.insert(pts, 2, pts[1], axis=0)
    prof = profile_from_points(pts)
    np.testing.assert_array_equal(np.array(prof.xy), BOX_M)


@pytest.mark.parametrize(
    "bad,pattern",
    [
        ([[0, 0], [1, 0]], "at least 3"),
        ([[0, 0], [1, 0], [np.nan, 1]], "not finite"),
        ([[0, 0, 0], [1, 0, 0], [1, 1, 0]], "shape"),
        ([[0, 0], [0, 0], [0, 0], [0, 0]], "distinct"),
    ],
)
def test_profile_from_bad_points(bad, pattern):
    with pytest.raises(InputError, match=pattern):
        profile_from_points(bad)


@pytest.mark.parametrize(
    "kw,pattern",
    [
        ({"simplify_tolerance": -1.0}, "simplify_tolerance"),
        ({"simplify_tolerance": float("nan")}, "simplify_tolerance"),
        ({"sharp_angle": 0.0}, "sharp_angle"),
        ({"sharp_angle": 200.0}, "sharp_angle"),
    ],
)
def test_profile_from_points_bad_options(kw, pattern):
    with pytest.raises(InputError, match=pattern):
        profile_from_points(_ellipse(100), **kw)
