"""Helpers shared by the reliability tests."""

import json
import signal
import subprocess
import sys
import time
from pathlib import Path

from hypothesis import HealthCheck, Phase

# hypothesis settings of the property tests: repeatable (derandomized, no example database) and
# no shrinking phase, so a failure is reported as found and a failing run stays bounded too
SETTINGS = dict(
    deadline=None,
    derandomize=True,
    database=None,
    phases=(Phase.explicit, Phase.reuse, Phase.generate),
    suppress_health_check=[HealthCheck.too_slow],
)


def write_json(folder: Path, name: str, data) -> Path:
    """Write ``data`` as JSON to ``folder / name``; return the path."""
    path = folder / name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def kill_while_saving(script: str, sample: Path, target: Path, delay: float) -> None:
    """Run ``script`` (a save loop: ``python -c script sample target``) and kill it with
    SIGKILL ``delay`` seconds after ``target`` first appears."""
    proc = subprocess.Popen([sys.executable, "-c", script, str(sample), str(target)])
    try:
        t0 = time.monotonic()
        while not target.exists() and time.monotonic() - t0 < 20:
            time.sleep(0.01)
        time.sleep(delay)
    finally:
        proc.send_signal(signal.SIGKILL)
        proc.wait()
