"""A Python child process for background work that would hold the interpreter lock.

Some libraries (matplotlib's Agg backend, Qt through PySide6) keep Python's global interpreter
lock during each of their C++ calls, several ms each; run on a thread of the editor, such work
stops the GUI thread as long. :class:`ChildProcess` runs it in a separate interpreter instead
(Python in isolated mode, ``-I``, with the import path given explicitly, so nothing lying in the
current folder is imported): jobs and results cross its stdin and stdout as pickles. This module
imports no Qt, so the child never loads it.
"""

from __future__ import annotations

import atexit
import sys
import threading
import time
import traceback

__all__ = [
    "ChildProcess",
    "call",
    "call_with_keywords",
    "import_modules",
    "shared_child",
    "child_command",
    "child_path",
    "CHILD_NICENESS",
]

# The child runs at a lower CPU priority (POSIX niceness increment) than the editor: when the
# cores are busy, the GUI thread is scheduled first and background work waits instead.
CHILD_NICENESS = 5


class ChildProcess:
    """One Python child process that runs pickled ``fn(*args)`` jobs (:func:`child_command`).

    Requests go to the child's stdin and results come back on its stdout as pickles; a writer
    and a reader thread of this process do the piping (blocking pipe I/O releases the
    interpreter lock), so the caller never waits. A started child is not a fork and does not
    import the program's main script (unlike multiprocessing's spawn). When the child ends,
    every job it had is reported failed and the next :meth:`submit` starts a new child.
    """

    def __init__(self):
        self._lock = threading.Lock()
        self._proc = None
        self._jobs: dict = {}  # job id -> callback(ok, payload)
        self._next = 0
        self._outbox = None

    def submit(self, fn, args, callback) -> int:
        """Queue ``fn(*args)``; ``callback(ok, payload, seconds)`` runs on the reader thread with
        the result (``ok`` True) or the error text (``ok`` False), and the time ``fn`` took in
        the child (s; None when it never ran)."""
        with self._lock:
            if self._proc is None or self._proc.poll() is not None:
                self._start()
            self._next += 1
            job = self._next
            self._jobs[job] = (self._proc, callback)
            self._outbox.put((job, fn, args))
            return job

    def _start(self):
        import queue
        import subprocess

        proc = subprocess.Popen(child_command(), stdin=subprocess.PIPE, stdout=subprocess.PIPE)
        outbox = queue.Queue()
        self._proc, self._outbox = proc, outbox
        threading.Thread(
            target=self._write, args=(proc, outbox), daemon=True, name="profilebench-child-writer"
        ).start()
        threading.Thread(
            target=self._read, args=(proc,), daemon=True, name="profilebench-child-reader"
        ).start()

    def _write(self, proc, outbox):
        import pickle

        while True:
            item = outbox.get()
            if item is None:
                break
            try:
                data = pickle.dumps(
                    item, protocol=pickle.HIGHEST_PROTOCOL
                )  # whole, or nothing sent
                proc.stdin.write(data)
                proc.stdin.flush()
            except OSError as exc:  # the child ended: the reader fails its other jobs
                self._finish(
                    item[0], False, f"the background process ended ({type(exc).__name__}: {exc})"
                )
                break
            except Exception as exc:  # the job does not pickle
                self._finish(item[0], False, f"{type(exc).__name__}: {exc}")
        try:
            proc.stdin.close()
        except OSError:
            pass

    def _read(self, proc):
        import pickle

        while True:
            try:
                job, ok, payload, seconds = pickle.load(proc.stdout)
            except Exception:  # EOF: the child ended
                break
            self._finish(job, ok, payload, seconds)
        code = proc.wait()
        with self._lock:
            if self._proc is proc:
                self._proc = None
            left = [j for j, (p, _) in self._jobs.items() if p is proc]
        for job in left:
            self._finish(job, False, f"the background process ended (exit code {code})")

    def _finish(self, job, ok, payload, seconds=None):
        with self._lock:
            entry = self._jobs.pop(job, None)
        if entry is not None:
            entry[1](ok, payload, seconds)

    def close(self, seconds: float = 5.0):
        """End the child (its stdin closed; killed if it does not end within ``seconds``)."""
        with self._lock:
            proc, outbox, self._proc = self._proc, self._outbox, None
        if proc is None:
            return
        outbox.put(None)
        try:
            proc.wait(seconds)
        except Exception:
            proc.kill()
            proc.wait()


