"""Tests of the empirical r/t tables (profilebench.assess.tables and profilebench/resources)."""

import csv
import warnings

import numpy as np
import pytest

from profilebench.assess.tables import (
    RESOURCES_DIR,
    RtTable,
    RtVerdict,
    builtin_tables,
    load_table,
    select_table,
)
from profilebench.errors import InputError, ProfileBenchWarning, TableError

RESOURCE_FILES = sorted(RESOURCES_DIR.glob("*.csv"))

GOOD_HEADER = """\
# name: test table
# source: invented numbers for a format test
# reynolds_min: 1e6
# reynolds_max: 1e7
# thickness: body height h
# quantity: Cd based on frontal area
"""


def write(tmp_path, text, name="user.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def test_resources_hold_at_least_the_square_section_table():
    assert len(RESOURCE_FILES) >= 1
    assert len(builtin_tables()) == len(RESOURCE_FILES)


def test_square_section_table_holds_the_published_points():
    t = load_table(RESOURCES_DIR / "square_section_rounded_corners_re1e5.csv")
    # Delany & Sorensen, NACA TN 3038 (1953), via Munson, Young & Okiishi,
    # Fundamentals of Fluid Mechanics (figure of 2D drag coefficients):
    # R/D 0 -> 2.2, 0.02 -> 2.0, 0.17 -> 1.2, 0.33 -> 1.0 at Re = 1e5
    assert t.ratios == (0.0, 0.02, 0.17, 0.33)
    assert t.values == (2.2, 2.0, 1.2, 1.0)
    assert t.contains(1e5)
    # the drag still falls at 0.33 (Delany & Sorensen 1953, same figure): no critical ratio in the data
    assert t.critical_ratio is None
    assert t.verdict(0.25) is RtVerdict.UNDETERMINED
    assert "NACA" in t.source and "3038" in t.source


def read_points_with_csv_module(path):
    """Independent reader (Python's csv module): the numeric rows of a table file."""
    with open(path, newline="", encoding="utf-8") as fh:
        rows = [r for r in csv.reader(fh) if r and not r[0].lstrip().startswith("#")]
    assert [c.strip() for c in rows[0]] == ["r_over_t", "cd"]
    return np.array(rows[1:], dtype=float)


@pytest.mark.parametrize("path", RESOURCE_FILES, ids=lambda p: p.name)
def test_each_resource_table_is_reproduced_at_its_points(path):
    numeric = read_points_with_csv_module(path)
    t = load_table(path)
    np.testing.assert_array_equal(t.ratios, numeric[:, 0])
    np.testing.assert_allclose(t.cd(numeric[:, 0]), numeric[:, 1], rtol=0, atol=1e-12)


INTERVALS = [
    (path, i) for path in RESOURCE_FILES for i in range(len(read_points_with_csv_module(path)) - 1)
]


@pytest.mark.parametrize("path, i", INTERVALS, ids=lambda v: getattr(v, "name", str(v)))
def test_each_resource_table_interpolates_monotonically(path, i):
    # PCHIP keeps each interval monotone (Fritsch & Carlson 1980, SIAM J. Numer. Anal. 17):
    # on a fine grid the curve stays between the two end values and moves in their direction
    t = load_table(path)
    x, y = np.asarray(t.ratios), np.asarray(t.values)
    v = t.cd(np.linspace(x[i], x[i + 1], 201))
    lo, hi = min(y[i], y[i + 1]), max(y[i], y[i + 1])
    assert np.all(v >= lo - 1e-12) and np.all(v <= hi + 1e-12)
    assert np.all(np.sign(y[i + 1] - y[i]) * np.diff(v) >= -1e-12)


def test_interpolation_agrees_with_scipy_pchip():
    # scipy.interpolate.PchipInterpolator computed independently on the same points
    from scipy.interpolate import PchipInterpolator

    t = builtin_tables()[0]
    ref = PchipInterpolator(t.ratios, t.values)
    x = np.linspace(t.ratios[0], t.ratios[-1], 57)
    np.testing.assert_allclose(t.cd(x), ref(x), rtol=1e-13)


def test_extrapolation_holds_last_value_and_warns():
    t = builtin_tables()[0]
    with pytest.warns(ProfileBenchWarning, match="outside"):
        assert t.cd(0.6) == t.values[-1]
    with pytest.warns(ProfileBenchWarning):
        v = t.lookup(0.6)
    assert v.extrapolated and v.cd == t.values[-1] and "held" in v.message
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # inside the data: no warning
        assert not t.lookup(0.1).extrapolated


@pytest.mark.parametrize("bad", [-0.1, float("nan"), "0.1", None])
def test_cd_rejects_bad_ratio(bad):
    with pytest.raises(InputError):
        builtin_tables()[0].cd(bad)


def flat_tail_table(tmp_path, critical_line=""):
    # invented numbers shaped like the SAE 1962 tractor data (SAE Transactions vol. 70, 1962, quoted second-hand): drag falls, then
    # stays constant
    text = (
        GOOD_HEADER + critical_line + "r_over_t,cd\n0.0,0.88\n0.05,0.725\n0.1,0.562\n0.15,0.562\n"
    )
    return load_table(write(tmp_path, text))


def test_critical_ratio_found_where_the_data_stop_falling(tmp_path):
    t = flat_tail_table(tmp_path)
    # rule in tables.py: first point with no later point more than 2 % below it
    assert t.critical_ratio == 0.1
    assert t.critical_ratio_basis == "data"
    assert t.verdict(0.08) is RtVerdict.BELOW
    assert t.verdict(0.1) == "at or above critical"


def test_critical_ratio_from_header_wins(tmp_path):
    t = flat_tail_table(tmp_path, "# critical_ratio: 0.12\n")
    assert t.critical_ratio == 0.12 and t.critical_ratio_basis == "header"


@pytest.mark.parametrize("attached", [None, 0.03, 0.1, 0.14])
def test_penalty_is_zero_beyond_floor_and_never_negative(tmp_path, attached):
    t = flat_tail_table(tmp_path)
    floor = 0.1 if attached is None else attached
    x = np.linspace(0.0, 0.15, 301)
    p = t.penalty(x, attached_ratio=attached)
    assert np.all(p >= 0.0)
    assert np.all(p[x >= floor] == 0.0)
    # at r/t = 0 the excess is cd(0) - cd(floor), read off the table (0.88 minus the floor value)
    assert p[0] == pytest.approx(0.88 - t.cd(floor))


def test_penalty_without_critical_ratio_uses_last_point_and_warns():
    t = builtin_tables()[0]
    with pytest.warns(ProfileBenchWarning, match="no critical ratio"):
        p = t.penalty(0.0)
    # 2.2 - 1.0 from the published points (Delany & Sorensen 1953 via Munson et al.)
    assert p == pytest.approx(1.2)
    # with the solver's attached ratio 0.17: 2.2 - 1.2 = 1.0
    assert t.penalty(0.0, attached_ratio=0.17) == pytest.approx(1.0)


def test_select_table_inside_and_outside_ranges(tmp_path):
    sq = builtin_tables()[0]
    vehicle = flat_tail_table(tmp_path)  # declares Re 1e6..1e7
    s = select_table(1e5, [sq, vehicle])
    assert s.table is sq and s.inside_range
    s = select_table(3e6, [sq, vehicle])
    assert s.table is vehicle and s.inside_range
    s = select_table(5e7, [sq, vehicle])
    assert s.table is vehicle and not s.inside_range and "outside" in s.message
    s = select_table(1e4, [sq, vehicle])
    assert s.table is sq and not s.inside_range


def test_select_table_unpacks_as_table_and_outside_flag():
    sq = builtin_tables()[0]
    table, outside = select_table(5e6, [sq])  # 5e6 lies beyond the table's 5e4..2e5
    assert table is sq and outside is True
    table, outside = select_table(1e5, [sq])
    assert outside is False


def test_select_table_needs_tables():
    with pytest.raises(TableError, match="no r/t table"):
        select_table(1e6, [])


@pytest.mark.parametrize(
    "text, line, words",
    [
        # missing 'source' key
        (
            GOOD_HEADER.replace("# source: invented numbers for a format test\n", "")
            + "r_over_t,cd\n0,1\n0.1,0.8\n",
            1,
            "source",
        ),
        # header line without a colon
        (
            "# name test\n"
            + GOOD_HEADER[GOOD_HEADER.index("# source") :]
            + "r_over_t,cd\n0,1\n0.1,0.8\n",
            1,
            "key: value",
        ),
        # misspelt key
        (GOOD_HEADER + "# critcal_ratio: 0.1\nr_over_t,cd\n0,1\n0.1,0.8\n", 7, "critcal_ratio"),
        # wrong column row
        (GOOD_HEADER + "ratio,drag\n0,1\n0.1,0.8\n", 7, "column row"),
        # non-numeric cell
        (GOOD_HEADER + "r_over_t,cd\n0,1\n0.1,abc\n", 9, "not a number"),
        # non-monotone r/t
        (GOOD_HEADER + "r_over_t,cd\n0,1\n0.2,0.8\n0.1,0.7\n", 10, "strictly increasing"),
        # repeated r/t
        (GOOD_HEADER + "r_over_t,cd\n0,1\n0,0.8\n", 9, "does not exceed"),
        # negative value
        (GOOD_HEADER + "r_over_t,cd\n0,1\n0.1,-0.8\n", 9, "negative"),
        # three cells
        (GOOD_HEADER + "r_over_t,cd\n0,1,2\n0.1,0.8\n", 8, "cells"),
        # one data row only
        (GOOD_HEADER + "r_over_t,cd\n0,1\n", 8, "at least 2"),
        # reynolds range upside down
        (
            GOOD_HEADER.replace("reynolds_max: 1e7", "reynolds_max: 1e5")
            + "r_over_t,cd\n0,1\n0.1,0.8\n",
            4,
            "reynolds_min",
        ),
        # non-numeric reynolds
        (
            GOOD_HEADER.replace("reynolds_min: 1e6", "reynolds_min: high")
            + "r_over_t,cd\n0,1\n0.1,0.8\n",
            3,
            "reynolds_min",
        ),
        # critical ratio outside the data
        (GOOD_HEADER + "# critical_ratio: 0.5\nr_over_t,cd\n0,1\n0.1,0.8\n", 7, "critical_ratio"),
        # header line after the data
        (GOOD_HEADER + "r_over_t,cd\n0,1\n# notes: late\n0.1,0.8\n", 9, "header line after"),
        # duplicate key
        (GOOD_HEADER + "# name: again\nr_over_t,cd\n0,1\n0.1,0.8\n", 7, "twice"),
    ],
)
def test_bad_user_table_is_refused_naming_file_and_line(tmp_path, text, line, words):
    p = write(tmp_path, text, name="inhouse.csv")
    with pytest.raises(TableError) as info:
        load_table(p)
    msg = str(info.value)
    assert "inhouse.csv" in msg
    assert f"line {line}:" in msg
    assert words in msg


def test_missing_file_is_a_table_error(tmp_path):
    with pytest.raises(TableError, match="no such table file"):
        load_table(tmp_path / "absent.csv")


def test_good_user_table_loads_with_its_metadata(tmp_path):
    t = load_table(
        write(tmp_path, GOOD_HEADER + "# notes: in-house\n\nr_over_t,cd\n0,1\n0.1,0.8\n")
    )
    assert t.name == "test table" and t.notes == "in-house"
    assert (t.reynolds_min, t.reynolds_max) == (1e6, 1e7)
    assert t.thickness == "body height h"


def test_direct_construction_is_checked():
    with pytest.raises(TableError, match="strictly increasing"):
        RtTable("t", "s", 1e5, 1e6, "D", "Cd", (0.0, 0.2, 0.1), (1.0, 0.9, 0.8))
