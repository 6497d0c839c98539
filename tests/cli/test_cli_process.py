"""The command line as a real process on a sample (python -m profilebench)."""

import re
import subprocess
import sys

import pytest

analysis_module = pytest.importorskip("profilebench.assess.analysis", exc_type=ImportError)

from profilebench.io.export import CAUTION  # noqa: E402
from profilebench.io.project import load_project  # noqa: E402
from profilebench.io.samples import default_sample_path  # noqa: E402


def _run(*args):
    return subprocess.run([sys.executable, "-m", "profilebench", *args], capture_output=True,
                          text=True, timeout=60)


def test_analyse_sample_in_a_process(tmp_path):
    sample = default_sample_path()
    proc = _run("analyse", str(sample), "--image", str(tmp_path / "r.svg"))
    assert proc.returncode == 0, proc.stderr
    assert CAUTION in proc.stdout
    project = load_project(sample)
    a = analysis_module.analyze(project.profile, project.conditions)
    line = next(l for l in proc.stdout.splitlines() if l.startswith("Cd "))
    # the same analysis in this process: the printed Cd (4 decimals) equals it
    assert float(re.split(r"\s{2,}", line)[1]) == pytest.approx(a.drag.cd, abs=5e-5)
    assert (tmp_path / "r.svg").read_text().lstrip().startswith("<?xml")


def test_missing_file_in_a_process():
    proc = _run("analyse", "no_such_project.json")
    assert proc.returncode == 2
    assert "no project file" in proc.stderr and "Traceback" not in proc.stderr
