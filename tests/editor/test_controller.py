"""The editor's bookkeeping of background work (profilebench.editor.controller), without Qt.

Rules of this editor (a choice of this project, no source): a result counts for the outline
and conditions it was computed for; pinning a baseline or an underlay changes neither.
"""

from profilebench.assess.conditions import Conditions
from profilebench.assess.results import RadiusSearch, SearchStatus
from profilebench.editor import commands
from profilebench.editor.controller import (
    AnalysisRequests,
    SearchBook,
    SearchRunning,
    same_analysis,
)
from profilebench.editor.document import Document
from profilebench.geometry.profile import Profile

BOX = Profile.from_points(
    [(0.0, 0.2), (4.0, 0.2), (4.0, 1.7), (0.0, 1.7)], radii=[0, 0, 0.1, 0.2], name="box"
)


def _found(node, radius):
    return RadiusSearch(
        node, SearchStatus.FOUND, radius, 0.5, (radius - 1e-3, radius), 1e-3, 9, "found"
    )


def test_same_analysis_is_profile_and_conditions_only():
    doc = Document(BOX, Conditions())
    s0 = doc.state
    pinned = commands.pin_baseline(s0).after
    moved = commands.move_node(s0, 1, 4.1, 0.25).after
    faster = commands.set_conditions(s0, s0.conditions.replace(speed=40.0)).after
    assert same_analysis(s0, pinned)
    assert not same_analysis(s0, moved) and not same_analysis(s0, faster)
    assert not same_analysis(None, s0) and not same_analysis(s0, None)


def test_requests_forget_up_to_the_generation_that_arrived():
    req = AnalysisRequests()
    for g, state in ((1, "a"), (2, "b"), (3, "c")):
        req.sent(g, state)
    assert req.forget(2) == "b"  # its own state
    assert 1 not in req and 2 not in req and 3 in req and len(req) == 1
    assert req.forget(2) is None  # already forgotten
    req.clear()
    assert len(req) == 0


def test_a_search_counts_only_for_the_state_it_was_started_for():
    doc = Document(BOX, Conditions())
    s0 = doc.state
    book = SearchBook()
    running = book.start(2, s0)
    assert isinstance(book.get(2), SearchRunning) and running.node == 2
    assert book.result(2) is None  # running: nothing to apply yet
    assert book.finish(_found(2, 0.05), s0) and book.result(2).radius == 0.05
    # started, then the outline moved: the late result is dropped
    book.start(3, s0)
    moved = commands.move_node(s0, 1, 4.1, 0.25).after
    assert not book.finish(_found(3, 0.07), moved)
    assert book.get(3) is None and book.result(2).radius == 0.05
    # a pinned baseline is not a change of outline: the result stands
    book.start(3, s0)
    assert book.finish(_found(3, 0.07), commands.pin_baseline(s0).after)


def test_a_failed_or_cancelled_search_leaves_no_running_mark():
    book = SearchBook()
    book.put(1, _found(1, 0.04))
    book.start(2, "state")
    book.drop_running()
    assert book.get(2) is None and book.running is None and book.result(1).radius == 0.04
    assert not book.finish(_found(2, 0.05), "state")  # nothing was running
    book.clear()
    assert book.as_rows() == {}


class _Analysis:
    def __init__(self, searches, provisional=()):
        self.radius_searches = tuple(searches)
        self.provisional = tuple(provisional)


def test_the_shown_analysis_gives_its_own_search_for_the_current_outline_only():
    doc = Document(BOX, Conditions())
    s0 = doc.state
    ran = _found(2, 0.06)
    a = _Analysis([ran])
    assert SearchBook.from_analysis(a, s0, s0, 2) is ran
    assert SearchBook.from_analysis(a, s0, s0, 3) is None  # not searched
    moved = commands.move_node(s0, 1, 4.1, 0.25).after
    assert SearchBook.from_analysis(a, s0, moved, 2) is None  # an earlier outline's
    near = _Analysis([ran], provisional=[2])
    assert SearchBook.from_analysis(near, s0, s0, 2) is None  # a nearby outline's search
