"""Which autosave interval the editor uses (profilebench.editor.recovery.autosave_interval), no Qt.

The order (argument, then the environment, then the setting, then 60 s) and the range (100 ms
to a day; a QTimer holds at most 2**31 - 1 ms) are this editor's rules, no source.
"""

import pytest

from profilebench.editor.recovery import (
    AUTOSAVE_ENV,
    AUTOSAVE_MAX_MS,
    AUTOSAVE_MS,
    autosave_interval,
)
from profilebench.errors import InputError


@pytest.mark.parametrize(
    "given, environment, setting, ms",
    [
        (None, None, None, AUTOSAVE_MS),
        (500, "700", "900", 500),
        (None, "700", "900", 700),
        (None, "", "900", 900),
        (None, None, "1500.7", 1500),  # whole ms
        (None, None, str(AUTOSAVE_MAX_MS), AUTOSAVE_MAX_MS),
    ],
)
def test_the_first_source_given_sets_the_interval(given, environment, setting, ms):
    assert autosave_interval(given, environment, setting) == (ms, [])


@pytest.mark.parametrize("bad", ["abc", "1e30", "nan", "-5", "inf", "99"])
def test_a_bad_environment_value_is_told_and_the_next_source_used(bad):
    ms, problems = autosave_interval(None, bad, "900")
    assert ms == 900
    assert len(problems) == 1 and AUTOSAVE_ENV in problems[0]
    ms, problems = autosave_interval(None, None, bad)
    assert ms == AUTOSAVE_MS and "setting autosave_ms" in problems[0]


def test_a_bad_argument_raises():
    with pytest.raises(InputError, match="outside 100 ms"):
        autosave_interval(50, "700")
    with pytest.raises(InputError, match="not a number"):
        autosave_interval("soon")
