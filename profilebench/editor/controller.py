"""The editor's bookkeeping of background work, without Qt: which document state each analysis
request was for, which result to show and when it is stale, when a provisional result is redone,
the corners' radius searches and the margin added to a found radius.

The window (profilebench.gui.main_window) runs the work in child processes and shows what
:class:`ResultsController` decides; the rules of which result belongs to which outline live
here, where they are tested with plain Python objects (tests/editor/test_controller.py).
"""

from __future__ import annotations

from dataclasses import dataclass

from profilebench.assess.results import Analysis, RadiusSearch
from profilebench.editor.fields import parse_number
from profilebench.errors import InputError, ProfileBenchError

__all__ = [
    "same_analysis",
    "AnalysisRequests",
    "SearchRunning",
    "SearchBook",
    "ResultsController",
    "failure_text",
    "radius_with_margin",
    "plot_wait_ms",
    "StateChange",
]


def same_analysis(a, b) -> bool:
    """Do document states ``a`` and ``b`` have the same analysis? Only the profile and the
    conditions enter it: pinning a baseline, an underlay or the selection leave it current."""
    return (
        a is not None and b is not None and a.profile == b.profile and a.conditions == b.conditions
    )


class AnalysisRequests:
    """The document state of each analysis request still out, by the runner's generation."""

    def __init__(self):
        self._states: dict[int, object] = {}

    def __len__(self):
        return len(self._states)

    def __contains__(self, generation):
        return generation in self._states

    def sent(self, generation: int, state) -> None:
        """Request ``generation`` was made for document state ``state``."""
        self._states[generation] = state

    def forget(self, upto: int):
        """Drop the requests up to generation ``upto`` (its result arrived; older ones never
        will); return the state request ``upto`` was for, or None if it was not remembered."""
        state = self._states.get(upto)
        for g in [g for g in self._states if g <= upto]:
            del self._states[g]
        return state

    def clear(self) -> None:
        """Forget every request (another document, or the running one cancelled)."""
        self._states.clear()


@dataclass(frozen=True)
class SearchRunning:
    """A corner's smallest-attached-radius search under way, for document state ``state``."""

    node: int
    state: object


class SearchBook:
    """Each corner's radius search: a :class:`SearchRunning` or its RadiusSearch result.

    One search runs at a time (the window has one search child); its result counts only for the
    state it was started for.
    """

    def __init__(self):
        self._by_node: dict[int, object] = {}
        self.running: SearchRunning | None = None

    def get(self, node):
        """The node's RadiusSearch, its SearchRunning, or None."""
        return self._by_node.get(node)

    def result(self, node):
        """The node's finished search with a radius, or None (none, running, or no radius)."""
        search = self._by_node.get(node)
        if not isinstance(search, RadiusSearch) or search.radius is None:
            return None
        return search

    def as_rows(self) -> dict:
        """node -> RadiusSearch or SearchRunning, for the corner table."""
        return dict(self._by_node)

    def clear(self) -> None:
        """The outline or conditions changed: no search stands (a running one is dropped)."""
        self._by_node.clear()
        self.running = None

    def put(self, node, search) -> None:
        """A finished search of ``node`` (one the shown analysis ran, say)."""
        self._by_node[node] = search

    def start(self, node, state) -> SearchRunning:
        running = SearchRunning(node, state)
        self._by_node[node] = running
        self.running = running
        return running

    def finish(self, result, current_state) -> bool:
        """The running search's ``result`` arrived: kept if the document is still at the state
        it was started for (True), dropped otherwise (False)."""
        running, self.running = self.running, None
        if running is None:
            return False
        if not same_analysis(running.state, current_state):
            self._by_node.pop(running.node, None)
            return False
        self._by_node[running.node] = result
        return True

    def drop_running(self) -> None:
        """The running search failed or was cancelled."""
        if self.running is not None:
            if isinstance(self._by_node.get(self.running.node), SearchRunning):
                del self._by_node[self.running.node]
            self.running = None

    @staticmethod
    def from_analysis(analysis: Analysis | None, analysis_state, current_state, node):
        """The search of ``node`` that ``analysis`` (of ``analysis_state``) ran for the current
        outline, or None: none ran, the analysis is of an earlier outline, or its search was a
        nearby outline's (provisional)."""
        if (
            analysis is None
            or not same_analysis(analysis_state, current_state)
            or node in analysis.provisional
        ):
            return None
        return next((r for r in analysis.radius_searches if r.node == node), None)