#: the child's start: the import path is set before anything else is imported
_BOOT = (
    "import sys; sys.path[:] = {path!r}; "
    "from profilebench.gui.child_process import _serve; _serve()"
)


def child_path() -> list[str]:
    """The child's import path: this very package's folder first, then the editor's own path
    without the current folder (a ``numpy.py`` lying in the folder the editor was started from
    must not be imported)."""
    import os
    from pathlib import Path

    import profilebench

    root = str(Path(profilebench.__file__).resolve().parents[1])
    try:
        here = os.path.realpath(os.getcwd())
    except OSError:  # the current folder was deleted
        here = None
    path = [root]
    for entry in sys.path:
        if not entry or entry == "." or entry == root:
            continue
        if here is not None and os.path.realpath(entry) == here:
            continue
        if entry not in path:
            path.append(entry)
    return path


def child_command() -> list[str]:
    """The command that starts a child: Python in isolated mode (``-I``: no current folder or
    script folder on the import path, no PYTHON* variables, no user site folder) with the import
    path given explicitly by :func:`child_path`."""
    return [sys.executable, "-I", "-c", _BOOT.format(path=child_path())]


_shared: dict = {}
_shared_lock = threading.Lock()


def shared_child(name: str = "default") -> ChildProcess:
    """The program's :class:`ChildProcess` called ``name`` (its process starts on the first job).

    Separate names are separate processes, so jobs of one kind never queue behind another's.
    """
    with _shared_lock:
        child = _shared.get(name)
        if child is None:
            child = _shared[name] = ChildProcess()
            atexit.register(child.close)
        return child


def call(target: str, *args):
    """``module:function`` imported and called with ``args`` (lets a job name a function whose
    module the editor has not imported itself)."""
    return call_with_keywords(target, args, {})


def call_with_keywords(target: str, args: tuple, kwargs: dict):
    """:func:`call` with keyword arguments: ``module:function(*args, **kwargs)``."""
    import importlib

    module, _, name = target.partition(":")
    # the function is named by the text "module:function" a child receives
    return getattr(importlib.import_module(module), name)(*args, **kwargs)


def import_modules(*names: str) -> bool:
    """Import ``names`` (a child's warm-up before its first job); returns True."""
    import importlib

    for name in names:
        importlib.import_module(name)
    return True


def _serve():
    """The child's loop: read ``(job, fn, args)`` pickles from stdin, write
    ``(job, ok, payload, seconds)``."""
    import os
    import pickle
    import sys

    if hasattr(os, "nice"):  # POSIX only; elsewhere the child keeps normal priority
        try:
            os.nice(CHILD_NICENESS)
        except OSError:
            pass
    stdin, stdout = sys.stdin.buffer, sys.stdout.buffer
    sys.stdout = sys.stderr  # nothing else may write into the result stream
    while True:
        try:
            job, fn, args = pickle.load(stdin)
        except EOFError:
            return
        t0 = time.perf_counter()
        try:
            reply = (job, True, fn(*args), time.perf_counter() - t0)
            data = pickle.dumps(reply, protocol=pickle.HIGHEST_PROTOCOL)  # whole, or not sent
        except Exception as exc:  # reported to the editor, which logs and shows it
            reply = (
                job,
                False,
                f"{type(exc).__name__}: {exc}\n{traceback.format_exc()}",
                time.perf_counter() - t0,
            )
            data = pickle.dumps(reply, protocol=pickle.HIGHEST_PROTOCOL)
        try:
            stdout.write(data)
            stdout.flush()
        except OSError:  # the editor ended meanwhile: nobody wants the result
            return


if __name__ == "__main__":
    _serve()
