"""The editor's bookkeeping of background work, without Qt: which document state each analysis
request was for, when the results on screen are stale, and the corners' radius searches.

The window (profilebench.gui.main_window) runs the work in child processes and shows the
results; the rules of which result belongs to which outline live here, where they are tested
with plain Python objects (tests/editor/test_controller.py).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["same_analysis", "AnalysisRequests", "SearchRunning", "SearchBook"]


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
        if isinstance(search, SearchRunning) or getattr(search, "radius", None) is None:
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
    def from_analysis(analysis, analysis_state, current_state, node):
        """The search of ``node`` that ``analysis`` (of ``analysis_state``) ran for the current
        outline, or None: none ran, the analysis is of an earlier outline, or its search was a
        nearby outline's (provisional)."""
        if (
            analysis is None
            or not same_analysis(analysis_state, current_state)
            or node in getattr(analysis, "provisional", ())
        ):
            return None
        return next((r for r in getattr(analysis, "radius_searches", ()) if r.node == node), None)
