"""The tree passes ruff's checks (the rules chosen in pyproject.toml: pyflakes and syntax) and is
in ruff's format."""

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
TREE = ("profilebench", "tests", "tools", "benchmarks")


@pytest.mark.parametrize("command", [["check"], ["format", "--check"]], ids=["lint", "format"])
def test_ruff_is_satisfied(command):
    proc = subprocess.run(
        [sys.executable, "-m", "ruff", *command, "--no-cache", *TREE],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr
