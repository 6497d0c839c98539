"""No save loses work or damages a file: links are written through, a killed writer's temporary
files are cleaned at the next save, recovery copies survive whatever else lies in their folder,
and background children never import a module from the current folder."""

from __future__ import annotations

import dataclasses
import os
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest

from profilebench import load_project, save_project
from profilebench.editor import Document, recovery
from profilebench.errors import ProjectFileError
from profilebench.gui.child_process import ChildProcess, import_modules
from profilebench.io.atomic import FRESH_TMP_SECONDS
from profilebench.io.samples import default_sample_path

from reliability_helpers import kill_while_saving
from test_saves_and_security import CHILD as SAVING_LOOP


@pytest.fixture
def base():
    return load_project(default_sample_path())


def _newer(project, text="a newer version"):
    return dataclasses.replace(project, notes=text)


def _age(paths, seconds=FRESH_TMP_SECONDS + 10):
    """Date files back, as a save a few seconds later finds them (a younger temporary file may
    be one a live writer has just created and not yet locked)."""
    then = time.time() - seconds
    for p in paths:
        os.utime(p, (then, then))


# --- links --------------------------------------------------------------------------------------


def test_a_save_onto_a_symlink_writes_its_target_and_keeps_the_link(tmp_path, base):
    real = tmp_path / "real" / "p.json"
    real.parent.mkdir()
    save_project(base, real)
    link = tmp_path / "p.json"
    link.symlink_to(real)
    save_project(_newer(base), link)
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert load_project(real).notes == "a newer version"
    assert sorted(p.name for p in real.parent.iterdir()) == ["p.json"]  # no temporary left


def test_a_save_onto_a_link_to_a_file_not_yet_written_creates_it(tmp_path, base):
    link = tmp_path / "p.json"
    link.symlink_to(tmp_path / "new.json")
    save_project(base, link)
    assert link.is_symlink() and load_project(tmp_path / "new.json") == base


def test_a_save_onto_a_link_loop_is_refused(tmp_path, base):
    a, b = tmp_path / "a.json", tmp_path / "b.json"
    a.symlink_to(b)
    b.symlink_to(a)
    with pytest.raises(ProjectFileError, match="loops"):
        save_project(base, a)


def test_a_save_onto_a_hard_link_updates_every_link(tmp_path, base):
    first = tmp_path / "p.json"
    save_project(base, first)
    second = tmp_path / "shared" / "same.json"
    second.parent.mkdir()
    os.link(first, second)
    inode = first.stat().st_ino
    save_project(_newer(base), second)
    assert first.stat().st_ino == second.stat().st_ino == inode and first.stat().st_nlink == 2
    assert load_project(first).notes == load_project(second).notes == "a newer version"
    assert not [p for p in tmp_path.rglob("*.tmp")]


# --- temporary files of a killed writer ---------------------------------------------------------


def _killed_while_saving(target: Path, delay: float):
    kill_while_saving(SAVING_LOOP, default_sample_path(), target, delay)


def test_temporaries_of_a_killed_writer_are_removed_at_the_next_save(tmp_path, base):
    target = tmp_path / "project.json"
    left = 0
    for delay in (0.05, 0.1, 0.15, 0.2, 0.25, 0.3):
        _killed_while_saving(target, delay)
        left += len(list(tmp_path.glob(".project.json.*.tmp")))
    # hand-made ones too, so that the cleaning is tested whatever the kills left
    for name in (".project.json.abcdefgh.tmp", ".project.json.zz_9zz_9.tmp"):
        (tmp_path / name).write_text("half a project")
    other = tmp_path / ".other.json.abcdefgh.tmp"  # another file's: not touched
    other.write_text("x")
    _age(tmp_path.glob(".*.tmp"))
    save_project(base, target)
    assert not list(tmp_path.glob(".project.json.*.tmp")), f"{left} left by the kills"
    assert other.exists() and load_project(target) == base


def test_a_temporary_of_a_save_in_progress_or_just_created_is_kept(tmp_path, base):
    fcntl = pytest.importorskip("fcntl")
    busy = tmp_path / ".p.json.inprogrs.tmp"
    fd = os.open(busy, os.O_CREAT | os.O_WRONLY)
    fcntl.flock(fd, fcntl.LOCK_EX)  # as a live writer holds its temporary file
    _age([busy])  # old, but locked: a long save in progress
    try:
        # a second process tries to clean it: the lock is another open file description's
        save_project(base, tmp_path / "p.json")
        assert busy.exists()
    finally:
        os.close(fd)
    save_project(base, tmp_path / "p.json")  # the writer is gone: now it is stale
    assert not busy.exists()
    fresh = tmp_path / ".p.json.justmade.tmp"  # created a moment ago, not locked yet
    fresh.write_text("")
    save_project(base, tmp_path / "p.json")
    assert fresh.exists()


def test_a_name_near_the_file_system_limit_still_saves(tmp_path, base):
    target = tmp_path / ("n" * 245 + ".json")  # 250 bytes: the temporary's name is shortened
    save_project(base, target)
    assert load_project(target) == base


# --- recovery folders ---------------------------------------------------------------------------

DEAD_PIDS = (999_999_001, 999_999_002)  # above Linux's largest pid (2**22): never running


def _copy(folder: Path, pid: int, data: bytes | None, mtime: float, origin: bytes | None = None):
    path = folder / f"recovery-{pid}.json"
    if data is not None:
        path.write_bytes(data)
        os.utime(path, (mtime, mtime))
    if origin is not None:
        path.with_suffix(".origin").write_bytes(origin)
    return path


