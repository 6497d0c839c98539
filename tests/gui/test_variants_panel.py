"""The variants dock: variants stored, saved and reopened with the project; switching to one is
one undoable edit; rename, delete and the baseline mark; the ranking run off the GUI thread."""

import json

import pytest

from gui_helpers import ANALYSIS_TIMEOUT_MS
from profilebench.editor import commands
from profilebench.io import load_project


def _front_corner(window):
    profile = window.document.profile
    i = next((k for k, n in enumerate(profile.nodes) if n.radius > 0 and "bonnet" in n.label), None)
    return i if i is not None else next(k for k, n in enumerate(profile.nodes) if n.radius > 0)


def _store_two(window):
    panel = window.variants_panel
    panel.note.setText("as opened")
    assert panel.store("front A")
    assert panel.note.text() == ""
    i = _front_corner(window)
    r = window.document.profile.nodes[i].radius
    assert window.push(commands.set_radius(window.document.state, i, r * 2))
    assert panel.store("front B")
    return panel, i, r


def test_two_variants_are_saved_and_reopened(window, tmp_path, qtbot):
    panel, i, r = _store_two(window)
    assert panel.names() == ["front A", "front B"]
    path = tmp_path / "variants.json"
    assert window.save_to(path)
    data = json.loads(path.read_text())
    assert data["version"] == 2 and [v["name"] for v in data["variants"]] == panel.names()
    window.new_document()
    assert panel.names() == []
    assert window.open_file(path)
    assert panel.names() == ["front A", "front B"]
    variants = window.document.variants
    assert variants[0].profile.nodes[i].radius == pytest.approx(r)
    assert variants[1].profile.nodes[i].radius == pytest.approx(2 * r)
    assert load_project(path).variants == variants
    assert variants[0].note == "as opened" and variants[1].note == ""
    assert panel.list.item(0).toolTip() == "as opened"
    panel.grab().save(str(tmp_path / "variants_panel.png"))


def test_switching_to_a_variant_is_one_undoable_edit(window):
    panel, i, r = _store_two(window)
    assert window.document.profile.nodes[i].radius == pytest.approx(2 * r)
    steps = window.undo_stack.count()
    assert panel.switch_to("front A")
    assert window.undo_stack.count() == steps + 1
    assert window.document.profile == window.document.variants[0].profile
    assert "[in the editor]" in panel.list.item(0).text()
    window.undo_stack.undo()
    assert window.document.profile.nodes[i].radius == pytest.approx(2 * r)
    assert window.document.profile == window.document.variants[1].profile
    window.undo_stack.redo()
    assert window.document.profile.nodes[i].radius == pytest.approx(r)


def test_rename_delete_and_the_baseline_mark(window):
    panel, _, _ = _store_two(window)
    assert panel.mark_baseline("front B")
    assert window.document.baseline_variant == "front B"
    assert "(baseline)" in panel.list.item(1).text()
    assert panel.rename("front B", "front B, rounder")
    assert window.document.baseline_variant == "front B, rounder"
    assert not panel.rename("front A", "FRONT b, rounder ")  # the name is taken
    assert "names must differ" in panel.message.text()
    assert not panel.store("front A")  # already stored: refused, not replaced
    assert "already stored" in panel.message.text()
    assert panel.delete("front B, rounder")
    assert panel.names() == ["front A"] and window.document.baseline_variant is None
    window.undo_stack.undo()
    assert panel.names() == ["front A", "front B, rounder"]
    assert window.document.baseline_variant == "front B, rounder"
    assert not panel.switch_to(None)
    assert "select a variant" in panel.message.text()


def test_rank_runs_off_the_gui_thread_and_shows_the_table(window, qtbot, tmp_path):
    # few panels: the ranking itself is not the point here (tests/studies check it)
    cond = window.document.conditions.replace(panels=80)
    window.push(commands.set_conditions(window.document.state, cond))
    panel, _, _ = _store_two(window)
    assert panel.rank()
    # the request returned at once; the result arrives through the runner's signal
    qtbot.waitUntil(lambda: panel.ranking is not None, timeout=ANALYSIS_TIMEOUT_MS)
    table = panel.ranking
    assert {r.name for r in table.rows} == {"front A", "front B"}
    assert panel.table.rowCount() == 2
    shown = [panel.table.item(k, 1).text() for k in range(2)]
    assert shown == [r.name + (" (baseline)" if r.is_baseline else "") for r in table.rows]
    assert panel.table.item(0, 0).text() == "1"
    assert table.key_reason in panel.message.text()
    assert "Screening estimate" in panel.caution.text()
    window.resize(1600, 1000)
    panel.grab().save(str(tmp_path / "variants_ranked.png"))
    assert panel.page_button.isEnabled()


def test_the_ranking_page_is_saved_only_after_a_ranking(window, tmp_path):
    from profilebench.studies import PointCache, rank_variants

    panel = window.variants_panel
    assert not panel.page_button.isEnabled()
    assert not panel.export_page(tmp_path / "page.png")
    assert "rank the variants first" in panel.message.text()
    assert not (tmp_path / "page.png").exists()
    _store_two(window)
    doc = window.document
    # the ranking the Rank button would show, made here at few panels (the page is the point)
    panel.ranking = rank_variants(
        doc.variants, doc.conditions.replace(panels=80), workers=1, cache=PointCache()
    )
    page = tmp_path / "page.png"
    assert panel.export_page(page)
    # a PNG file: its signature (PNG specification, section 5.2)
    assert page.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert not panel.export_page(tmp_path / "page.gif")
    assert ".gif" in panel.message.text()
