import sys
from pathlib import Path

# the hand-built Analysis shared with the plotting tests
sys.path.insert(0, str(Path(__file__).parents[1] / "plotting"))
