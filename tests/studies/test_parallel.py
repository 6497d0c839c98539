"""Running a study on processes: the serial answer, progress, cancellation leaving no child
process, a lost worker reported, and the cache making a repeat instant."""

import os
import threading

import pytest

import profilebench.studies.runner as runner
from profilebench.assess.conditions import Conditions
from profilebench.errors import InputError
from profilebench.geometry.shapes import rounded_box
from profilebench.studies import PointCache, PointStatus, radius_sweep
from profilebench.studies.points import PointSpec
from profilebench.studies.runner import run_points

BODY = rounded_box(2.0, 0.5, radius=(0.1, 0.0, 0.0, 0.1), clearance=0.05, name="test body")
COND = Conditions(speed=30.0, ground=True, width=1.0, panels=150)
RADII = [0.0, 0.03, 0.06, 0.09]


def _children():
    """The ids of processes whose parent is this one, read from /proc (Linux), but multiprocessing's
    resource tracker: one per process once anything was spawned, not a worker, and it ends
    with this process (Python's multiprocessing documentation, "resource tracker")."""
    me, out = os.getpid(), []
    for pid in os.listdir("/proc"):
        if not pid.isdigit():
            continue
        try:
            with open(f"/proc/{pid}/stat") as fh:
                stat = fh.read()
        except OSError:
            continue
        # the fields after the command name (in parentheses): state, ppid, ...
        if int(stat.rsplit(")", 1)[1].split()[1]) != me:
            continue
        try:
            with open(f"/proc/{pid}/cmdline", "rb") as fh:
                command = fh.read().decode("utf-8", "replace")
        except OSError:
            continue
        if "multiprocessing.resource_tracker" not in command:
            out.append(int(pid))
    return set(out)


@pytest.fixture
def no_new_children():
    """After the test, no child process that was not there before it (other tests of the suite
    may leave their own, such as the editor's analysis process, and the workers' fork server,
    one for the program's life, is started first)."""
    import multiprocessing

    from profilebench.studies.runner import start_worker_server

    start_worker_server()
    before, mp_before = _children(), set(multiprocessing.active_children())
    yield
    assert _children() - before == set()
    assert set(multiprocessing.active_children()) - mp_before == set()


@pytest.mark.parametrize("start_method", ["fork", "forkserver", "spawn"])
def test_workers_give_the_serial_answer(start_method, no_new_children):
    serial = radius_sweep(
        BODY, COND, 3, radii=RADII[:2], workers=1, search=False, cache=PointCache()
    )
    parallel = radius_sweep(
        BODY,
        COND,
        3,
        radii=RADII[:2],
        workers=2,
        search=False,
        cache=PointCache(),
        start_method=start_method,
    )
    assert parallel.stats.computed == 2
    assert parallel.cd.tolist() == serial.cd.tolist()
    assert parallel.status == serial.status


def test_progress_reports_each_point_as_it_finishes():
    seen = []
    radius_sweep(
        BODY,
        COND,
        3,
        radii=RADII,
        workers=2,
        search=False,
        cache=PointCache(),
        progress=lambda done, total, i, r: seen.append((done, total, i, r.status)),
    )
    assert [d for d, _, _, _ in seen] == [1, 2, 3, 4]
    assert sorted(i for _, _, i, _ in seen) == [0, 1, 2, 3]
    assert {t for _, t, _, _ in seen} == {4}


def test_cancelled_sweep_leaves_no_child_process(no_new_children):
    stop = threading.Event()
    radii = [0.01 * k for k in range(12)]

    def progress(done, total, i, result):
        stop.set()  # cancel as soon as the first point is in

    table = radius_sweep(
        BODY,
        COND,
        3,
        radii=radii,
        workers=2,
        search=False,
        cache=PointCache(),
        progress=progress,
        cancel=stop,
    )
    assert table.cancelled
    assert PointStatus.CANCELLED in table.status
    assert table.stats.computed < len(radii)


def test_cancel_may_be_a_callable_and_a_serial_run_stops_between_points():
    calls = []
    table = radius_sweep(
        BODY,
        COND,
        3,
        radii=RADII,
        workers=1,
        search=False,
        cache=PointCache(),
        cancel=lambda: len(calls) >= 1,
        progress=lambda *a: calls.append(a),
    )
    assert table.status[0] is PointStatus.SUCCESS
    assert table.status[1:] == (PointStatus.CANCELLED,) * 3
    assert table.stats.computed == 1


