"""Running the points of a study: in this process or on worker processes, with progress,
cancellation and the point cache.

:func:`run_points` takes the cached points from the cache, runs the others (serially with
``workers=1``, else on a :class:`concurrent.futures.ProcessPoolExecutor`), reports each point as
it finishes, and checks for cancellation between points. A cancelled run stops submitting, drops
the points not started, waits for the running ones (each a fraction of a second) and shuts its
pool down, so that no worker process outlives it.
"""

from __future__ import annotations

import concurrent.futures as cf
import multiprocessing
import os
import threading
import time
from dataclasses import dataclass

from profilebench.errors import InputError
from profilebench.studies.points import (
    POINT_CACHE,
    PointCache,
    PointResult,
    PointStatus,
    analyse_point,
)

__all__ = ["RunStats", "run_points", "default_workers", "START_METHODS", "start_worker_server"]

START_METHODS = ("fork", "forkserver", "spawn")
#: what the fork server imports once, so that the workers it forks start with it imported
SERVER_PRELOAD = ("profilebench.studies.points",)
#: how often (s) a parallel run looks at the cancel flag while points are running
POLL_SECONDS = 0.02


@dataclass(frozen=True)
class RunStats:
    """What a run did: points analysed now, points from the cache, whether it was cancelled,
    wall time (s), time to the first point reported (s, None if none was), workers used."""

    computed: int
    from_cache: int
    cancelled: bool
    seconds: float
    first_point_seconds: float | None
    workers: int


