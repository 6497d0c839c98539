"""The command line as a real process on a sample (python -m profilebench)."""

import re
import subprocess
import sys

import pytest

analysis_module = pytest.importorskip("profilebench.assess.analysis", exc_type=ImportError)

from cli_helpers import summary_rows  # noqa: E402
from profilebench.io.export import CAUTION  # noqa: E402
from profilebench.io.project import load_project  # noqa: E402
from profilebench.io.samples import default_sample_path  # noqa: E402


def _run(*args):
    return subprocess.run(
        [sys.executable, "-m", "profilebench", *args], capture_output=True, text=True, timeout=60
    )


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


def _bow_tie_project(tmp_path):
    """A sample project whose outline crosses itself (two nodes swapped): the analysis reports
    invalid geometry as a status, not an exception."""
    from profilebench.io.project import save_project
    import dataclasses

    project = load_project(default_sample_path())
    nodes = list(project.profile.nodes)
    nodes[1], nodes[2] = nodes[2], nodes[1]
    crossed = dataclasses.replace(
        project.profile,
        nodes=tuple(dataclasses.replace(n, radius=0.0, smooth=False) for n in nodes),
    )
    path = tmp_path / "crossed.json"
    save_project(dataclasses.replace(project, profile=crossed, baseline=None), path)
    return path


def test_failed_analysis_in_a_process(tmp_path):
    path = _bow_tie_project(tmp_path)
    project = load_project(path)
    a = analysis_module.analyze(project.profile, project.conditions)
    assert not a.success
    proc = _run("analyse", str(path))
    assert proc.returncode == 1
    assert a.message.splitlines()[0] in proc.stderr and "Traceback" not in proc.stderr


def test_corrupt_project_in_a_process(tmp_path):
    bad = tmp_path / "bad.json"
    bad.write_text('{"format": "profilebench-project", "version": 1, "profile": ')
    proc = _run("analyse", str(bad))
    assert proc.returncode == 2
    assert proc.stderr.startswith("profilebench: error:") and "Traceback" not in proc.stderr


def test_bad_image_extension_in_a_process(tmp_path):
    proc = _run("analyse", str(default_sample_path()), "--image", str(tmp_path / "r.jpg"))
    assert proc.returncode == 2
    assert "unknown extension '.jpg'" in proc.stderr
    assert not (tmp_path / "r.jpg").exists()


def test_summary_numbers_equal_the_real_analysis(capsys):
    from profilebench.cli import main

    sample = default_sample_path()
    project = load_project(sample)
    a = analysis_module.analyze(project.profile, project.conditions)
    assert main(["analyse", str(sample)]) == 0
    rows = summary_rows(capsys.readouterr().out)
    d = a.drag
    # each value equals the Analysis's within the rounding it is printed with
    for key, value, tol in [
        ("Cd", d.cd, 5e-5),
        ("friction", d.cd_friction, 5e-5),
        ("pressure", d.cd_pressure, 5e-5),
        ("base", d.cd_base, 5e-5),
        ("corners", d.cd_corners, 5e-5),
        ("Cl", d.cl, 5e-5),
    ]:
        assert float(rows[key]) == pytest.approx(value, abs=tol), key
    if d.cda is not None:
        assert float(rows["CdA"]) == pytest.approx(d.cda, abs=5e-5)
        assert float(rows["drag force"]) == pytest.approx(d.force, abs=5e-3)
        assert float(rows["power"]) == pytest.approx(d.power / 1000, abs=5e-4)
    assert float(rows["Reynolds (full scale)"]) == pytest.approx(a.reynolds, rel=5e-4)
    for c in a.corners:
        assert float(rows[c.label or f"node {c.node}"]) == pytest.approx(c.radius * 1000, abs=0.05)
