"""Every reader fed random bytes and random JSON: it returns a valid result or raises the project's
own error, within a time and memory bound, and never changes the file it reads."""

from __future__ import annotations

import copy
import hashlib
import json
import math
import time
import tracemalloc
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from profilebench.assess.tables import RtTable, load_table
from profilebench.editor import recovery
from profilebench.errors import ProfileBenchError
from profilebench.io import Project, import_points_csv, load_project, project_to_dict
from profilebench.io.samples import default_sample_path

SECONDS = 5.0  # per read (common practice, no source)
PEAK_BYTES = 64 * 2**20  # per read, Python and numpy allocations (tracemalloc)
FUZZ = settings(
    max_examples=25,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)

SAMPLE = json.loads(Path(default_sample_path()).read_text(encoding="utf-8"))

json_values = st.recursive(
    st.none()
    | st.booleans()
    | st.integers()
    | st.floats()
    | st.text(max_size=20)
    | st.integers(min_value=10**20, max_value=10**400),
    lambda inner: (
        st.lists(inner, max_size=5) | st.dictionaries(st.text(max_size=8), inner, max_size=5)
    ),
    max_leaves=20,
)


def _paths(value, prefix=()):
    """Every path (tuple of keys and indices) into a parsed JSON value."""
    yield prefix
    if isinstance(value, dict):
        for k, v in value.items():
            yield from _paths(v, prefix + (k,))
    elif isinstance(value, list):
        for i, v in enumerate(value):
            yield from _paths(v, prefix + (i,))


SAMPLE_PATHS = [p for p in _paths(SAMPLE) if p]


def _replaced(path, value):
    d = copy.deepcopy(SAMPLE)
    target = d
    for key in path[:-1]:
        target = target[key]
    target[path[-1]] = value
    return d


def _state(files):
    return [(hashlib.sha256(f.read_bytes()).hexdigest(), f.stat().st_mtime_ns) for f in files]


def _read_checked(reader, path: Path, files=None):
    """``reader(path)`` within the bounds, the files read (default ``path``) unchanged; the
    result or the error."""
    files = [path] if files is None else files
    before = _state(files)
    tracemalloc.start()
    t0 = time.perf_counter()
    try:
        result = reader(path)
    except ProfileBenchError as exc:
        result = exc
    finally:
        seconds = time.perf_counter() - t0
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
    assert seconds < SECONDS and peak < PEAK_BYTES, (seconds, peak)
    assert _state(files) == before
    if isinstance(result, ProfileBenchError):
        assert str(result).strip()  # says something
    return result


def _valid_project(project):
    assert isinstance(project, Project)
    json.dumps(project_to_dict(project), allow_nan=False).encode("utf-8")  # savable as it is


def _write(tmp_path_factory, data: bytes, name: str) -> Path:
    path = tmp_path_factory.mktemp("fuzz") / name
    path.write_bytes(data)
    return path


# --- project files ----------------------------------------------------------------------------


@FUZZ
@given(data=st.binary(max_size=2000))
def test_project_reader_on_random_bytes(tmp_path_factory, data):
    result = _read_checked(load_project, _write(tmp_path_factory, data, "p.json"))
    if not isinstance(result, ProfileBenchError):
        _valid_project(result)


@FUZZ
@given(value=json_values)
def test_project_reader_on_random_json(tmp_path_factory, value):
    text = json.dumps(value)  # NaN and Infinity written as such: not JSON, refused
    result = _read_checked(load_project, _write(tmp_path_factory, text.encode(), "p.json"))
    if not isinstance(result, ProfileBenchError):
        _valid_project(result)


@FUZZ
@given(where=st.sampled_from(SAMPLE_PATHS), value=json_values)
# values that once raised something else than a ProfileBenchError, always tried
@example(where=("conditions", "speed"), value=10**400)
@example(where=("conditions", "temperature_offset"), value=1e308)
@example(where=("profile", "nodes", 0, "x"), value=1e308)
@example(where=("profile", "nodes", 0, "label"), value="\ud800")
def test_project_reader_on_the_sample_with_one_random_field(tmp_path_factory, where, value):
    text = json.dumps(_replaced(where, value))
    result = _read_checked(load_project, _write(tmp_path_factory, text.encode(), "p.json"))
    if not isinstance(result, ProfileBenchError):
        _valid_project(result)


# --- point files ------------------------------------------------------------------------------

cells = st.one_of(
    st.floats(width=64).map(repr),
    st.integers().map(str),
    st.text(alphabet="0123456789.,;e-+ \t#xy", max_size=12),
)


@FUZZ
@given(
    data=st.one_of(
        st.binary(max_size=2000),
        st.lists(st.lists(cells, min_size=1, max_size=3).map(",".join), max_size=12).map(
            lambda rows: "\n".join(rows).encode()
        ),
    )
)
def test_point_reader_on_random_bytes_and_rows(tmp_path_factory, data):
    result = _read_checked(import_points_csv, _write(tmp_path_factory, data, "outline.csv"))
    if not isinstance(result, ProfileBenchError):
        pts = result.points
        assert pts.ndim == 2 and pts.shape[1] == 2 and len(pts) >= 3
        assert np.all(np.isfinite(pts))


# --- r/t tables -------------------------------------------------------------------------------

TABLE_HEAD = (
    "# name: fuzz\n# source: generated\n# reynolds_min: 1e4\n# reynolds_max: 1e6\n"
    "# thickness: h\n# quantity: Cd\nr_over_t,cd\n"
)


@FUZZ
@given(
    data=st.one_of(
        st.binary(max_size=2000),
        st.lists(st.lists(cells, min_size=1, max_size=3).map(",".join), max_size=8).map(
            lambda rows: (TABLE_HEAD + "\n".join(rows)).encode()
        ),
    )
)
def test_table_reader_on_random_bytes_and_rows(tmp_path_factory, data):
    result = _read_checked(load_table, _write(tmp_path_factory, data, "table.csv"))
    if not isinstance(result, ProfileBenchError):
        assert isinstance(result, RtTable)
        assert all(math.isfinite(v) for v in result.ratios + result.values)


# --- recovery folders -------------------------------------------------------------------------


@FUZZ
@given(copy_bytes=st.binary(max_size=500), origin=st.binary(max_size=200))
def test_recovery_reader_on_random_copies_and_sidecars(tmp_path_factory, copy_bytes, origin):
    folder = tmp_path_factory.mktemp("recovery")
    pid = 999_999_021  # above Linux's largest pid: never running
    files = [folder / f"recovery-{pid}.json", folder / f"recovery-{pid}.origin"]
    files[0].write_bytes(copy_bytes)
    files[1].write_bytes(origin)
    copies = _read_checked(recovery.left_behind, folder, files)  # the folder's reader
    assert [c.pid for c in copies] == [pid]
    assert copies[0].origin is None or isinstance(copies[0].origin, Path)
    result = _read_checked(load_project, copies[0].path)  # what the editor reads next
    if not isinstance(result, ProfileBenchError):
        _valid_project(result)


def test_the_bounds_catch_a_slow_reader_and_a_changed_file(tmp_path, monkeypatch):
    # the helper itself: a reader over the time bound, or one that writes, fails the check
    path = tmp_path / "p.json"
    path.write_bytes(b"{}")
    monkeypatch.setitem(globals(), "SECONDS", 0.05)
    with pytest.raises(AssertionError):
        _read_checked(lambda p: time.sleep(0.1), path)
    monkeypatch.undo()
    with pytest.raises(AssertionError):
        _read_checked(lambda p: p.write_bytes(b"[]"), path)
