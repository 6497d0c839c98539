"""Nothing lost, nothing executed: atomic project saves under SIGKILL, failed saves, data-only
project files, underlay paths kept inside the project folder, exports written only where asked."""

from __future__ import annotations

import json
import os
import pickle
import textwrap
from pathlib import Path

import pytest

import profilebench.io.atomic as atomic
from profilebench import load_project, save_project
from profilebench.cli import main
from profilebench.errors import ProjectFileError
from profilebench.io import Project, Underlay, resolve_underlay
from profilebench.io.samples import default_sample_path

from reliability_helpers import kill_while_saving, write_json

CHILD = textwrap.dedent("""
    import sys, dataclasses
    from profilebench import load_project, save_project
    base = load_project(sys.argv[1])
    target = sys.argv[2]
    k = 0
    while True:
        # version k: notes carry k and a large padding so each write takes a while
        save_project(dataclasses.replace(base, notes=f"version {k} " + "x" * 400000), target)
        k += 1
""")


@pytest.mark.parametrize("delay", [0.15, 0.3, 0.45, 0.6])
def test_sigkill_during_saves_leaves_a_complete_project(tmp_path, delay):
    target = tmp_path / "project.json"
    base = load_project(default_sample_path())
    kill_while_saving(CHILD, default_sample_path(), target, delay)
    assert target.exists()
    loaded = load_project(target)
    # the file equals one of the saved versions: the base project with notes "version k xxx..."
    head, pad = loaded.notes.split(" ", 2)[:2], loaded.notes.split(" ", 2)[2]
    assert head[0] == "version" and head[1].isdigit() and pad == "x" * 400000
    assert loaded.profile == base.profile and loaded.conditions == base.conditions
    others = [p for p in tmp_path.iterdir() if p != target]
    assert len(others) <= 1  # at most the one temporary file being written when killed
    for p in others:
        assert p.name.startswith(".project.json.") and p.name.endswith(".tmp")
        assert load_project(target) == loaded  # the stray file does not affect loading


def _fail_fsync(fd):
    raise OSError(28, "No space left on device")


def test_failed_save_raises_and_keeps_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "project.json"
    old = load_project(default_sample_path())
    save_project(old, target)
    before = target.read_bytes()
    monkeypatch.setattr(atomic.os, "fsync", _fail_fsync)  # a full disk at the flush
    new = Project(old.profile, old.conditions, notes="a newer version")
    with pytest.raises(ProjectFileError) as info:
        save_project(new, target)
    assert "previous file" in str(info.value) and "disk space" in str(info.value)
    assert target.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["project.json"]  # no temporary file left


def test_save_into_a_missing_folder(tmp_path):
    with pytest.raises(ProjectFileError) as info:
        save_project(load_project(default_sample_path()), tmp_path / "nowhere" / "p.json")
    assert "does not exist" in str(info.value) and "create it" in str(info.value)


# --- project files are data only --------------------------------------------------------------


class _Payload:
    def __reduce__(self):
        return (os.system, (f"touch {MARKER}",))


MARKER = Path("/nonexistent")  # replaced per test


@pytest.mark.parametrize("protocol", [0, 2, pickle.HIGHEST_PROTOCOL])
def test_pickle_payload_is_refused(tmp_path, protocol):
    global MARKER
    MARKER = tmp_path / "executed"
    path = tmp_path / "p.json"
    path.write_bytes(pickle.dumps(_Payload(), protocol=protocol))
    with pytest.raises(ProjectFileError):
        load_project(path)
    assert not MARKER.exists()


@pytest.mark.parametrize("where", [(), ("profile",), ("profile", "nodes", 0), ("conditions",)])
def test_class_keys_are_refused(tmp_path, sample_dict, where):
    d = sample_dict
    for key in where:
        d = d[key]
    d["__class__"] = "os.system"
    with pytest.raises(ProjectFileError) as info:
        load_project(write_json(tmp_path, "p.json", sample_dict))
    assert "__class__" in str(info.value) and "unknown" in str(info.value)


