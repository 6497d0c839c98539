"""Project files: round trips, every kind of bad file, atomic save, underlay paths.

The reference for the checks here is the project format documented in profilebench.io.project
and the JSON standard (RFC 8259) as implemented by Python's json module.
"""

import json
import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import profilebench.io.project as project_module
from profilebench.assess.conditions import Conditions
from profilebench.errors import InputError, ProfileBenchError, ProjectFileError
from profilebench.geometry.profile import MAX_COORDINATE, Node, Profile
from profilebench.io import (
    FORMAT_VERSION,
    Project,
    Underlay,
    default_sample_path,
    load_project,
    project_to_dict,
    resolve_underlay,
    save_project,
    underlay_relative_path,
)


def _box(name="box"):
    return Profile(
        (
            Node(0.0, 0.1, 0.05, label="front lower"),
            Node(2.0, 0.1),
            Node(2.0, 0.6),
            Node(0.0, 0.6, 0.05, label="front upper"),
        ),
        name=name,
    )


def _project(**kw):
    base = dict(profile=_box(), conditions=Conditions(speed=25.0, width=1.0))
    base.update(kw)
    return Project(**base)


def _write_json(path, data):
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


# --------------------------------------------------------------------------- round trips
def test_full_project_round_trip(tmp_path):
    project = _project(
        baseline=_box("baseline").moved(1, 2.2, 0.1),
        underlay=Underlay("img/side.png", ((10, 20), (810, 20)), ((0.0, 0.0), (4.0, 0.0)), 0.4),
        notes="first try\nsecond line",
    )
    path = save_project(project, tmp_path / "p.json")
    assert load_project(path) == project
    data = json.loads(path.read_text())
    assert data["format"] == "profilebench-project" and data["version"] == FORMAT_VERSION
    assert data["units"] == "SI (m, m/s)"


def test_loading_never_modifies_the_file(tmp_path):
    path = save_project(_project(), tmp_path / "p.json")
    before = (path.read_bytes(), path.stat().st_mtime_ns)
    load_project(path)
    assert (path.read_bytes(), path.stat().st_mtime_ns) == before


# every coordinate a node may hold (profilebench.geometry.profile.MAX_COORDINATE)
finite = st.floats(
    min_value=-MAX_COORDINATE, max_value=MAX_COORDINATE, allow_nan=False, allow_infinity=False
)
radius = st.floats(min_value=0.0, max_value=10.0, allow_nan=False)


@st.composite
def nodes(draw):
    smooth = draw(st.booleans())
    return Node(
        draw(finite),
        draw(finite),
        0.0 if smooth else draw(radius),
        smooth,
        draw(st.text(max_size=12)),
    )


@st.composite
def profiles(draw):
    ns = draw(st.lists(nodes(), min_size=3, max_size=12))
    te = draw(st.one_of(st.none(), st.integers(0, len(ns) - 1)))
    return Profile(tuple(ns), name=draw(st.text(max_size=20)), trailing_edge=te)


