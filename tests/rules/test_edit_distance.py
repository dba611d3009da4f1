"""The edit distance behind edit-budget, checked against textbook values and against
jellyfish, a reference library the code under test does not call (it uses rapidfuzz)."""

from __future__ import annotations

import jellyfish
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.rules.edit_budget import NEIGHBOURS, weighted_distance


@pytest.mark.parametrize(
    ("a", "b", "expected"),
    [
        # Jurafsky & Martin, Speech and Language Processing, ch. 2 (minimum edit distance):
        # intention -> execution is 5 with unit costs (from memory: the book's figure uses
        # substitution cost 2 for its 8; with cost 1 it is 5, as jellyfish confirms below).
        ("intention", "execution", 5.0),
        # The pair where optimal string alignment and unrestricted Damerau-Levenshtein
        # differ (Wikipedia, "Damerau-Levenshtein distance", OSA section): CA -> ABC is 3
        # under OSA (no substring edited twice) and 2 unrestricted.
        ("ca", "abc", 3.0),
        ("kitten", "sitting", 3.0),  # Levenshtein's classic example (common practice, no source)
        ("recieve", "receive", 1.0),  # one adjacent transposition
        ("", "abc", 3.0),
    ],
    ids=["intention-execution", "osa-vs-dl", "kitten-sitting", "transposition", "empty"],
)
def test_textbook_distances(a: str, b: str, expected: float) -> None:
    assert weighted_distance(a, b, 1.0) == expected


def test_references_agree_on_the_textbook_pairs() -> None:
    # jellyfish's own values for the same pairs.
    assert jellyfish.levenshtein_distance("intention", "execution") == 5
    assert jellyfish.damerau_levenshtein_distance("ca", "abc") == 2


@settings(max_examples=500, deadline=None)
@given(st.text(alphabet="abcde", max_size=8), st.text(alphabet="abcde", max_size=8))
def test_osa_lies_between_unrestricted_damerau_and_levenshtein(a: str, b: str) -> None:
    # OSA allows a subset of Damerau-Levenshtein's edits and a superset of Levenshtein's,
    # so DL <= OSA <= Lev (a standard property of the three distances, common practice).
    osa = weighted_distance(a, b, 1.0)
    assert (
        jellyfish.damerau_levenshtein_distance(a, b) <= osa <= jellyfish.levenshtein_distance(a, b)
    )


def test_keyboard_neighbours_cost_less() -> None:
    assert "s" in NEIGHBOURS["a"] and "w" in NEIGHBOURS["q"]  # QWERTY home and top rows
    assert weighted_distance("cat", "cst", 0.5) == 0.5
    assert weighted_distance("cat", "cut", 0.5) == 1.0