def test_code_in_a_field_is_kept_as_data(tmp_path, sample_dict):
    marker = tmp_path / "executed"
    code = f"__import__('os').system('touch {marker}')"
    sample_dict["notes"] = code
    sample_dict["profile"]["name"] = code
    sample_dict["profile"]["nodes"][0]["label"] = code
    project = load_project(write_json(tmp_path, "p.json", sample_dict))
    assert project.notes == code and project.profile.name == code
    assert project.profile.nodes[0].label == code
    assert not marker.exists()


def test_code_in_a_conditions_field_is_refused(tmp_path, sample_dict):
    marker = tmp_path / "executed"
    sample_dict["conditions"]["transition"] = f"__import__('os').system('touch {marker}')"
    with pytest.raises(ProjectFileError) as info:
        load_project(write_json(tmp_path, "p.json", sample_dict))
    assert "conditions.transition" in str(info.value)
    assert not marker.exists()


@pytest.mark.parametrize(
    "text",
    ["[" * 200000 + "]" * 200000, '{"a": ' * 100000 + "1" + "}" * 100000],
    ids=["lists", "objects"],
)
def test_extremely_deep_nesting_is_refused(tmp_path, text):
    path = tmp_path / "p.json"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert "nested too deeply" in str(info.value)


# --- underlay paths ---------------------------------------------------------------------------


def _with_underlay(rel):
    base = load_project(default_sample_path())
    return Project(
        base.profile,
        base.conditions,
        underlay=Underlay(rel, ((0, 0), (100, 0)), ((0.0, 0.0), (1.0, 0.0))),
    )


@pytest.mark.parametrize("rel", ["img/photo.png", "./photo.png", "img\\photo.png"])
def test_underlay_inside_the_folder_resolves_relative_to_the_project(tmp_path, rel):
    project_path = tmp_path / "work" / "p.json"
    project_path.parent.mkdir()
    got = resolve_underlay(_with_underlay(rel), project_path)
    assert got.is_relative_to(project_path.parent.resolve())
    assert got.name == "photo.png"


@pytest.mark.parametrize(
    "rel",
    [
        "../photo.png",
        "img/../../photo.png",
        "/etc/passwd",
        "C:\\Windows\\photo.png",
        "\\\\server\\share\\photo.png",
        "..\\photo.png",
    ],
)
def test_underlay_outside_the_folder_is_refused(tmp_path, rel):
    with pytest.raises(ProjectFileError) as info:
        resolve_underlay(_with_underlay(rel), tmp_path / "p.json")
    assert info.value.path == "underlay.path"


def test_underlay_link_pointing_outside_is_refused(tmp_path):
    folder = tmp_path / "work"
    folder.mkdir()
    outside = tmp_path / "secret.png"
    outside.write_bytes(b"not an image")
    (folder / "photo.png").symlink_to(outside)
    with pytest.raises(ProjectFileError) as info:
        resolve_underlay(_with_underlay("photo.png"), folder / "p.json")
    assert "outside the project folder" in str(info.value)


def test_underlay_from_a_loaded_file_is_checked(tmp_path, sample_dict):
    sample_dict["underlay"] = {
        "path": "../../etc/passwd",
        "points_px": [[0, 0], [10, 0]],
        "points_m": [[0, 0], [1, 0]],
    }
    project_path = write_json(tmp_path, "p.json", sample_dict)
    project = load_project(project_path)  # loading is fine: the path is data
    with pytest.raises(ProjectFileError):
        resolve_underlay(project, project_path)


# --- exports go only where asked --------------------------------------------------------------


def _tree(root: Path):
    return sorted(str(p.relative_to(root)) for p in root.rglob("*"))


def test_exports_written_only_where_asked(tmp_path, monkeypatch, capsys):
    work, out = tmp_path / "cwd", tmp_path / "out"
    work.mkdir()
    out.mkdir()
    project = tmp_path / "p.json"
    project.write_bytes(Path(default_sample_path()).read_bytes())
    monkeypatch.chdir(work)
    before = _tree(tmp_path)
    code = main(
        [
            "analyse",
            str(project),
            "--csv",
            str(out / "s.csv"),
            "--json",
            str(out / "r.json"),
            "--panels",
            "120",
        ]
    )
    assert code == 0, capsys.readouterr().err
    after = _tree(tmp_path)
    assert sorted(set(after) - set(before)) == ["out/r.json", "out/s.csv"]
    json.loads((out / "r.json").read_text(encoding="utf-8"))  # complete JSON
