"""The menu bar (profilebench.gui.menus): each entry reaches the window's method with its file."""

import pytest
from PySide6.QtWidgets import QFileDialog, QInputDialog

from gui_helpers import wait_current


def _entry(w, menu, text):
    return next(a for a in w.menus[menu].actions() if a.text() == text)


@pytest.mark.parametrize(
    "text, name, start",
    [
        ("Export surface data (CSV)…", "surface.csv", b"surface,s,x,y"),
        ("Export annotated view (PNG/SVG/PDF)…", "view.png", b"\x89PNG"),
    ],
)
def test_an_export_entry_writes_the_file_chosen(
    window, qtbot, tmp_path, monkeypatch, text, name, start
):
    w = window
    wait_current(qtbot, w)
    target = tmp_path / name
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    _entry(w, "File", text).trigger()
    assert target.read_bytes().startswith(start)


def test_save_as_and_the_recent_files(window, tmp_path, monkeypatch):
    w = window
    target = tmp_path / "saved.json"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    _entry(w, "File", "Save &as…").trigger()
    assert target.exists() and w.document.path == target
    assert w.recent_files() == [str(target.resolve())]
    assert [a.text() for a in w.recent_menu.actions()] == [str(target.resolve())]
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: ("", ""))  # cancelled
    assert not _entry(w, "File", "Save &as…").trigger()


def test_the_view_entries_set_the_canvas(window, monkeypatch):
    w = window
    c = w.canvas
    _entry(w, "View", "Snap to grid").trigger()
    assert c.grid == pytest.approx(0.01)
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("5", True))
    _entry(w, "View", "Grid spacing…").trigger()
    assert c.grid == pytest.approx(0.005)
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("-1", True))
    _entry(w, "View", "Grid spacing…").trigger()  # refused, said in the banner
    assert c.grid == pytest.approx(0.005) and "grid spacing" in w.last_message
    _entry(w, "View", "Cp colour band").trigger()
    assert not c.show_cp
    _entry(w, "View", "Cp offset curve").trigger()
    assert c.cp_offset_curve
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("-2.5", True))
    _entry(w, "View", "Cp colour scale…").trigger()
    assert c.cp_min == -2.5