def test_a_corrupt_newest_copy_does_not_hide_an_older_good_one(tmp_path):
    good = Path(default_sample_path()).read_bytes()
    old, new = DEAD_PIDS
    _copy(tmp_path, old, good, time.time() - 100)
    _copy(tmp_path, new, good[: len(good) // 2], time.time())  # truncated by a crash
    copies = recovery.left_behind(tmp_path)
    assert [c.pid for c in copies] == [new, old]  # newest first
    aside = recovery.set_aside(tmp_path, copies[0])
    assert aside.name == f"damaged-{new}.json" and aside.read_bytes() == good[: len(good) // 2]
    assert [c.pid for c in recovery.left_behind(tmp_path)] == [old]


def test_a_sidecar_that_is_not_utf8_is_read_as_the_path_it_names(tmp_path):
    good = Path(default_sample_path()).read_bytes()
    origin = b"/home/k\xe9strel/van.json"  # Latin-1 bytes of a path
    _copy(tmp_path, DEAD_PIDS[0], good, time.time(), origin=origin)
    (copy,) = recovery.left_behind(tmp_path)
    assert os.fsencode(copy.origin) == origin


def test_a_non_utf8_origin_round_trips_through_write_recovery(tmp_path, base):
    # a name that is not UTF-8 (surrogateescape on POSIX), inside the test's own folder
    origin = os.path.join(str(tmp_path), os.fsdecode(b"k\xe9strel.json"))
    doc = Document(base.profile, base.conditions, path=origin)
    recovery.write_recovery(tmp_path, doc)
    sidecar = recovery.recovery_file(tmp_path).with_suffix(".origin")
    assert sidecar.read_bytes() == os.fsencode(str(Path(origin).resolve()))
    recovery.remove_recovery(tmp_path)


def test_links_that_lead_nowhere_and_odd_names_are_skipped(tmp_path):
    good = Path(default_sample_path()).read_bytes()
    _copy(tmp_path, DEAD_PIDS[0], good, time.time())
    (tmp_path / f"recovery-{DEAD_PIDS[1]}.json").symlink_to(tmp_path / "gone.json")
    (tmp_path / "recovery-99999999999999999999999.json").write_bytes(good)  # no such pid
    (tmp_path / "recovery-x.json").write_bytes(good)
    (tmp_path / "recovery-5.json").mkdir()
    assert [c.pid for c in recovery.left_behind(tmp_path)] == [DEAD_PIDS[0]]


def test_a_file_in_place_of_the_recovery_folder_is_reported(tmp_path, base):
    folder = tmp_path / "recovery"
    folder.write_text("a file, not a folder")  # fails for root too (no permission bits)
    doc = Document(base.profile, base.conditions)
    with pytest.raises(ProjectFileError, match="recovery folder"):
        recovery.write_recovery(folder, doc)
    assert recovery.left_behind(folder) == []


# --- children: an isolated import path ----------------------------------------------------------


def test_a_child_never_imports_a_module_from_the_current_folder(tmp_path, monkeypatch):
    marker = tmp_path / "executed"
    (tmp_path / "numpy.py").write_text(f"open({str(marker)!r}, 'w').close()\n")
    monkeypatch.chdir(tmp_path)
    monkeypatch.setattr(sys, "path", ["", *sys.path])  # as a parent started from that folder
    child = ChildProcess()
    done, got = threading.Event(), []
    try:
        child.submit(
            import_modules,
            ("numpy",),
            lambda ok, payload, s: (got.append((ok, payload)), done.set()),
        )
        assert done.wait(60), "the child gave no answer within 60 s"
    finally:
        child.close()
    assert got[0][0] is True, got[0][1]
    assert not marker.exists()


def test_an_image_saved_onto_a_link_writes_its_target_and_cleans_stale_temporaries(tmp_path):
    from matplotlib.figure import Figure

    from profilebench.plotting.review import save_figure

    real = tmp_path / "real.png"
    link = tmp_path / "view.png"
    link.symlink_to(real)
    stale = tmp_path / ".real.png.abcdefgh.tmp"  # left by a killed export of that file
    stale.write_bytes(b"half an image")
    _age([stale])
    fig = Figure(figsize=(1, 1))
    fig.add_subplot().plot([0, 1], [0, 1])
    save_figure(fig, link)
    assert link.is_symlink() and real.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature
    assert not stale.exists()


def test_a_recovery_folder_name_no_folder_can_have_is_reported(base, tmp_path):
    doc = Document(base.profile, base.conditions)
    bad = str(tmp_path) + "/re\0covery"  # a NUL, as a bad setting may hold
    with pytest.raises(ProjectFileError, match="recovery folder"):
        recovery.write_recovery(bad, doc)
    assert recovery.left_behind(bad) == []
    assert recovery.remove_recovery(bad) is False


CONCURRENT = """
import dataclasses, sys, time
from profilebench import load_project, save_project
base = dataclasses.replace(load_project(sys.argv[1]), notes="x" * 100000)
t0, errors = time.monotonic(), 0
while time.monotonic() - t0 < float(sys.argv[3]):
    try:
        save_project(base, sys.argv[2])
    except Exception as exc:
        errors += 1
        print(type(exc).__name__, exc, flush=True)
print("errors", errors)
"""


def test_two_processes_saving_one_file_never_take_each_other_for_stale(tmp_path):
    # the cleaner must leave a live writer's temporary file alone, even one just created
    target = tmp_path / "p.json"
    args = [sys.executable, "-c", CONCURRENT, str(default_sample_path()), str(target), "2.0"]
    procs = [subprocess.Popen(args, stdout=subprocess.PIPE, text=True) for _ in range(2)]
    outs = [p.communicate(timeout=60)[0] for p in procs]
    assert all(out.strip().endswith("errors 0") for out in outs), outs
    assert load_project(target).notes == "x" * 100000
