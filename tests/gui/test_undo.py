"""Edits, undo and redo on the editor's document through the Qt undo stack the editor uses
(QUndoStack with profilebench.gui.undo.EditCommand)."""

import pytest
from PySide6.QtGui import QUndoStack

from profilebench.assess.conditions import Conditions
from profilebench.editor import commands
from profilebench.editor.document import Document
from profilebench.editor.interaction import NodeDrag
from profilebench.editor.view import ViewTransform
from profilebench.gui.undo import push_edit
from profilebench.errors import GeometryError, InputError, ProfileBenchError
from profilebench.geometry.profile import Profile

# A 4 m x 1.5 m box 0.2 m above the ground: invented test shape, counter-clockwise.
BOX = Profile.from_points(
    [(0.0, 0.2), (4.0, 0.2), (4.0, 1.7), (0.0, 1.7)], radii=[0, 0, 0.1, 0.2], name="box"
)


class History:
    """The editor's undo stack over one document, as MainWindow holds it."""

    def __init__(self, doc):
        self.doc = doc
        self.stack = QUndoStack()

    def push(self, edit):
        return push_edit(self.stack, self.doc, edit)

    def undo(self):
        self.stack.undo()

    def redo(self):
        self.stack.redo()

    @property
    def can_undo(self):
        return self.stack.canUndo()

    @property
    def can_redo(self):
        return self.stack.canRedo()

    def __len__(self):
        return self.stack.count()


@pytest.fixture
def fresh(qapp):
    def make():
        doc = Document(BOX, Conditions())
        return doc, History(doc)

    return make


EDITS = {
    "move": lambda s: commands.move_node(s, 1, 4.1, 0.25),
    "insert": lambda s: commands.insert_node(s, 1, 2.0, 0.2),
    "delete": lambda s: commands.delete_node(s, 0),
    "radius": lambda s: commands.set_radius(s, 0, 0.05),
    "smooth": lambda s: commands.set_smooth(s, 2, True),
    "conditions": lambda s: commands.set_conditions(s, s.conditions.replace(speed=40.0)),
    "baseline": lambda s: commands.pin_baseline(s),
}


@pytest.mark.parametrize("kind", sorted(EDITS))
def test_undo_restores_the_same_state_exactly(kind, fresh):
    doc, history = fresh()
    before = doc.state
    assert history.push(EDITS[kind](doc.state))
    assert doc.state != before and doc.dirty
    history.undo()
    # exact: the very same immutable values come back, so nothing is re-computed or rounded
    assert doc.state == before
    assert doc.state.profile is before.profile
    assert not doc.dirty
    history.redo()
    assert doc.state != before and doc.dirty


def test_edit_that_changes_nothing_is_not_recorded(fresh):
    doc, history = fresh()
    x, y = BOX.xy[1]
    assert not history.push(commands.move_node(doc.state, 1, x, y))
    assert len(history) == 0 and not history.can_undo


def test_new_edit_clears_redo(fresh):
    doc, history = fresh()
    history.push(EDITS["move"](doc.state))
    history.undo()
    assert history.can_redo
    history.push(EDITS["radius"](doc.state))
    assert not history.can_redo


def test_saved_state_makes_document_clean_and_title_marks_changes(tmp_path, fresh):
    doc, history = fresh()
    history.push(EDITS["radius"](doc.state))
    assert doc.title.endswith(" *")
    doc.mark_saved(tmp_path / "a.json")
    assert not doc.dirty and doc.title == "a.json"
    history.undo()  # back to a state that was never saved
    assert doc.dirty


def test_listeners_hear_every_change_once(fresh):
    doc, history = fresh()
    heard = []
    doc.subscribe(heard.append)
    history.push(EDITS["move"](doc.state))
    history.undo()
    assert [s.profile for s in heard] == [BOX.moved(1, 4.1, 0.25), BOX]


def test_selection_dropped_when_its_node_is_deleted(fresh):
    doc, history = fresh()
    doc.selection = doc.selection.__class__(3)
    history.push(commands.delete_node(doc.state, 0))
    assert doc.selection.node is None


def test_delete_below_three_nodes_is_refused_with_a_reason():
    tri = Profile.from_points([(0, 0.2), (1, 0.2), (0, 1.0)])
    doc = Document(tri, Conditions())
    with pytest.raises(GeometryError, match="at least 3 nodes"):
        commands.delete_node(doc.state, 0)


@pytest.mark.parametrize(
    "bad, error", [(-0.01, GeometryError), (float("nan"), InputError), ("5", InputError)]
)
def test_bad_radius_is_refused_not_clamped(bad, error, fresh):
    doc, _ = fresh()
    with pytest.raises(error) as info:
        commands.set_radius(doc.state, 0, bad)
    assert isinstance(info.value, ProfileBenchError)
    assert doc.state.profile is BOX  # nothing changed


def test_insert_on_spline_segment_is_smooth():
    prof = BOX.with_smooth(1, True)
    doc = Document(prof, Conditions())
    edit = commands.insert_node(doc.state, 1, 2.0, 0.2)
    assert edit.after.profile.nodes[1].smooth
    edit = commands.insert_node(doc.state, 3, 2.0, 1.7)  # between nodes 2 and 3, both corners
    assert not edit.after.profile.nodes[3].smooth


# a 100 px/m view with y up, for the drag below
VIEW = ViewTransform(scale=100.0, offset_x=50.0, offset_y=300.0)


def test_whole_drag_is_one_undo_step_and_undo_is_exact(qapp):
    doc = Document(BOX, Conditions())
    history = History(doc)
    sx, sy = VIEW.to_screen(*BOX.xy[1])
    drag = NodeDrag(doc.state, 1, VIEW, sx + 3, sy + 2)  # grabbed a little off the centre
    for k in range(1, 31):
        doc.preview_profile(drag.move(VIEW, sx + 3 + k, sy + 2 - k))
    history.push(drag.finish())
    # the grab offset is kept: the node moved by exactly the cursor's displacement
    assert doc.profile.xy[1] == pytest.approx((4.0 + 30 / 100.0, 0.2 + 30 / 100.0))
    assert len(history) == 1
    history.undo()
    assert doc.profile == BOX
