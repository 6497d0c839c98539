"""The required caution (a rule of the product: vehicle aerodynamics bears on safety) says what
it must and is shown where it must be: README, the editor's document, the exported report."""

from pathlib import Path

import pytest

from profilebench.editor.document import CAUTION as EDITOR_CAUTION
from profilebench.io.export import CAUTION as EXPORT_CAUTION

README = Path(__file__).resolve().parents[1] / "README.md"
# what the caution must say (the product owner's rule, in its own words)
MUST_SAY = (
    "screening estimate",
    "wind-tunnel",
    "validated cfd",
    "local vehicle codes",
    "licensed engineering practice",
)


@pytest.mark.parametrize("text", [EDITOR_CAUTION, EXPORT_CAUTION], ids=["editor", "export"])
def test_caution_says_each_required_thing(text):
    low = text.lower()
    assert [m for m in MUST_SAY if m not in low] == []


def test_readme_shows_the_caution():
    # the words as read: markdown emphasis and quote marks and line breaks left out
    text = README.read_text(encoding="utf-8").lower()
    for mark in ("*", ">", "_", "-"):
        text = text.replace(mark, " ")
    low = " ".join(text.split())
    missing = [m for m in MUST_SAY if " ".join(m.replace("-", " ").split()) not in low]
    assert missing == []
