"""The invented sample profiles shipped with profilebench (project files in sample_profiles/)."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

__all__ = ["sample_paths", "default_sample_path", "DEFAULT_SAMPLE"]

#: File name of the profile the tool opens by default.
DEFAULT_SAMPLE = "kestrel_hatch.json"


def _folder() -> Path:
    return Path(str(resources.files("profilebench") / "sample_profiles"))


def sample_paths() -> list[Path]:
    """Paths of every sample project file, sorted by file name."""
    return sorted(p for p in _folder().glob("*.json") if p.is_file())


def default_sample_path() -> Path:
    """Path of the default sample project (the Kestrel hatchback)."""
    return _folder() / DEFAULT_SAMPLE
