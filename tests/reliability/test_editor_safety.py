"""The editor never loses work and never starts broken: a bad file at start-up opens the default
profile and says why, bad environment values fall back to the default and say so, a failed save
keeps the window open, an autosave that cannot be written is reported, an unreadable recovery
copy does not hide a good one, and an underlay that is a pipe is refused instead of freezing."""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import QSettings, QStandardPaths  # noqa: E402

from profilebench.editor import commands, recovery  # noqa: E402
from profilebench.io import load_project  # noqa: E402
from profilebench.io.samples import default_sample_path  # noqa: E402

from reliability_helpers import write_json  # noqa: E402

QStandardPaths.setTestModeEnabled(True)  # never the user's real data folder
WAIT_MS = 30000


@pytest.fixture
def make_window(qtbot, tmp_path):
    """A main window (settings in the test folder) whose dialogs are recorded, not shown."""
    made = []

    def make(path=None, recovery_dir=None, **kw):
        from profilebench.gui.main_window import MainWindow

        settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
        w = MainWindow(
            path, settings=settings, recovery_dir=recovery_dir or tmp_path / "recovery", **kw
        )
        w.ask_recover = lambda copy: True
        w.errors_reported = []
        w.report_error = lambda title, text: w.errors_reported.append((title, text))
        w.ask_unsaved = lambda: "discard"
        qtbot.addWidget(w)
        made.append(w)
        qtbot.wait(50)  # the deferred start-up reports and the recovery offer run
        return w

    yield make
    for w in made:
        for r in (w.runner, w.baseline_runner, w.search_runner):
            r.wait(WAIT_MS)


def _sample_profile():
    return load_project(default_sample_path()).profile


# --- start-up ---------------------------------------------------------------------------------


