"""The background runner: newest request wins, stale results are dropped, errors are reported."""

import threading
import time

import pytest

from profilebench.gui.worker import TaskRunner


def test_only_the_newest_of_many_requests_is_delivered(qtbot):
    gate = threading.Event()

    def slow(x):
        gate.wait(5)
        return x * 10

    runner = TaskRunner(slow)
    got = []
    runner.finished.connect(lambda g, result, s: got.append((g, result)))
    for x in range(1, 8):
        runner.request(x)
    gate.set()
    qtbot.waitUntil(lambda: not runner.busy and bool(got), timeout=5000)
    # 7 requests while the first ran: the first (stale) is dropped, 2..6 never run, 7 arrives
    assert got == [(7, 70)]
    assert runner.started == 2 and runner.dropped == 1


def test_exception_in_the_worker_is_reported_and_the_runner_goes_on(qtbot):
    def maybe_fail(x):
        if x < 0:
            raise RuntimeError("negative input")
        return x

    runner = TaskRunner(maybe_fail)
    failures, results = [], []
    runner.failed.connect(lambda g, msg: failures.append(msg))
    runner.finished.connect(lambda g, r, s: results.append(r))
    with qtbot.waitSignal(runner.failed, timeout=5000):
        runner.request(-1)
    assert failures == ["RuntimeError: negative input"]
    with qtbot.waitSignal(runner.finished, timeout=5000):
        runner.request(3)
    assert results == [3]


def test_request_returns_increasing_generations(qtbot):
    runner = TaskRunner(lambda: time.sleep(0.01) or 1)
    gens = [runner.request() for _ in range(3)]
    assert gens == sorted(gens) and len(set(gens)) == 3
    qtbot.waitUntil(lambda: not runner.busy, timeout=5000)
