"""split-word: a word cut into several whose letters change too.

That a dropped space is repaired by a space alone, and that two slips in one place are
rarer than one, are facts of the trade (common practice, no source; single-edit share of
misspellings: Damerau 1964, from memory). Edit distances are checked against jellyfish,
which the rule does not call.
"""

from __future__ import annotations

import jellyfish
import pytest

from guard.api import Guard, load_ruleset
from guard.records import Action, Report


@pytest.fixture(scope="module")
def base() -> Guard:
    return Guard(load_ruleset("base"))


def split_word(report: Report) -> set[Action]:
    return {f.action for f in report.findings if f.rule == "split-word"}


CASES = [
    # a lost space put back, nothing else: not this rule's business
    ("see thereport now", "see the report now", None),
    ("send an e-mail", "send an e mail", None),
    # cut in two and bent to fit: the letters differ
    ("read the nodelist", "read the node lost", Action.VETO),
    # a typo fixed and a word set beside it: one new word is the old one, one edit away
    ("the fiel here", "the file a here", None),
]


@pytest.mark.parametrize(("source", "proposal", "expected"), CASES)
def test_split_word(base: Guard, source: str, proposal: str, expected: Action | None) -> None:
    got = split_word(base.check(source, proposal, lang="en"))
    assert got == (set() if expected is None else {expected})


def test_the_fix_reach_is_an_edit_distance() -> None:
    assert jellyfish.damerau_levenshtein_distance("fiel", "file") == 1  # within fix-reach 2
    assert jellyfish.damerau_levenshtein_distance("nodelist", "node") > 2
    assert jellyfish.damerau_levenshtein_distance("nodelist", "lost") > 2
