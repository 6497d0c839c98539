"""Helpers shared by the reliability tests."""

import json
from pathlib import Path


def write_json(folder: Path, name: str, data) -> Path:
    """Write ``data`` as JSON to ``folder / name``; return the path."""
    path = folder / name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path
