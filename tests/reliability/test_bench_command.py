"""The ``profilebench bench`` command: its help only (benchmarks are never timed in tests)."""

from profilebench.cli import BENCH_SCRIPTS, main


def test_bench_help(capsys):
    assert main(["bench", "--help"]) == 0  # argparse's --help exits 0
    out = capsys.readouterr().out
    assert "usage: profilebench bench" in out
    for name in BENCH_SCRIPTS:
        assert name in out


def test_bench_unknown_name_is_bad_input(capsys):
    assert main(["bench", "--only", "bench_nothing"]) == 2
    err = capsys.readouterr().err
    assert "'bench_nothing' is not a benchmark" in err and "choose from" in err