def _truncated(tmp_path):
    path = tmp_path / "trunc.json"
    text = Path(default_sample_path()).read_text(encoding="utf-8")
    path.write_text(text[: len(text) // 2], encoding="utf-8")
    return path


def _huge_integer(tmp_path, sample_dict):
    sample_dict["profile"]["nodes"][0]["x"] = 12345.5
    path = write_json(tmp_path, "huge.json", sample_dict)
    path.write_text(path.read_text().replace("12345.5", "9" * 5000), encoding="utf-8")
    return path


def _underlay_nul(tmp_path, sample_dict):
    sample_dict["underlay"] = {
        "path": "photo\u0000.png",
        "points_px": [[0, 0], [100, 0]],
        "points_m": [[0, 0], [1, 0]],
    }
    return write_json(tmp_path, "nul.json", sample_dict)


@pytest.mark.parametrize(
    "make, reason",
    [
        (_truncated, "truncated"),
        (_huge_integer, "5000 digits"),
        (_underlay_nul, "control character"),
    ],
    ids=["truncated", "huge-integer", "underlay-nul"],
)
def test_a_bad_file_at_start_up_opens_the_default_profile_and_says_why(
    make_window, tmp_path, sample_dict, make, reason
):
    path = make(tmp_path, sample_dict) if make is not _truncated else make(tmp_path)
    w = make_window(path)
    assert w.document is not None and w.document.path is None
    assert w.document.profile == _sample_profile()
    assert w.errors_reported and reason in w.errors_reported[0][1]
    assert str(path) in w.errors_reported[0][1]
    # what used to raise AttributeError with no document
    w.select_node(0)
    w.toggle_smooth()
    w.delete_selected()
    assert w.save_to(tmp_path / "saved.json")


@pytest.mark.parametrize("value", ["abc", "1e30", "nan", "-5", "inf"])
def test_a_bad_autosave_interval_in_the_environment_falls_back_and_says_so(
    make_window, monkeypatch, value
):
    from profilebench.editor.recovery import AUTOSAVE_ENV, AUTOSAVE_MS

    monkeypatch.setenv(AUTOSAVE_ENV, value)
    w = make_window()
    assert w.autosave_ms == AUTOSAVE_MS
    assert w.errors_reported and AUTOSAVE_ENV in w.errors_reported[0][1]


def test_an_underlay_that_is_a_pipe_is_refused_at_open_and_at_load_without_freezing(
    tmp_path, sample_dict
):
    os.mkfifo(tmp_path / "photo.png")
    sample_dict["underlay"] = {
        "path": "photo.png",
        "points_px": [[0, 0], [100, 0]],
        "points_m": [[0, 0], [1, 0]],
    }
    project = write_json(tmp_path, "p.json", sample_dict)
    code = textwrap.dedent(f"""
        import os, sys
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
        from PySide6.QtCore import QSettings, QStandardPaths
        from PySide6.QtWidgets import QApplication
        QStandardPaths.setTestModeEnabled(True)
        app = QApplication(["t"])
        from profilebench.gui.main_window import MainWindow
        w = MainWindow({str(project)!r}, recovery_dir={str(tmp_path / "rec")!r},
                       settings=QSettings({str(tmp_path / "s.ini")!r}, QSettings.IniFormat))
        print("OPENED", w.document.path, "|", " ".join(w.startup_problems), flush=True)
        print("LOADED", w.load_underlay({str(tmp_path / "photo.png")!r}), w.last_message, flush=True)
        w.shutdown(10000)
        os._exit(0)
    """)
    # a child process: a reader that waits for the pipe's writer must not hang the suite
    t0 = time.monotonic()
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert "OPENED None |" in done.stdout, done.stderr[-2000:]
    assert "not a regular file" in done.stdout.split("LOADED")[0]
    assert "LOADED False" in done.stdout and "not a regular file" in done.stdout.split("LOADED")[1]
    assert time.monotonic() - t0 < 120


# --- saving and closing -----------------------------------------------------------------------


def _edit(w):
    n = w.document.profile.nodes[0]
    w.push(commands.move_node(w.document.state, 0, n.x, n.y + 0.003))
    assert w.document.dirty


def test_close_then_a_failed_save_keeps_the_window_open(make_window, tmp_path):
    w = make_window()
    w.show()
    _edit(w)
    w.document.path = Path("/sys/profilebench-test.json")  # sysfs refuses new files, even to root
    w.ask_unsaved = lambda: "save"
    assert not w.close()
    assert w.isVisible() and w.document.dirty
    assert any(title == "Not saved" for title, _ in w.errors_reported)
    w.ask_unsaved = lambda: "discard"


def test_an_autosave_folder_that_cannot_be_written_is_reported_once(make_window, tmp_path):
    folder = tmp_path / "recovery"
    folder.write_text("a file where the folder should be")  # refuses root as well
    w = make_window(recovery_dir=folder)
    _edit(w)
    assert not w.autosave()
    reported = [t for t, _ in w.errors_reported if t == "Recovery copy not written"]
    assert len(reported) == 1 and str(folder) in w.autosave_error
    _edit(w)
    assert not w.autosave()  # the same failure: not again
    assert len([t for t, _ in w.errors_reported if t == "Recovery copy not written"]) == 1


# --- recovery ---------------------------------------------------------------------------------

DEAD_PIDS = (999_999_011, 999_999_012)  # above Linux's largest pid (2**22): never running


def test_a_corrupt_newest_recovery_copy_is_set_aside_and_the_older_one_restored(
    make_window, tmp_path
):
    folder = tmp_path / "recovery"
    folder.mkdir()
    good = Path(default_sample_path()).read_bytes()
    old, new = (folder / f"recovery-{pid}.json" for pid in DEAD_PIDS)
    old.write_bytes(good)
    os.utime(old, (time.time() - 100, time.time() - 100))
    new.write_bytes(good[: len(good) // 3])
    new.with_suffix(".origin").write_bytes(b"/home/k\xe9strel/p.json")  # not UTF-8
    w = make_window(recovery_dir=folder)
    assert w.document.dirty and w.document.profile == _sample_profile()  # the older copy
    assert (folder / f"damaged-{DEAD_PIDS[1]}.json").exists()
    assert not old.exists() and not new.exists()
    assert recovery.left_behind(folder) == []  # nothing offered next time


@pytest.mark.parametrize("name", ["view.png", "surface.csv"])
def test_an_export_into_a_folder_that_refuses_files_says_so(make_window, qtbot, name):
    w = make_window()
    qtbot.waitUntil(lambda: w.results_current, timeout=WAIT_MS)
    target = f"/sys/{name}"  # sysfs refuses new files, even to root
    export = w.export_image if name.endswith(".png") else w.export_surface_csv
    assert export(target) is False
    assert w.last_message.startswith("export failed") and "/sys" in w.last_message
