"""The editor's variant edits (Qt-free): each is one exact undo step; names are matched as the
project file matches them; the document saves and reopens its variants."""

import pytest

from profilebench.assess.conditions import Conditions
from profilebench.editor import variant_edits as ve
from profilebench.editor.document import Document
from profilebench.editor.recovery import write_recovery
from profilebench.errors import InputError
from profilebench.geometry.shapes import rounded_box
from profilebench.io import load_project, save_project

BOX = rounded_box(2.0, 0.5, 0.1, 0.05, name="box")
ROUND = BOX.with_radius(3, 0.2)


def _doc():
    return Document(BOX, Conditions(width=1.0))


def _apply(doc, edit):
    assert edit.before == doc.state
    doc.set_state(edit.after)
    return edit


def test_store_switch_and_undo_exactly():
    doc = _doc()
    _apply(doc, ve.store_variant(doc.state, "sharp", note="as drawn"))
    doc.preview_profile(ROUND)
    _apply(doc, ve.store_variant(doc.state, "round"))
    assert [v.name for v in doc.variants] == ["sharp", "round"]
    assert doc.variants[0].profile == BOX and doc.variants[0].note == "as drawn"
    edit = _apply(doc, ve.switch_to_variant(doc.state, " SHARP"))
    assert doc.profile == BOX and doc.variants == edit.before.variants
    doc.set_state(edit.before)  # undo
    assert doc.profile == ROUND


def test_store_over_replaces_the_profile_and_keeps_the_note():
    doc = _doc()
    _apply(doc, ve.store_variant(doc.state, "a", note="first"))
    doc.preview_profile(ROUND)
    with pytest.raises(InputError, match="already stored"):
        ve.store_variant(doc.state, "A")
    _apply(doc, ve.store_variant(doc.state, "A", overwrite=True))
    assert len(doc.variants) == 1
    assert doc.variants[0].name == "a" and doc.variants[0].profile == ROUND
    assert doc.variants[0].note == "first"


def test_the_baseline_mark_follows_a_rename_and_goes_with_a_delete():
    doc = _doc()
    for name in ("a", "b", "c"):
        _apply(doc, ve.store_variant(doc.state, name))
    _apply(doc, ve.set_baseline_variant(doc.state, "B"))
    assert doc.baseline_variant == "b"
    _apply(doc, ve.rename_variant(doc.state, "b", "b2"))
    assert doc.baseline_variant == "b2" and [v.name for v in doc.variants] == ["a", "b2", "c"]
    _apply(doc, ve.delete_variant(doc.state, "b2"))
    assert doc.baseline_variant is None and [v.name for v in doc.variants] == ["a", "c"]
    with pytest.raises(InputError, match="names must differ"):
        ve.rename_variant(doc.state, "a", " C ")
    with pytest.raises(InputError, match="no variant named 'z'.*'a', 'c'"):
        ve.switch_to_variant(doc.state, "z")
    with pytest.raises(InputError, match="empty"):
        ve.store_variant(doc.state, "  ")


def test_suggested_names_are_free():
    doc = _doc()
    _apply(doc, ve.store_variant(doc.state, "variant 2"))
    assert ve.suggest_name(doc.state) == "variant 3"
    _apply(doc, ve.store_variant(doc.state, ve.suggest_name(doc.state)))
    assert ve.suggest_name(doc.state) == "variant 4"


def test_the_document_saves_reopens_and_recovers_its_variants(tmp_path):
    doc = _doc()
    _apply(doc, ve.store_variant(doc.state, "a"))
    doc.preview_profile(ROUND)
    _apply(doc, ve.store_variant(doc.state, "b"))
    _apply(doc, ve.set_baseline_variant(doc.state, "b"))
    path = save_project(doc.to_project(), tmp_path / "p.json")
    again = Document.from_project(load_project(path), path=path)
    assert again.state == doc.state
    copy = write_recovery(tmp_path / "recovery", doc)
    assert load_project(copy).variants == doc.variants
