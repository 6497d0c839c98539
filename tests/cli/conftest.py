import sys
from pathlib import Path

import pytest

# the hand-built Analysis shared with the plotting tests
sys.path.insert(0, str(Path(__file__).parents[1] / "plotting"))


@pytest.fixture
def fresh_point_cache():
    """An empty point cache (the process-wide one the CLI uses) before and after the test."""
    from profilebench.studies import POINT_CACHE

    POINT_CACHE.clear()
    yield
    POINT_CACHE.clear()
