"""The editor's bookkeeping of background work (profilebench.editor.controller), without Qt.

Rules of this editor (a choice of this project, no source): a result counts for the outline
and conditions it was computed for; pinning a baseline or an underlay changes neither.
"""

import pytest

from profilebench.assess.conditions import Conditions
from profilebench.assess.results import Analysis, AnalysisStatus, RadiusSearch, SearchStatus
from profilebench.editor import commands
from profilebench.editor.controller import (
    AnalysisRequests,
    ResultsController,
    SearchBook,
    SearchRunning,
    StateChange,
    failure_text,
    plot_wait_ms,
    radius_with_margin,
    same_analysis,
)
from profilebench.editor.document import Document
from profilebench.errors import InputError
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


# ---------------------------------------------------------------- ResultsController
def _analysis(state, ok=True, provisional=(), searches=()):
    status = AnalysisStatus.SUCCESS if ok else AnalysisStatus.INVALID_GEOMETRY
    return Analysis(
        status,
        "ok" if ok else "the outline crosses itself",
        state.profile,
        state.conditions,
        provisional=tuple(provisional),
        radius_searches=tuple(searches),
    )


def _states():
    s0 = Document(BOX, Conditions()).state
    return s0, commands.move_node(s0, 1, 4.1, 0.25).after


def test_the_newest_result_is_shown_for_its_state_and_a_failure_keeps_the_last_good_one():
    s0, moved = _states()
    rc = ResultsController()
    rc.sent(1, s0)
    good = _analysis(s0)
    assert rc.finished_arrived(1, good, 0.03, s0)
    assert rc.analysis is good and rc.analysis_state is s0 and rc.seconds == 0.03
    assert rc.is_current(s0, busy=False) and not rc.is_current(s0, busy=True)
    assert not rc.is_stale(s0) and rc.is_stale(moved)
    rc.sent(2, moved)
    assert not rc.finished_arrived(2, _analysis(moved, ok=False), 0.01, moved)
    assert not rc.finished_arrived(3, None, 0.01, moved)  # the runner gave no analysis
    assert rc.analysis is good and rc.is_stale(moved)  # kept, for an earlier outline
    assert len(rc.requests) == 0 and rc.results_received == 3
    rc.sent(4, moved)
    rc.failed_arrived(4)  # an error: nothing shown changes
    assert rc.analysis is good and len(rc.requests) == 0 and rc.results_received == 4


def test_a_superseded_result_is_shown_stale_unless_it_failed_or_was_forgotten():
    s0, moved = _states()
    rc = ResultsController()
    rc.sent(1, s0)
    rc.sent(2, moved)
    first = _analysis(s0)
    assert rc.lagging_arrived(1, first, 0.02, moved) is True  # for an earlier outline
    assert rc.analysis is first and rc.analysis_state is s0 and rc.lagging_shown == 1
    assert 1 not in rc.requests and 2 in rc.requests
    rc.sent(3, s0)
    assert rc.lagging_arrived(3, _analysis(s0, ok=False), 0.02, moved) is None  # failed
    assert rc.lagging_arrived(3, first, 0.02, moved) is None  # already forgotten
    rc.sent(5, moved)
    rc.cancelled()  # another document, or the running request cancelled
    assert rc.lagging_arrived(5, _analysis(moved), 0.02, moved) is None
    # superseded, yet the document came back to its state (an undo): shown current
    rc.sent(6, s0)
    assert rc.lagging_arrived(6, _analysis(s0), 0.02, s0) is False
    assert rc.lagging_shown == 2 and rc.analysis is not first


@pytest.mark.parametrize(
    "provisional, dragging, busy, same_state, refine",
    [
        ((2,), False, False, True, True),
        ((), False, False, True, False),  # its own searches ran
        ((2,), True, False, True, False),  # still dragging: the next move will do
        ((2,), False, True, True, False),  # an analysis under way will do
        ((2,), False, False, False, False),  # shown for another outline
    ],
)
def test_a_provisional_result_is_refined_once_the_outline_settles(
    provisional, dragging, busy, same_state, refine
):
    s0, moved = _states()
    rc = ResultsController()
    rc.sent(1, s0)
    rc.finished_arrived(1, _analysis(s0, provisional=provisional), 0.02, s0)
    current = s0 if same_state else moved
    assert rc.needs_refinement(current, dragging, busy) is refine


def test_the_baseline_analysis_is_kept_only_when_it_succeeded_and_reset_clears_all():
    s0, _ = _states()
    rc = ResultsController()
    rc.baseline_arrived(_analysis(s0))
    assert rc.baseline_analysis is not None
    rc.baseline_arrived(_analysis(s0, ok=False))
    assert rc.baseline_analysis is None
    rc.baseline_arrived(_analysis(s0))
    rc.sent(1, s0)
    rc.finished_arrived(1, _analysis(s0), 0.02, s0)
    rc.searches.start(2, s0)
    rc.sent(2, s0)
    rc.reset()
    assert rc.analysis is None and rc.analysis_state is None and rc.baseline_analysis is None
    assert len(rc.requests) == 0 and rc.searches.as_rows() == {} and rc.searches.running is None