def test_a_repeated_sweep_comes_from_the_cache_without_analysis(monkeypatch):
    cache = PointCache()
    first = radius_sweep(BODY, COND, 3, radii=RADII[:3], workers=1, cache=cache)
    assert first.stats.computed == 3

    def no_analysis(spec):
        raise AssertionError("a cached point was analysed again")

    monkeypatch.setattr(runner, "analyse_point", no_analysis)
    again = radius_sweep(BODY, COND, 3, radii=RADII[:3], workers=2, cache=cache)
    assert again.stats.computed == 0 and again.stats.from_cache == 3
    assert again.cd.tolist() == first.cd.tolist()
    # other conditions are another key: analysed (here: refused by the stand-in)
    with pytest.raises(AssertionError, match="analysed again"):
        radius_sweep(BODY, COND.replace(speed=31.0), 3, radii=RADII[:3], workers=1, cache=cache)


def _die(spec):
    os._exit(3)


def test_a_worker_that_dies_is_reported_not_fatal(monkeypatch, no_new_children):
    monkeypatch.setattr(runner, "analyse_point", _die)
    specs = [PointSpec(BODY, COND), PointSpec(BODY.with_radius(3, 0.05), COND)]
    results, stats = run_points(specs, workers=2, cache=PointCache(), start_method="fork")
    assert {r.status for r in results} == {PointStatus.WORKER_LOST}
    assert all("ended without an answer" in r.message for r in results)
    assert stats.computed == 0


def test_an_interrupt_mid_sweep_shuts_the_pool_down(no_new_children):
    # Ctrl-C in the command line arrives as KeyboardInterrupt in the waiting loop
    def progress(done, total, i, result):
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        radius_sweep(
            BODY,
            COND,
            3,
            radii=RADII,
            workers=2,
            search=False,
            cache=PointCache(),
            progress=progress,
        )


@pytest.mark.skipif(not hasattr(os, "nice"), reason="POSIX niceness")
def test_workers_run_at_the_niceness_asked(no_new_children):
    """The pool's workers start through runner._lower_priority (as _run_parallel makes them):
    their niceness is this process's plus the increment (POSIX nice(2): os.nice(0) reads it)."""
    import concurrent.futures as cf
    import multiprocessing

    mine = os.nice(0)
    with cf.ProcessPoolExecutor(
        1,
        mp_context=multiprocessing.get_context("fork"),
        initializer=runner._lower_priority,
        initargs=(3,),
    ) as pool:
        assert pool.submit(os.nice, 0).result() == min(mine + 3, 19)


@pytest.mark.parametrize("bad", [-1, 20, 2.5, True])
def test_a_bad_niceness_is_refused(bad):
    with pytest.raises(InputError, match="niceness"):
        run_points([], niceness=bad)


def test_points_start_in_the_order_given_and_come_back_in_their_own():
    specs = [PointSpec(BODY.with_radius(0, r), COND) for r in RADII]
    seen = []
    results, _ = run_points(
        specs,
        workers=1,
        cache=PointCache(),
        order=(0, 3, 2, 1),
        progress=lambda done, total, i, r: seen.append(i),
    )
    assert seen == [0, 3, 2, 1]
    alone, _ = run_points(specs, workers=1, cache=PointCache())
    assert [r.cd for r in results] == [r.cd for r in alone]


@pytest.mark.parametrize("order", [(0, 1, 2), (0, 1, 2, 2), (0, 1, 2, 4)])
def test_an_order_that_is_not_one_of_each_point_is_refused(order):
    specs = [PointSpec(BODY.with_radius(0, r), COND) for r in RADII]
    with pytest.raises(InputError, match="each of the 4 point indices"):
        run_points(specs, workers=1, cache=PointCache(), order=order)


def test_radius_sweep_starts_with_the_searching_point_then_from_the_largest_radius():
    from profilebench.studies import radius_plan

    plan = radius_plan(BODY, COND, 0, RADII)
    assert plan.order == (0, 3, 2, 1)
    assert [s.search_node for s in plan.specs] == [0, None, None, None]
