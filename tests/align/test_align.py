"""guard.align: rewrites of typical speller changes, with their kinds and spans.

The pairs are invented; what is checked is the definition of each kind (a split is one
token to several with the same letters, and so on) and the offsets, which must point at
the very text they name.
"""

from __future__ import annotations

import pytest

from guard.align import align, apply
from guard.records import Refinement, Rewrite, RewriteKind

R = RewriteKind
F = Refinement

# (source, proposal, [(old, new, kind, refinement), ...])
CASES = [
    pytest.param(
        "Teh pump is ready", "The pump is ready", [("Teh", "The", R.REPLACE, None)], id="typo-fix"
    ),
    pytest.param(
        "a notebook here",
        "a note book here",
        [("notebook", "note book", R.SPLIT, F.SPACING)],
        id="split",
    ),
    pytest.param(
        "a note book here",
        "a notebook here",
        [("note book", "notebook", R.JOIN, F.SPACING)],
        id="join",
    ),
    pytest.param(
        "a note-book here",
        "a note book here",
        [("note-book", "note book", R.SPLIT, F.PUNCTUATION)],
        id="split-at-hyphen",
    ),
    pytest.param(
        "every day use",
        "everyday use",
        [("every day", "everyday", R.JOIN, F.SPACING)],
        id="join-at-start",
    ),
    pytest.param(
        "use it every day",
        "use it everyday",
        [("every day", "everyday", R.JOIN, F.SPACING)],
        id="join-at-end",
    ),
    pytest.param(
        "see you to day or to morrow",
        "see you today or tomorrow",
        [("to day", "today", R.JOIN, F.SPACING), ("to morrow", "tomorrow", R.JOIN, F.SPACING)],
        id="two-joins-side-by-side",
    ),
    pytest.param(
        "to day to morrow",
        "today tomorrow",
        [("to day", "today", R.JOIN, F.SPACING), ("to morrow", "tomorrow", R.JOIN, F.SPACING)],
        id="two-joins-adjacent",
    ),
    pytest.param(
        "it is under stand able",
        "it is understandable",
        [("under stand able", "understandable", R.JOIN, F.SPACING)],
        id="three-word-join",
    ),
    pytest.param(
        "come to dya",
        "come today",
        [("to dya", "today", R.REPLACE, None)],
        id="join-with-typo-is-one-rewrite",
    ),
    pytest.param("the valve", "the big valve", [("", "big ", R.INSERT, None)], id="insert-word"),
    pytest.param("the big valve", "the valve", [("big ", "", R.DELETE, None)], id="delete-word"),
    pytest.param("do not open", "do open", [("not ", "", R.DELETE, None)], id="delete-negation"),
    pytest.param(
        "Hello world", "hello world", [("Hello", "hello", R.REPLACE, F.CASE)], id="case-only"
    ),
    pytest.param(
        "STRASSE", "Straße", [("STRASSE", "Straße", R.REPLACE, F.CASE)], id="case-only-sharp-s"
    ),
    pytest.param(
        "un cafe noir", "un café noir", [("cafe", "café", R.REPLACE, F.ACCENTS)], id="accents-only"
    ),
    pytest.param(
        "Tieng Viet",
        "Tiếng Việt",
        [("Tieng", "Tiếng", R.REPLACE, F.ACCENTS), ("Viet", "Việt", R.REPLACE, F.ACCENTS)],
        id="accents-vietnamese-stacked",
    ),
    # Thai tone marks are nonspacing marks but not accents: the word changes
    pytest.param("สวัสดีคะ", "สวัสดีค่ะ", [("ค", "ค่", R.REPLACE, None)], id="thai-tone-mark"),
    pytest.param(
        "two  spaces", "two spaces", [("  ", " ", R.REPLACE, F.SPACING)], id="spacing-only"
    ),
    pytest.param("a,b", "a, b", [("", " ", R.INSERT, F.SPACING)], id="insert-space"),
    pytest.param(
        "Stop, now", "Stop now", [(",", "", R.DELETE, F.PUNCTUATION)], id="punctuation-delete"
    ),
    pytest.param(
        "Done.", "Done!", [(".", "!", R.REPLACE, F.PUNCTUATION)], id="punctuation-replace"
    ),
    pytest.param(
        "我喜欢苹果和香蕉",
        "我喜欢苹果和橘子",
        [("香蕉", "橘子", R.REPLACE, None)],
        id="chinese-two-clusters",
    ),
    pytest.param(
        "東京タワーに行く",
        "東京タワーへ行く",
        [("に", "へ", R.REPLACE, None)],
        id="japanese-particle",
    ),
    pytest.param("สวัสดีครับ", "สวัสดีค่ะ", [("ครับ", "ค่ะ", R.REPLACE, None)], id="thai-ending"),
    pytest.param(
        "שלום עולמ", "שלום עולם", [("עולמ", "עולם", R.REPLACE, None)], id="hebrew-final-letter"
    ),
    # French elision: the article and the noun are two words (common practice, no source),
    # so breaking the elision and fixing the noun's typo are two rewrites.
    pytest.param(
        "régler l'alimengation",
        "régler l alimentation",
        [("l'", "l ", R.REPLACE, F.PUNCTUATION), ("alimengation", "alimentation", R.REPLACE, None)],
        id="elision-broken-then-word-fixed",
    ),
    pytest.param(
        "invalid STDSTRINGS here",
        "invalid st strings here",
        [("STDSTRINGS", "st strings", R.REPLACE, None)],
        id="word-inserted-before-a-fix-stays-one",
    ),
    pytest.param("", "new text", [("", "new text", R.INSERT, None)], id="from-empty"),
    pytest.param("old text", "", [("old text", "", R.DELETE, None)], id="to-empty"),
]