def test_a_search_is_taken_from_the_shown_analysis_or_started():
    s0, _ = _states()
    rc = ResultsController()
    ran = _found(2, 0.06)
    rc.sent(1, s0)
    rc.finished_arrived(1, _analysis(s0, searches=[ran]), 0.02, s0)
    assert rc.begin_search(2, s0) is ran and rc.searches.get(2) is ran
    assert rc.begin_search(3, s0) is None and isinstance(rc.searches.get(3), SearchRunning)
    smooth = commands.set_smooth(s0, 1, True).after
    with pytest.raises(InputError, match="node 1 is smooth"):
        rc.begin_search(1, smooth)


def test_the_margin_is_added_to_the_found_radius_and_must_fit():
    # arithmetic of this editor: r = r_found * (1 + margin / 100), at most largest_fitting
    rc = ResultsController()
    with pytest.raises(InputError, match="find the smallest attached radius"):
        rc.margin_radius(2, "10")
    rc.searches.put(2, _found(2, 0.05))  # largest fitting 0.5 m
    assert rc.margin_radius(2, "10") == pytest.approx(0.055, rel=1e-12)
    assert rc.margin_radius(2, "0") == pytest.approx(0.05, rel=1e-12)
    assert radius_with_margin(_found(2, 0.05), "900") == pytest.approx(0.5, rel=1e-12)
    with pytest.raises(InputError, match="does not fit"):
        rc.margin_radius(2, "950")  # 0.525 m > 0.5 m
    with pytest.raises(InputError):
        rc.margin_radius(2, "-5")
    with pytest.raises(InputError):
        rc.margin_radius(2, "ten")
    rc.searches.start(3, "state")
    with pytest.raises(InputError, match="find the smallest attached radius"):
        rc.margin_radius(3, "10")  # still running


def test_a_failed_analysis_is_told_by_its_status_and_message():
    s0, _ = _states()
    assert failure_text(_analysis(s0, ok=False)) == (
        "invalid geometry",
        "the outline crosses itself",
    )
    assert failure_text(None) == ("failed", "no result")


@pytest.mark.parametrize(
    "since_last_s, dragging, wait",
    [
        (0.5, False, None),  # idle and the last render old: now
        (0.2, False, None),  # exactly one interval ago
        (0.05, False, 150),  # the rest of the interval
        (0.195, False, 20),  # never sooner than 20 ms on
        (0.5, True, 200),  # during a drag: asked again a whole interval on
        (0.0, True, 200),
    ],
)
def test_plots_render_at_most_once_an_interval_and_not_during_a_drag(since_last_s, dragging, wait):
    # the rule of this editor (no source): a 200 ms interval, a 20 ms floor
    assert plot_wait_ms(since_last_s, dragging, 200) == wait


def test_what_a_new_state_asks_for():
    s0, moved = _states()
    rc = ResultsController()
    assert rc.state_changed(None, s0) == StateChange(True, True, False)  # nothing shown yet
    rc.searches.put(2, _found(2, 0.05))
    pinned = commands.pin_baseline(s0).after
    assert rc.state_changed(s0, pinned) == StateChange(False, False, True)
    assert rc.searches.get(2) is not None  # pinning changes neither outline nor conditions
    rc.baseline_arrived(_analysis(pinned))
    selected_only = pinned  # the same state again (a selection, say): nothing to do
    assert rc.state_changed(pinned, selected_only) == StateChange(False, False, False)
    assert rc.baseline_analysis is not None
    moved_pinned = commands.move_node(pinned, 1, 4.1, 0.25).after
    assert rc.state_changed(pinned, moved_pinned) == StateChange(False, True, False)
    assert rc.searches.get(2) is None and rc.baseline_analysis is not None
    faster = commands.set_conditions(moved_pinned, s0.conditions.replace(speed=40.0)).after
    assert rc.state_changed(moved_pinned, faster) == StateChange(True, True, True)
    assert rc.baseline_analysis is None  # for the old conditions
    rc.baseline_arrived(_analysis(pinned))
    cleared = commands.clear_baseline(faster).after
    assert rc.state_changed(faster, cleared) == StateChange(False, False, False)
    assert rc.baseline_analysis is None
    assert rc.state_changed(cleared, cleared, force=True) == StateChange(True, True, False)


def test_the_comparison_needs_both_analyses():
    from profilebench.assess.analysis import analyze

    s0, moved = _states()
    rc = ResultsController()
    assert rc.comparison() is None
    cond = Conditions(panels=120)  # few panels: the comparison's arithmetic is the point
    base, variant = analyze(BOX, cond), analyze(moved.profile, cond)
    rc.sent(1, moved)
    rc.finished_arrived(1, variant, 0.02, moved)
    assert rc.comparison() is None  # no baseline yet
    rc.baseline_arrived(base)
    c = rc.comparison()
    # delta = variant - baseline (profilebench.assess.compare's definition)
    assert c.delta_cd == pytest.approx(variant.drag.cd - base.drag.cd, rel=1e-12)


def test_every_editor_module_imports_with_qt_unavailable():
    """The editor's model runs without Qt: each module is imported in a fresh interpreter in
    which importing PySide6 fails."""
    import subprocess
    import sys

    code = (
        "import sys, pkgutil, importlib\n"
        "sys.modules['PySide6'] = None  # any import of it raises ImportError\n"
        "import profilebench.editor as e\n"
        "for m in pkgutil.iter_modules(e.__path__):\n"
        "    importlib.import_module('profilebench.editor.' + m.name)\n"
        "print(sorted(n for n in sys.modules if n.startswith('profilebench.editor.')))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert "profilebench.editor.controller" in out.stdout
    assert "profilebench.editor.project_file" in out.stdout
