"""Shared helpers of the reliability tests (public entry points only)."""

import json
from pathlib import Path

import pytest

from profilebench.io.samples import default_sample_path


@pytest.fixture
def sample_dict():
    """A fresh parsed copy of the default sample project file (a known-good project)."""
    return json.loads(Path(default_sample_path()).read_text(encoding="utf-8"))
