"""Helpers shared by the command-line tests."""

import re


def summary_rows(text):
    """Table rows of a printed summary: {first cell: second cell} (cells split at 2+ spaces)."""
    out = {}
    for line in text.splitlines():
        cells = re.split(r"\s{2,}", line.strip())
        if len(cells) >= 2:
            out.setdefault(cells[0], cells[1])
    return out
