"""Background analysis: the solver runs on a worker thread, the newest request wins.

:class:`AnalysisRunner` keeps at most one solve running. A request made while one runs replaces
any request still waiting, so a drag of many mouse moves causes at most two solves in flight
(the running one and the newest). Each request has a generation number; a result whose
generation is older than the newest request is stale: it is dropped, or, on a runner made with
``deliver_lagging=True``, delivered through the separate ``lagging`` signal when it is newer than
every result delivered so far (the editor shows it marked stale, so a long drag shows the flow of
a position a few moves back instead of nothing until the mouse stops). A result older than one
already delivered is always dropped, so nothing older ever replaces something newer. An exception
in the worker is logged and reported as a failure; the window goes on.

:class:`ProcessTaskRunner` has the same interface but runs its function in a child process
(:class:`profilebench.gui.child_process.ChildProcess`, one shared by the whole program). It is for work that
holds the interpreter lock for long stretches in C++ (matplotlib's Agg drawing): on a thread
that work would stop the GUI thread; in a process it only shares the CPU.
"""

from __future__ import annotations

import functools
import logging
import threading
import time
import traceback

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from profilebench.gui.child_process import call_with_keywords, import_modules, shared_child

__all__ = ["AnalysisRunner", "ProcessTaskRunner", "TaskRunner"]

log = logging.getLogger("profilebench.gui")


class _Relay(QObject):
    done = Signal(int, object, str, float)  # generation, result, error text, seconds


class _Activity:
    """Count of a runner's jobs still running (their result may not yet be posted)."""

    def __init__(self):
        self._cond = threading.Condition()
        self._count = 0

    def begin(self):
        with self._cond:
            self._count += 1

    def end(self):
        with self._cond:
            self._count -= 1
            self._cond.notify_all()

    def wait(self, seconds: float) -> bool:
        with self._cond:
            return self._cond.wait_for(lambda: self._count == 0, timeout=seconds)


class _Job(QRunnable):
    def __init__(self, relay: _Relay, generation: int, fn, args, activity: _Activity, name: str):
        super().__init__()
        self.setAutoDelete(True)
        self.relay, self.generation, self.fn, self.args = relay, generation, fn, args
        self.activity, self.name = activity, name

    def run(self):
        t0 = time.perf_counter()
        try:
            try:
                result, error = (self.fn(*self.args),), ""  # boxed: None must not cross as itself
            except Exception as exc:  # shown in the window and logged; the app goes on
                result = ()
                error = f"{type(exc).__name__}: {exc}"
                log.error("%s failed in the background:\n%s", self.name, traceback.format_exc())
            try:
                self.relay.done.emit(self.generation, result, error, time.perf_counter() - t0)
            except RuntimeError:  # the runner was deleted meanwhile: nobody wants the result
                pass
        finally:
            self.activity.end()


class TaskRunner(QObject):
    """Runs ``fn(*args)`` on a private thread pool, one at a time, newest request wins.

    Signals
    -------
    finished(generation, result, seconds)
        The result of the newest request.
    failed(generation, message)
        The newest request raised; ``message`` names the exception.
    lagging(generation, result, seconds)
        Only with ``deliver_lagging``: the result of a request that a newer request has
        superseded, newer than anything delivered before (failures of such requests are dropped).
    """

    finished = Signal(int, object, float)
    failed = Signal(int, str)
    lagging = Signal(int, object, float)

    def __init__(
        self, fn, parent=None, pool: QThreadPool | None = None, deliver_lagging: bool = False
    ):
        super().__init__(parent)
        self.deliver_lagging = bool(deliver_lagging)
        self._floor = 0  # generation of the newest result delivered (or cancelled up to)
        self.lagging_delivered = 0  # superseded results delivered through ``lagging``
        self._fn = fn
        # Qt's shared pool unless given one; this runner keeps at most one of its jobs running
        self._pool = pool if pool is not None else QThreadPool.globalInstance()
        self._activity = _Activity()
        # a functools.partial (the search, the plots) has no __name__
        self.name = getattr(fn, "__name__", "task").strip("_") or "task"
        self._relay = _Relay(self)
        self._relay.done.connect(self._on_done)
        self._generation = 0
        self._pending = None
        self._running = False
        self._closed = False
        self.dropped = 0  # stale results dropped (for tests and the benchmark)
        self.started = 0

    @property
    def generation(self) -> int:
        """Generation of the newest request."""
        return self._generation

    @property
    def busy(self) -> bool:
        return self._running or self._pending is not None

    def request(self, *args) -> int:
        """Ask for ``fn(*args)``; returns the request's generation (nothing runs once closed)."""
        self._generation += 1
        if self._closed:
            return self._generation
        self._pending = (self._generation, args)
        if not self._running:
            self._start_pending()
        return self._generation

    def cancel_pending(self) -> None:
        """Forget the waiting request and drop any running one's result (never delivered)."""
        self._pending = None
        self._generation += 1
        self._floor = self._generation

    def _start_pending(self):
        generation, args = self._pending
        self._pending = None
        self._running = True
        self.started += 1
        self._activity.begin()
        self._launch(generation, args)

    def _launch(self, generation, args):
        """Run ``fn(*args)`` for request ``generation`` (here: on the thread pool)."""
        self._pool.start(_Job(self._relay, generation, self._fn, args, self._activity, self.name))

    def _on_done(self, generation, result, error, seconds):
        self._running = False
        if self._closed:
            return
        if self._pending is not None:
            self._start_pending()
        if generation != self._generation:
            if self.deliver_lagging and not error and generation > self._floor:
                self._floor = generation
                self.lagging_delivered += 1
                self.lagging.emit(generation, result[0], seconds)
                return
            self.dropped += 1
            return
        self._floor = generation
        if error:
            self.failed.emit(generation, error)
        else:
            self.finished.emit(generation, result[0], seconds)

    def wait(self, msecs: int = 30000) -> bool:
        """Wait for the running job (on closing the window)."""
        self._pending = None
        return self._activity.wait(msecs / 1000.0)

    def close(self, msecs: int = 30000) -> bool:
        """Stop: forget waiting requests, wait for the running job, deliver nothing more.

        Returns False when the running job did not end within ``msecs``.
        """
        self._closed = True
        self.cancel_pending()
        return self.wait(msecs)


