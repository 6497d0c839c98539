"""The corner table's search for a corner's smallest attached radius, and the radius it sets.

What counts (a search taken from the shown analysis, a late result of an earlier outline, the
margin) is decided by :class:`profilebench.editor.controller.ResultsController`; this wires the
window's search child, its busy bar and the corner table's message line.
"""

from __future__ import annotations

from profilebench.errors import ProfileBenchError

__all__ = ["CornerSearch"]


class CornerSearch:
    """Runs ``window``'s radius searches on ``window.search_runner``."""

    def __init__(self, window):
        self.window = window
        window.search_runner.finished.connect(self._finished)
        window.search_runner.failed.connect(self._failed)

    def _say(self, text):
        self.window.corner_table.message.setText(text)

    def find(self, node: int) -> None:
        """Search corner ``node`` (or take the search the shown analysis ran)."""
        w = self.window
        try:
            done = w.results.begin_search(node, w.document.state)
        except ProfileBenchError as exc:
            self._say(str(exc))
            return
        if done is not None:
            self._say(f"{done.message} (from the analysis shown)")
        else:
            w.search_runner.request(w.document.profile, w.document.conditions, node)
            text = f"searching the smallest attached radius at node {node}…"
            self._say(text)
            w.progress.start("search", text)
        w._show_corner_rows()

    def _finished(self, generation, result, seconds):
        w = self.window
        w.progress.finish("search")
        if not w.searches.finish(result, w.document.state):
            self._say("the profile changed during the search; search again")
        else:
            self._say(f"{result.message} ({result.solves} solves, {seconds:.1f} s)")
        w._show_corner_rows()

    def _failed(self, generation, message):
        self.window.progress.finish("search")
        self.window.searches.drop_running()
        self._say(f"search failed (logged): {message}")

    def cancel(self) -> None:
        """The busy bar's Cancel: the running search's result is never shown."""
        w = self.window
        w.search_runner.cancel_pending()
        w.searches.drop_running()
        self._say("search cancelled")
        w._show_corner_rows()

    def apply(self, node: int, margin_text: str) -> None:
        """Give corner ``node`` its found radius plus ``margin_text`` % (an undoable edit)."""
        try:
            r = self.window.results.margin_radius(node, margin_text)
        except ProfileBenchError as exc:
            self._say(str(exc))
            return
        self.window.set_radius(node, r)
