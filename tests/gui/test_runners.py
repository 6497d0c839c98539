"""The background runner: newest request wins, stale results are dropped, errors are reported."""

import threading
import time


from profilebench.gui.runners import TaskRunner


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


def test_lagging_delivery_shows_a_superseded_result_newer_than_the_last_shown(qtbot):
    gate = threading.Event()

    def slow(x):
        gate.wait(5)
        if x == 3:
            raise RuntimeError("three is refused")
        return x * 10

    runner = TaskRunner(slow, deliver_lagging=True)
    lagging, finished, failed = [], [], []
    runner.lagging.connect(lambda g, result, s: lagging.append((g, result)))
    runner.finished.connect(lambda g, result, s: finished.append((g, result)))
    runner.failed.connect(lambda g, msg: failed.append((g, msg)))
    for x in range(1, 8):
        runner.request(x)
    gate.set()
    qtbot.waitUntil(lambda: not runner.busy and bool(finished), timeout=5000)
    # request 1 ran while 2..7 came in: its result is superseded but newer than anything shown,
    # so it comes through ``lagging``; 7 is the newest and comes through ``finished``
    assert lagging == [(1, 10)] and finished == [(7, 70)]
    assert runner.dropped == 0 and runner.lagging_delivered == 1

    # a superseded request that fails is dropped, not reported as the window's failure
    gate.clear()
    runner.request(3)
    runner.request(4)
    gate.set()
    qtbot.waitUntil(lambda: not runner.busy and len(finished) == 2, timeout=5000)
    assert finished[-1] == (runner.generation, 40) and failed == [] and runner.dropped == 1


def test_cancelled_requests_are_never_delivered_even_as_lagging(qtbot):
    gate = threading.Event()
    runner = TaskRunner(lambda x: gate.wait(5) and x, deliver_lagging=True)
    got = []
    runner.lagging.connect(lambda g, result, s: got.append(result))
    runner.finished.connect(lambda g, result, s: got.append(result))
    runner.request(1)
    runner.cancel_pending()  # e.g. another document was opened
    gate.set()
    qtbot.waitUntil(lambda: not runner.busy, timeout=5000)
    qtbot.wait(50)
    assert got == [] and runner.dropped == 1


def test_without_lagging_delivery_a_superseded_result_is_dropped(qtbot):
    gate = threading.Event()
    runner = TaskRunner(lambda x: gate.wait(5) and x)
    got = []
    runner.lagging.connect(lambda g, result, s: got.append(("lagging", result)))
    runner.finished.connect(lambda g, result, s: got.append(("finished", result)))
    runner.request(1)
    runner.request(2)
    gate.set()
    qtbot.waitUntil(lambda: not runner.busy and bool(got), timeout=5000)
    assert got == [("finished", 2)] and runner.dropped == 1