class ProcessTaskRunner(TaskRunner):
    """A :class:`TaskRunner` whose ``fn`` runs in the program's child process
    (:func:`profilebench.gui.child_process.shared_child`).

    ``fn`` must be a module-level function; it, its arguments and its result must pickle.
    Results come back through the same signals, on the GUI thread.
    """

    def __init__(
        self,
        fn,
        parent=None,
        warm_up=None,
        child: str = "default",
        start: bool = True,
        deliver_lagging: bool = False,
    ):
        super().__init__(fn, parent, deliver_lagging=deliver_lagging)
        self._child = shared_child(child)
        self._warm_up = warm_up
        if start:
            self.start_child()

    def start_child(self) -> None:
        """Start the child and its imports (``warm_up`` there) before the first job; once."""
        if self._warm_up is not None:
            warm_up, self._warm_up = self._warm_up, None
            self._child.submit(warm_up, (), lambda ok, payload, seconds: None)

    def _launch(self, generation, args):
        """Run ``fn(*args)`` for request ``generation`` in the child process."""
        relay, activity, name, t0 = self._relay, self._activity, self.name, time.perf_counter()

        def done(ok, payload, seconds):  # on the reader thread; seconds: the child's run time
            try:
                if ok:
                    result, error = (payload,), ""
                else:
                    log.error("%s failed in the background process:\n%s", name, payload)
                    result, error = (), payload.splitlines()[0] if payload else "failed"
                try:
                    took = seconds if seconds is not None else time.perf_counter() - t0
                    relay.done.emit(generation, result, error, took)
                except RuntimeError:  # the runner was deleted meanwhile: nobody wants it
                    pass
            finally:
                activity.end()

        self._child.submit(self._fn, args, done)


# named by module path, so the child imports the pipeline and not this Qt module; called as
# (args, kwargs), so that analyze's keyword parameters are passed by name
_ANALYZE_IN_CHILD = functools.partial(call_with_keywords, "profilebench.assess.analysis:analyze")
_IMPORT_ANALYSIS = functools.partial(import_modules, "profilebench.assess.analysis")


class AnalysisRunner(ProcessTaskRunner):
    """Runs :func:`profilebench.assess.analysis.analyze` in the "analysis" child process.

    The analysis is mostly Python and numpy: on a thread it would share the interpreter lock
    with the GUI thread and stretch every repaint during a drag. A given ``analyze_fn`` (tests,
    functions that may not pickle) runs on a thread instead, as in :class:`TaskRunner`.
    """

    def __init__(self, parent=None, analyze_fn=None, deliver_lagging: bool = False):
        if analyze_fn is None:
            super().__init__(
                _ANALYZE_IN_CHILD,
                parent,
                warm_up=_IMPORT_ANALYSIS,
                child="analysis",
                deliver_lagging=deliver_lagging,
            )
            self.name = "analyze"
        else:
            TaskRunner.__init__(self, analyze_fn, parent, deliver_lagging=deliver_lagging)
            self._child = None

    def request(self, profile, conditions, searches: str = "run") -> int:
        """Ask for ``analyze(profile, conditions, searches=searches)``; returns the generation.

        An injected ``analyze_fn`` is called as ``analyze_fn(profile, conditions)``.
        """
        if self._child is None:
            return super().request(profile, conditions)
        return super().request((profile, conditions), {"searches": searches})

    def _launch(self, generation, args):
        if self._child is None:
            TaskRunner._launch(self, generation, args)
        else:
            super()._launch(generation, args)