def default_workers() -> int:
    """The workers of a study: one per core this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


def _cancel_check(cancel):
    if cancel is None:
        return lambda: False
    if hasattr(cancel, "is_set"):
        return cancel.is_set
    if callable(cancel):
        return lambda: bool(cancel())
    raise InputError(
        f"cancel must be a threading.Event or a callable returning True to cancel, "
        f"got {type(cancel).__name__}"
    )


def _default_start_method():
    available = multiprocessing.get_all_start_methods()
    if threading.active_count() == 1 and "fork" in available:
        return "fork"
    return "forkserver" if "forkserver" in available else "spawn"


def start_worker_server() -> bool:
    """Start the fork server that the workers of a study run beside threads come from (the
    editor calls this at start-up), with the study's modules imported in it once. True if it is
    running (or was already), False where the platform has no fork server.

    Beside other threads a worker cannot be forked from this process; spawned, each imported
    the package again (a 2-worker sweep of 8 points took 1.15 s, its first point 0.92 s); forked
    from the server with the package imported, 0.46 s and 0.36 s (measured on this project's
    2-core machine). The server is one process for the program's life, like the editor's
    drawing process; it ends with the program.
    """
    if "forkserver" not in multiprocessing.get_all_start_methods():
        return False
    from multiprocessing import forkserver

    forkserver.set_forkserver_preload(list(SERVER_PRELOAD))
    forkserver.ensure_running()
    return True


def _context(start_method):
    """The multiprocessing context: ``start_method``, or by default "fork" where the platform
    has it and this process runs one thread only (a fork copies the imported modules, so the
    workers start at once), else "forkserver" (:func:`start_worker_server`: safe beside
    threads, the package imported once in the server), else "spawn" (each worker imports the
    package again)."""
    if start_method is None:
        start_method = _default_start_method()
    if start_method == "forkserver" and "forkserver" in multiprocessing.get_all_start_methods():
        start_worker_server()
    if (
        start_method not in START_METHODS
        or start_method not in multiprocessing.get_all_start_methods()
    ):
        raise InputError(
            f"start_method {start_method!r} is not available here; give one of "
            f"{', '.join(m for m in START_METHODS if m in multiprocessing.get_all_start_methods())}"
        )
    return multiprocessing.get_context(start_method)


def _check_workers(workers):
    if workers is None:
        return default_workers()
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError(f"workers is {workers!r}; give a whole number of processes, at least 1")
    return workers


def run_points(
    specs,
    workers=None,
    progress=None,
    cancel=None,
    cache=None,
    start_method=None,
    niceness=0,
    order=None,
):
    """Results of ``specs`` (a sequence of PointSpec), in their order, and the :class:`RunStats`.

    Parameters
    ----------
    workers : int, optional
        Processes to run the points on; 1 runs them in this process. Default: one per core.
    progress : callable, optional
        ``progress(done, total, index, result)`` after each point (cached ones first), in this
        process's calling thread.
    cancel : threading.Event or callable, optional
        Checked between points; when set (or returning True) the run stops: the points not run
        come back with the status "cancelled".
    cache : PointCache, optional
        Default :data:`POINT_CACHE`.
    start_method : {"fork", "forkserver", "spawn"}, optional
        How worker processes start (see :func:`_context`).
    niceness : int, optional
        POSIX niceness increment of the worker processes (0: this process's priority); the
        editor runs them below its own, so that its window is scheduled first. Ignored where
        the platform has no ``os.nice``.
    order : sequence of int, optional
        The order in which the points are started (a permutation of their indices; default
        their own order). The results still come back in the specs' order.
    """
    specs = list(specs)
    workers = _check_workers(workers)
    if isinstance(niceness, bool) or not isinstance(niceness, int) or not 0 <= niceness <= 19:
        raise InputError(f"niceness is {niceness!r}; give a whole number from 0 to 19")
    cache = POINT_CACHE if cache is None else cache
    if not isinstance(cache, PointCache):
        raise InputError(f"cache must be a PointCache, got {type(cache).__name__}")
    cancelled = _cancel_check(cancel)
    t0 = time.perf_counter()
    first = [None]
    results: list[PointResult | None] = [None] * len(specs)
    done = [0]

    def report(i, result):
        results[i] = result
        done[0] += 1
        if first[0] is None:
            first[0] = time.perf_counter() - t0
        if progress is not None:
            progress(done[0], len(specs), i, result)

    keys = [s.key() for s in specs]
    sequence = _check_order(order, len(specs))
    todo = []
    for i in sequence:
        key = keys[i]
        hit = cache.get(key)
        if hit is not None:
            report(i, hit)
        else:
            todo.append(i)
    from_cache = len(specs) - len(todo)
    stop = False
    if todo and (workers == 1 or len(todo) == 1):
        for i in todo:
            if cancelled():
                stop = True
                break
            result = analyse_point(specs[i])
            cache.put(keys[i], result)
            report(i, result)
    elif todo:
        stop = _run_parallel(
            specs,
            keys,
            todo,
            min(workers, len(todo)),
            cache,
            report,
            cancelled,
            _context(start_method),
            niceness,
        )
    computed = 0
    for i in todo:
        if results[i] is None:
            results[i] = PointResult(PointStatus.CANCELLED, "not run: the study was cancelled")
        elif results[i].status is not PointStatus.WORKER_LOST:
            computed += 1
    stats = RunStats(computed, from_cache, stop, time.perf_counter() - t0, first[0], workers)
    return results, stats


def _check_order(order, n):
    if order is None:
        return list(range(n))
    seq = [int(i) for i in order]
    if sorted(seq) != list(range(n)):
        raise InputError(
            f"order must give each of the {n} point indices 0 to {n - 1} once, got {list(order)!r}"
        )
    return seq


def _lower_priority(increment):
    """A worker's start: its niceness raised by ``increment`` (where the platform has it)."""
    if increment and hasattr(os, "nice"):
        try:
            os.nice(increment)
        except OSError:
            pass


def _run_parallel(specs, keys, todo, workers, cache, report, cancelled, context, niceness=0):
    """Run ``todo`` on a process pool; True if cancelled."""
    pool = cf.ProcessPoolExecutor(
        max_workers=workers,
        mp_context=context,
        initializer=_lower_priority,
        initargs=(niceness,),
    )
    stop = False
    futures, pending = {}, set()
    try:
        futures = {pool.submit(analyse_point, specs[i]): i for i in todo}
        pending = set(futures)
        while pending:
            if cancelled():
                stop = True
                break
            finished, pending = cf.wait(
                pending, timeout=POLL_SECONDS, return_when=cf.FIRST_COMPLETED
            )
            for f in finished:
                i = futures[f]
                try:
                    result = f.result()
                except cf.process.BrokenProcessPool as exc:
                    result = PointResult(
                        PointStatus.WORKER_LOST,
                        f"the worker process analysing this point ended without an answer ({exc})",
                    )
                cache.put(keys[i], result)
                report(i, result)
    finally:
        # cancelled (or interrupted): drop what has not started, wait for what runs, join the
        # workers, so that none is left behind
        pool.shutdown(wait=True, cancel_futures=True)
    # points that finished while the pool shut down are kept, not thrown away
    for f, i in futures.items() if stop else ():
        if f.done() and not f.cancelled() and f.exception() is None and f in pending:
            cache.put(keys[i], f.result())
            report(i, f.result())
    return stop