@pytest.mark.parametrize(("source", "proposal", "expected"), CASES)
def test_rewrites(
    source: str,
    proposal: str,
    expected: list[tuple[str, str, RewriteKind, Refinement | None]],
) -> None:
    rewrites = align(source, proposal)
    assert [(r.old, r.new, r.kind, r.refinement) for r in rewrites] == expected
    check_offsets(source, proposal, rewrites)
    assert apply(source, rewrites) == proposal
    assert apply(source, []) == source


def check_offsets(source: str, proposal: str, rewrites: tuple[Rewrite, ...]) -> None:
    for i, r in enumerate(rewrites):
        assert r.index == i
        assert source[r.start : r.end] == r.old
        assert proposal[r.new_start : r.new_end] == r.new
        assert "".join(t.text for t in r.old_tokens) == r.old
        assert "".join(t.text for t in r.new_tokens) == r.new
        assert all(source[t.start : t.end] == t.text for t in r.old_tokens)
        assert all(proposal[t.start : t.end] == t.text for t in r.new_tokens)


def test_two_fixes_are_two_rewrites() -> None:
    rewrites = align("Teh pmup is brokn", "The pump is broken")
    assert [(r.start, r.end, r.old, r.new) for r in rewrites] == [
        (0, 3, "Teh", "The"),
        (4, 8, "pmup", "pump"),
        (12, 17, "brokn", "broken"),
    ]


def test_unchanged_whitespace_stays_outside() -> None:
    (r,) = align("set the  dose  now", "set the  dosage  now")
    assert (r.start, r.end, r.old, r.new) == (9, 13, "dose", "dosage")


def test_literal_tokens_are_rewritten_whole() -> None:
    (r,) = align("order XR-220 today", "order XR-230 today")
    assert (r.old, r.new) == ("XR-220", "XR-230")
    (r,) = align("see https://example.org/pump for more", "see https://example.org/pumps for more")
    assert r.old == "https://example.org/pump"


def test_identical_texts_give_no_rewrite() -> None:
    assert align("Nothing to do.", "Nothing to do.") == ()


def test_apply_a_subset() -> None:
    source = "Teh pmup is brokn"
    rewrites = align(source, "The pump is broken")
    assert apply(source, [rewrites[0], rewrites[2]]) == "The pmup is broken"
    assert apply(source, reversed(rewrites)) == "The pump is broken"


def test_apply_rejects_a_rewrite_of_another_text() -> None:
    rewrites = align("Teh pump", "The pump")
    with pytest.raises(ValueError, match="does not fit"):
        apply("Ten pump", rewrites)


def test_apply_rejects_overlaps() -> None:
    (r,) = align("Teh pump", "The pump")
    with pytest.raises(ValueError, match="overlaps"):
        apply("Teh pump", [r, r])
