"""Nothing lost: recovery copies survive a SIGKILL and are offered back; failed saves keep the work."""

import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from profilebench.editor import commands
from profilebench.io import default_sample_path, load_project

from gui_helpers import ANALYSIS_TIMEOUT_MS

CHILD = textwrap.dedent("""
    import os, sys, time
    os.environ["QT_QPA_PLATFORM"] = "offscreen"
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication
    from profilebench.editor import commands
    from profilebench.gui.main_window import MainWindow
    app = QApplication(["child"])
    folder = sys.argv[1]
    w = MainWindow(settings=QSettings(os.path.join(folder, "s.ini"), QSettings.IniFormat),
                   recovery_dir=os.path.join(folder, "recovery"))
    w.show()
    node = max(range(len(w.document.profile)), key=lambda i: w.document.profile.nodes[i].y)
    n = w.document.profile.nodes[node]
    w.push(commands.move_node(w.document.state, node, n.x + 0.0123, n.y + 0.0045))
    print(node, flush=True)
    while True:                     # the edit is never saved; the parent kills this process
        app.processEvents()
        time.sleep(0.01)
""")


def _expected_edit(node):
    # the same edit made in this process on the same sample
    prof = load_project(default_sample_path()).profile
    n = prof.nodes[node]
    return prof.moved(node, n.x + 0.0123, n.y + 0.0045)


def test_killed_editor_leaves_a_copy_that_a_new_window_restores_exactly(qtbot, settings, tmp_path):
    env = dict(os.environ, PROFILEBENCH_AUTOSAVE_MS="500")
    child = subprocess.Popen(
        [sys.executable, "-c", CHILD, str(tmp_path)], stdout=subprocess.PIPE, env=env, text=True
    )
    try:
        node = int(child.stdout.readline())
        copy = tmp_path / "recovery" / f"recovery-{child.pid}.json"
        deadline = time.monotonic() + 20
        while not copy.exists() and time.monotonic() < deadline:
            time.sleep(0.05)
        assert copy.exists(), "the child wrote no recovery copy within 20 s"
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait(10)
        child.stdout.close()
    assert child.returncode == -signal.SIGKILL

    from profilebench.gui.main_window import MainWindow

    w = MainWindow(settings=settings, recovery_dir=tmp_path / "recovery")
    offered = []
    w.ask_recover = lambda c: offered.append(c) or True
    w.ask_unsaved = lambda: "discard"
    qtbot.addWidget(w)
    qtbot.waitUntil(lambda: bool(offered), timeout=5000)
    assert offered[0].pid == child.pid
    assert w.document.profile == _expected_edit(node)  # exact, field by field
    assert w.document.dirty and w.windowTitle().split(" —")[0].endswith("*")
    assert not copy.exists()  # taken over by this process
    for r in (w.runner, w.baseline_runner, w.search_runner):
        r.wait(ANALYSIS_TIMEOUT_MS)


def test_save_and_clean_close_delete_the_recovery_copy(window, tmp_path):
    w = window
    node = 0
    n = w.document.profile.nodes[node]
    w.push(commands.move_node(w.document.state, node, n.x, n.y + 0.002))
    assert w.autosave()
    mine = tmp_path / "recovery" / f"recovery-{os.getpid()}.json"
    assert mine.exists()
    assert load_project(mine).profile == w.document.profile
    assert w.save_to(tmp_path / "saved.json")
    assert not mine.exists() and not w.document.dirty
    w.push(commands.move_node(w.document.state, node, n.x, n.y + 0.004))
    assert w.autosave() and mine.exists()
    w.ask_unsaved = lambda: "discard"
    assert w.close()
    assert not mine.exists()


def _failing_targets(tmp_path):
    """A folder no file can be created in, for any user: root ignores permission bits, so as
    root the kernel's sysfs (which refuses new files to everyone) stands in."""
    if os.geteuid() == 0:
        if not os.path.isdir("/sys"):
            pytest.skip("no folder that refuses root here")
        return Path("/sys")
    ro = tmp_path / "read_only"
    ro.mkdir()
    ro.chmod(0o500)
    return ro


@pytest.mark.parametrize("where", ["missing_parent", "parent_is_a_file", "read_only"])
def test_failed_save_tells_the_user_and_keeps_the_document_dirty(window, tmp_path, where):
    w = window
    n = w.document.profile.nodes[0]
    w.push(commands.move_node(w.document.state, 0, n.x, n.y + 0.003))
    if where == "missing_parent":
        target = tmp_path / "no_such_folder" / "p.json"
    elif where == "parent_is_a_file":
        (tmp_path / "a_file").write_text("x")
        target = tmp_path / "a_file" / "p.json"
    else:
        target = _failing_targets(tmp_path) / "p.json"
    assert not w.save_to(target)
    assert w.document.dirty and w.document.path is None
    assert w.statusBar().currentMessage().startswith("NOT SAVED")
    assert w.errors_reported and w.errors_reported[-1][0] == "Not saved"
    assert not target.exists()