def failure_text(analysis: Analysis | None) -> tuple[str, str]:
    """(status, message) of an analysis that did not succeed (None: the runner gave none)."""
    if analysis is None:
        return "failed", "no result"
    return analysis.status.value, analysis.message


def radius_with_margin(search: RadiusSearch, margin_text: str) -> float:
    """The found smallest attached radius of ``search`` plus a margin of ``margin_text`` % (m).

    Raises InputError for a margin that is not a number >= 0, or a radius that does not fit
    between the corner's neighbours (``search.largest_fitting``).
    """
    margin = parse_number(margin_text, "margin", "%", 0.0)
    r = search.radius * (1.0 + margin / 100.0)
    if r > search.largest_fitting:
        raise InputError(
            f"{search.radius * 1000:.0f} mm + {margin:g}% = {r * 1000:.0f} mm does not fit; "
            f"the largest radius that fits is {search.largest_fitting * 1000:.0f} mm: "
            "choose a smaller margin"
        )
    return r


def plot_wait_ms(since_last_s: float, dragging: bool, interval_ms: int) -> int | None:
    """How long (ms) to wait before rendering the plots, or None to render them now.

    Now when no drag runs and the last render is at least ``interval_ms`` old; else when that
    interval is over (at least 20 ms on), or a whole interval during a drag (then asked again).
    """
    wait = interval_ms - 1000.0 * since_last_s
    if dragging:
        return interval_ms
    return None if wait <= 0 else max(int(wait), 20)


@dataclass(frozen=True)
class StateChange:
    """What a new document state asks of the window.

    ``conditions``: the conditions panel shows the new conditions; ``analysis``: the outline
    or the conditions changed, so the state is analysed again; ``baseline``: the pinned
    baseline is analysed again (it or the conditions changed).
    """

    conditions: bool
    analysis: bool
    baseline: bool


