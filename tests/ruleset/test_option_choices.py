"""Option values a rule lists as its only choices."""

from __future__ import annotations

import pytest

from guard.errors import RulesetError
from guard.ruleset import load_ruleset


def test_an_option_with_listed_choices_refuses_any_other_value() -> None:
    # letter-shape's title-action takes flag, veto or off, nothing else.
    with pytest.raises(RulesetError) as caught:
        load_ruleset("base", overrides={"rules.letter-shape.title-action": "block"})
    assert "expected one of 'flag', 'veto', 'off', got 'block'" in str(caught.value)