@settings(
    max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(profile=profiles(), baseline=st.one_of(st.none(), profiles()), notes=st.text(max_size=40))
def test_random_projects_round_trip(tmp_path, profile, baseline, notes):
    # Exact float round trip: json writes repr(float), the shortest string that reads back to
    # the same double (Python float repr, IEEE 754 binary64).
    project = Project(profile, Conditions(), baseline, None, notes)
    path = save_project(project, tmp_path / "h.json")
    assert load_project(path) == project


# --------------------------------------------------------------------------- bad files
def _valid_dict():
    return project_to_dict(_project())


def _mutate(edit):
    d = _valid_dict()
    edit(d)
    return d


CORRUPT = {
    "wrong format name": (_mutate(lambda d: d.update(format="someone-elses-format")), "format"),
    "missing format": (_mutate(lambda d: d.pop("format")), "format"),
    "version 999": (_mutate(lambda d: d.update(version=999)), "version"),
    "version 0": (_mutate(lambda d: d.update(version=0)), "version"),
    "version as string": (_mutate(lambda d: d.update(version="1")), "version"),
    "missing profile": (_mutate(lambda d: d.pop("profile")), "profile"),
    "missing conditions": (_mutate(lambda d: d.pop("conditions")), "conditions"),
    "unknown top-level key": (_mutate(lambda d: d.update(extra=1)), "extra"),
    "wrong units": (_mutate(lambda d: d.update(units="mm")), "units"),
    "profile not an object": (_mutate(lambda d: d.update(profile=[1, 2])), "profile"),
    "nodes not a list": (_mutate(lambda d: d["profile"].update(nodes={})), "profile.nodes"),
    "too few nodes": (
        _mutate(lambda d: d["profile"]["nodes"].__delitem__(slice(2, None))),
        "profile.nodes",
    ),
    "radius a string": (
        _mutate(lambda d: d["profile"]["nodes"][3].update(radius="abc")),
        "profile.nodes[3].radius",
    ),
    "x a bool": (_mutate(lambda d: d["profile"]["nodes"][1].update(x=True)), "profile.nodes[1].x"),
    "y missing": (_mutate(lambda d: d["profile"]["nodes"][2].pop("y")), "profile.nodes[2].y"),
    "negative radius": (
        _mutate(lambda d: d["profile"]["nodes"][0].update(radius=-0.1)),
        "profile.nodes[0].radius",
    ),
    "smooth with radius": (
        _mutate(lambda d: d["profile"]["nodes"][0].update(smooth=True)),
        "profile.nodes[0]",
    ),
    "smooth a string": (
        _mutate(lambda d: d["profile"]["nodes"][1].update(smooth="yes")),
        "profile.nodes[1].smooth",
    ),
    "label a number": (
        _mutate(lambda d: d["profile"]["nodes"][1].update(label=5)),
        "profile.nodes[1].label",
    ),
    "misspelt node key": (
        _mutate(lambda d: d["profile"]["nodes"][1].update(raduis=0.1)),
        "profile.nodes[1].raduis",
    ),
    "node not an object": (
        _mutate(lambda d: d["profile"]["nodes"].__setitem__(2, [1, 2])),
        "profile.nodes[2]",
    ),
    "trailing edge out of range": (
        _mutate(lambda d: d["profile"].update(trailing_edge=4)),
        "profile.trailing_edge",
    ),
    "trailing edge a float": (
        _mutate(lambda d: d["profile"].update(trailing_edge=1.0)),
        "profile.trailing_edge",
    ),
    "name a number": (_mutate(lambda d: d["profile"].update(name=3)), "profile.name"),
    "bad speed": (_mutate(lambda d: d["conditions"].update(speed=-5.0)), "conditions.speed"),
    "unknown conditions key": (
        _mutate(lambda d: d["conditions"].update(sped=5.0)),
        "conditions.sped",
    ),
    "conditions a list": (_mutate(lambda d: d.update(conditions=[])), "conditions"),
    "bad baseline node": (
        _mutate(
            lambda d: d.update(baseline={"nodes": [{"x": 0, "y": 1}] * 2 + [{"x": "a", "y": 1}]})
        ),
        "baseline.nodes[2].x",
    ),
    "underlay opacity 2": (
        _mutate(
            lambda d: d.update(
                underlay={
                    "path": "a.png",
                    "points_px": [[0, 0], [1, 0]],
                    "points_m": [[0, 0], [1, 0]],
                    "opacity": 2.0,
                }
            )
        ),
        "underlay.opacity",
    ),
    "underlay one point": (
        _mutate(
            lambda d: d.update(
                underlay={"path": "a.png", "points_px": [[0, 0]], "points_m": [[0, 0], [1, 0]]}
            )
        ),
        "underlay.points_px",
    ),
    "underlay same points": (
        _mutate(
            lambda d: d.update(
                underlay={
                    "path": "a.png",
                    "points_px": [[0, 0], [1, 0]],
                    "points_m": [[1, 0], [1, 0]],
                }
            )
        ),
        "underlay.points_m",
    ),
    "underlay pixel not number": (
        _mutate(
            lambda d: d.update(
                underlay={
                    "path": "a.png",
                    "points_px": [[0, "q"], [1, 0]],
                    "points_m": [[0, 0], [1, 0]],
                }
            )
        ),
        "underlay.points_px[0][1]",
    ),
    "notes a list": (_mutate(lambda d: d.update(notes=["a"])), "notes"),
    "top level a list": ([1, 2, 3], "(top level)"),
}


@pytest.mark.parametrize("case", sorted(CORRUPT))
def test_bad_field_is_named_and_file_untouched(tmp_path, case):
    data, field = CORRUPT[case]
    path = _write_json(tmp_path / "bad.json", data)
    before = path.read_bytes()
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert info.value.path == field
    assert str(info.value).startswith(field + ":")
    assert path.read_bytes() == before


def test_message_example_from_the_format(tmp_path):
    data = _mutate(lambda d: d["profile"]["nodes"][3].update(radius="abc"))
    path = _write_json(tmp_path / "bad.json", data)
    with pytest.raises(
        ProjectFileError,
        match=r'profile\.nodes\[3\]\.radius: expected a number in metres, got "abc"',
    ):
        load_project(path)


def test_newer_version_says_upgrade(tmp_path):
    path = _write_json(tmp_path / "new.json", _mutate(lambda d: d.update(version=999)))
    with pytest.raises(ProjectFileError, match="newer profilebench.*upgrade"):
        load_project(path)


@pytest.mark.parametrize("text", ["NaN", "Infinity", "-Infinity", "1e400"])
def test_non_finite_numbers_are_named(tmp_path, text):
    # NaN/Infinity are not JSON (RFC 8259 section 6); 1e400 overflows a binary64 to inf.
    good = json.dumps(_valid_dict())
    bad = good.replace('"x": 2.0', f'"x": {text}', 1)
    assert bad != good
    path = tmp_path / "nan.json"
    path.write_text(bad)
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert info.value.path == "profile.nodes[1].x"


RAW_BAD = {
    "empty": (b"", "empty"),
    "whitespace only": (b"  \n\n", "empty"),
    "not json": (b"hello, this is a text file", "not valid JSON"),
    "truncated": (None, "truncated"),
    "not utf-8": (b'{"format": "\xff\xfe"}', "UTF-8"),
    "duplicate key": (b'{"format": "a", "format": "b"}', "duplicate key"),
    "deep nesting": (b"[" * 100000 + b"]" * 100000, "nested too deeply"),
}


@pytest.mark.parametrize("case", sorted(RAW_BAD))
def test_unreadable_files(tmp_path, case):
    content, words = RAW_BAD[case]
    if content is None:
        full = json.dumps(_valid_dict(), indent=2).encode()
        content = full[: len(full) // 2]
    path = tmp_path / "x.json"
    path.write_bytes(content)
    with pytest.raises(ProjectFileError, match=words):
        load_project(path)
    assert path.read_bytes() == content


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(ProjectFileError, match="no project file"):
        load_project(tmp_path / "nope.json")
    with pytest.raises(ProjectFileError, match="is a folder"):
        load_project(tmp_path)


def test_huge_file_is_refused_before_reading(tmp_path, monkeypatch):
    path = tmp_path / "huge.json"
    with open(path, "wb") as fh:  # sparse file just over the limit
        fh.truncate(project_module.MAX_PROJECT_BYTES + 1)
    opened = []
    real_open = open

    def spy(*args, **kw):
        opened.append(args[0])
        return real_open(*args, **kw)

    monkeypatch.setattr("builtins.open", spy)
    with pytest.raises(ProjectFileError, match="MiB limit"):
        load_project(path)
    assert Path(path) not in [Path(p) for p in opened if isinstance(p, (str, os.PathLike))]


def test_errors_are_profilebench_errors():
    assert issubclass(ProjectFileError, ProfileBenchError)


# --------------------------------------------------------------------------- atomic save
@pytest.mark.parametrize("target", ["json.dump", "os.replace", "os.fsync"])
def test_failed_save_keeps_previous_file_and_leaves_no_temp(tmp_path, monkeypatch, target):
    path = save_project(_project(notes="old"), tmp_path / "p.json")
    before = path.read_bytes()

    def half_then_fail(obj, fh, **kw):
        fh.write('{"format": "profilebench-project", "vers')  # a half-written file
        raise OSError(28, "No space left on device")

    def fail(*args, **kw):
        raise OSError(5, "I/O error")

    if target == "json.dump":
        monkeypatch.setattr(project_module.json, "dump", half_then_fail)
    elif target == "os.replace":
        monkeypatch.setattr("profilebench.io.atomic.os.replace", fail)
    else:
        monkeypatch.setattr("profilebench.io.atomic.os.fsync", fail)
    with pytest.raises(ProjectFileError, match="previous file"):
        save_project(_project(notes="new"), path)
    monkeypatch.undo()
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["p.json"]
    assert load_project(path).notes == "old"


def test_save_into_missing_folder_or_onto_a_folder(tmp_path):
    with pytest.raises(ProjectFileError, match="does not exist"):
        save_project(_project(), tmp_path / "no" / "p.json")
    with pytest.raises(ProjectFileError, match="is a folder"):
        save_project(_project(), tmp_path)


def test_save_keeps_permissions_of_replaced_file(tmp_path):
    path = save_project(_project(), tmp_path / "p.json")
    os.chmod(path, 0o640)
    save_project(_project(notes="again"), path)
    assert (path.stat().st_mode & 0o777) == 0o640


def test_project_rejects_wrong_types():
    with pytest.raises(InputError):
        Project(profile="not a profile", conditions=Conditions())
    with pytest.raises(InputError):
        Project(profile=_box(), conditions={"speed": 30})
    with pytest.raises(InputError):
        Underlay("a.png", ((0, 0), (1, 0)), ((0, 0), (1, 0)), opacity=1.5)


# --------------------------------------------------------------------------- underlay paths
def _with_underlay(rel):
    return _project(underlay=Underlay(rel, ((0, 0), (100, 0)), ((0, 0), (1, 0)), 0.5))


def test_underlay_resolves_inside_project_folder(tmp_path):
    (tmp_path / "img").mkdir()
    project_path = tmp_path / "p.json"
    image = tmp_path / "img" / "side.png"
    rel = underlay_relative_path(image, project_path)
    assert rel == "img/side.png"
    assert resolve_underlay(_with_underlay(rel), project_path) == image.resolve()
    assert resolve_underlay(_project(), project_path) is None


@pytest.mark.parametrize(
    "rel",
    ["../secret.png", "img/../../x.png", "/etc/passwd", "C:\\images\\side.png", "..\\x.png", "."],
)
def test_underlay_escaping_or_absolute_is_refused(tmp_path, rel):
    with pytest.raises(ProjectFileError) as info:
        resolve_underlay(_with_underlay(rel), tmp_path / "p.json")
    assert info.value.path == "underlay.path"


def test_underlay_link_pointing_outside_is_refused(tmp_path):
    inner = tmp_path / "proj"
    inner.mkdir()
    (tmp_path / "outside.png").write_bytes(b"x")
    (inner / "link.png").symlink_to(tmp_path / "outside.png")
    with pytest.raises(ProjectFileError, match="outside the project folder"):
        resolve_underlay(_with_underlay("link.png"), inner / "p.json")


def test_relative_path_of_image_outside_folder_is_refused(tmp_path):
    (tmp_path / "proj").mkdir()
    with pytest.raises(ProjectFileError, match="not inside the project folder"):
        underlay_relative_path(tmp_path / "other.png", tmp_path / "proj" / "p.json")


def test_default_sample_loads():
    assert isinstance(load_project(default_sample_path()).profile, Profile)


def test_base_model_is_saved_and_a_file_without_it_loads_with_the_constant(tmp_path):
    # files written before the base-pressure model existed have no base_model key
    old = project_to_dict(_project())
    del old["conditions"]["base_model"]
    loaded = load_project(_write_json(tmp_path / "old.json", old))
    assert loaded.conditions.base_model == "constant"
    assert loaded.conditions == _project().conditions
    new = _project(conditions=Conditions(speed=25.0, width=1.0, base_model="body"))
    save_project(new, tmp_path / "new.json")
    assert load_project(tmp_path / "new.json").conditions.base_model == "body"