class ResultsController:
    """What the editor shows of its background work, decided without Qt.

    It holds the analysis on screen (the last good one, perhaps stale) and the document state
    it was computed for, the baseline's analysis, the state each analysis request still out
    was made for, and the corners' radius searches. The window calls the ``*_arrived`` and
    ``sent`` methods as its runners report, and shows what they return.

    Attributes
    ----------
    analysis : Analysis or None
        The last good analysis (may be stale).
    analysis_state : DocumentState or None
        The document state ``analysis`` was computed for.
    seconds : float or None
        How long ``analysis`` took (s).
    baseline_analysis : Analysis or None
        The successful analysis of the pinned baseline, or None.
    lagging_shown : int
        Superseded analyses shown (marked stale), e.g. during a drag.
    results_received : int
        Analyses finished or failed (superseded ones not counted).
    """

    def __init__(self):
        self.requests = AnalysisRequests()
        self.searches = SearchBook()
        self.analysis: Analysis | None = None
        self.analysis_state = None
        self.seconds: float | None = None
        self.baseline_analysis: Analysis | None = None
        self.lagging_shown = 0
        self.results_received = 0

    def reset(self) -> None:
        """Another document: nothing is shown, no request or search stands."""
        self.analysis = None
        self.analysis_state = None
        self.baseline_analysis = None
        self.searches.clear()
        self.requests.clear()

    # ---------------------------------------------------------------- analyses
    def state_changed(self, prev, state, force: bool = False) -> StateChange:
        """The document went from state ``prev`` (None: nothing shown yet) to ``state``;
        ``force`` (a document installed) counts everything as changed. The radius searches
        of an earlier outline or conditions are dropped, and the baseline's analysis when the
        baseline or the conditions changed."""
        fresh = force or prev is None
        conditions = fresh or prev.conditions != state.conditions
        analysis = conditions or prev.profile != state.profile
        baseline = state.baseline is not None and (conditions or prev.baseline != state.baseline)
        if analysis:
            self.searches.clear()
        if baseline or state.baseline is None:
            self.baseline_analysis = None
        return StateChange(conditions, analysis, baseline)

    def sent(self, generation: int, state) -> None:
        """Analysis request ``generation`` was made for document state ``state``."""
        self.requests.sent(generation, state)

    def cancelled(self) -> None:
        """The running analysis was cancelled: its result will not be shown."""
        self.requests.clear()

    def is_stale(self, state) -> bool:
        """Is the analysis on screen for another outline or conditions than ``state``?"""
        return self.analysis_state is not None and not same_analysis(self.analysis_state, state)

    def is_current(self, state, busy: bool) -> bool:
        """Is the analysis on screen for ``state``, with none running?"""
        return not busy and self.analysis is not None and same_analysis(self.analysis_state, state)

    def _show(self, analysis: Analysis, state, seconds: float) -> None:
        self.analysis = analysis
        self.analysis_state = state
        self.seconds = seconds

    def lagging_arrived(self, generation: int, analysis: Analysis | None, seconds, current_state):
        """A result that a newer request has superseded (the runner delivers it only when it
        is newer than every result shown). Returns whether to show it stale (True), current
        (False), or None: not shown (a failure, or a request of another document)."""
        state = self.requests.forget(generation)
        if state is None or analysis is None or not analysis.success:
            return None
        self.lagging_shown += 1
        self._show(analysis, state, seconds)
        return not same_analysis(state, current_state)

    def finished_arrived(self, generation: int, analysis: Analysis | None, seconds, state) -> bool:
        """The newest request's result, for ``state`` (the state shown when it arrives): True
        when it succeeded and is now on screen; False when it failed (the last good analysis
        stays, stale)."""
        self.results_received += 1
        self.requests.forget(generation)
        if analysis is None or not analysis.success:
            return False
        self._show(analysis, state, seconds)
        return True

    def failed_arrived(self, generation: int) -> None:
        """The newest request raised (an error, logged): the last good analysis stays."""
        self.results_received += 1
        self.requests.forget(generation)

    def needs_refinement(self, state, dragging: bool, busy: bool) -> bool:
        """Should ``state`` be analysed again with its own radius searches? Yes when the
        analysis shown is of ``state`` but took some corner corrections from a nearby
        outline's search (provisional, during a drag) and nothing else is under way."""
        a = self.analysis
        return (
            a is not None
            and bool(a.provisional)
            and not dragging
            and not busy
            and same_analysis(self.analysis_state, state)
        )

    def baseline_arrived(self, analysis: Analysis | None) -> None:
        """The baseline's analysis: kept when it succeeded."""
        self.baseline_analysis = analysis if analysis is not None and analysis.success else None

    def comparison(self):
        """The shown analysis against the baseline's (:func:`profilebench.assess.compare`),
        or None: either is missing, or they cannot be compared."""
        if self.analysis is None or self.baseline_analysis is None:
            return None
        from profilebench.assess.compare import compare

        try:
            return compare(self.baseline_analysis, self.analysis)
        except ProfileBenchError:
            return None

    # ---------------------------------------------------------------- radius searches
    def begin_search(self, node: int, state):
        """Start the smallest-attached-radius search of corner ``node`` at ``state``.

        Returns the search the shown analysis already ran for this outline (nothing to run),
        or None: a search is marked running and the window asks its search child. Raises
        InputError for a smooth node (it has no corner radius).
        """
        if state.profile.nodes[node].smooth:
            raise InputError(f"node {node} is smooth; make it a corner first")
        done = SearchBook.from_analysis(self.analysis, self.analysis_state, state, node)
        if done is not None:
            self.searches.put(node, done)
            return done
        self.searches.start(node, state)
        return None

    def margin_radius(self, node: int, margin_text: str) -> float:
        """The radius to give corner ``node``: its found smallest attached radius plus
        ``margin_text`` %. InputError when no search found one or the margin is refused."""
        search = self.searches.result(node)
        if search is None:
            raise InputError("find the smallest attached radius of this corner first")
        return radius_with_margin(search, margin_text)
