"""``python -m profilebench``: the command line (see profilebench.cli)."""

import sys

from profilebench.cli import main

if __name__ == "__main__":
    sys.exit(main())
