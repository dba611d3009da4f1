"""A hostile or broken speller cannot slip hidden characters, look-alike letters or a
rewritten text past any bundled ruleset, through the public API, with default settings.

Only what a rewrite adds counts: text that already holds such characters can still be
corrected elsewhere. Sentences are invented; the character facts come from Unicode
(cited beside each table) and are checked against Python's own ``unicodedata``, which
the code under test does not use for these decisions (it uses the ``regex`` module's
properties).
"""

from __future__ import annotations

import unicodedata
from functools import cache

import pytest

from guard.api import Guard, load_ruleset
from guard.records import Report, Verdict
from guard.ruleset.bundled import bundled_names

RULESETS = bundled_names()

SENTENCES = {
    "en": "Please send the invoice to the warehouse by Friday.",
    "de": "Bitte schicken Sie die Rechnung bis Freitag an das Lager.",
}


@cache
def _guard(name: str) -> Guard:
    return Guard(load_ruleset(name))


def _check(ruleset: str, source: str, proposal: str, lang: str = "en") -> Report:
    return _guard(ruleset).check(source, proposal, lang=lang)


def _held(report: Report) -> bool:
    return report.verdict in (Verdict.VETO, Verdict.FLAG)


def _rules(report: Report) -> set[str]:
    return {f.rule for rv in report.rewrites for f in rv.findings} | {
        f.rule for f in report.pair_findings
    }


def test_there_are_bundled_rulesets_to_check() -> None:
    assert "base" in RULESETS and len(RULESETS) >= 2


# ---------------------------------------------------------------- invisible characters

# UAX #9 (Unicode Bidirectional Algorithm), section 2 "Explicit formatting characters" and
# 2.6 "Implicit directional marks": the twelve characters with the Bidi_Control property
# (PropList.txt). The "bidi" column is their Bidi_Class as UnicodeData.txt gives it; the
# explicit ones have a class of their own, the three marks are typed L, R and AL.
BIDI_CONTROLS = [
    ("\u202a", "LRE"),
    ("\u202b", "RLE"),
    ("\u202c", "PDF"),
    ("\u202d", "LRO"),
    ("\u202e", "RLO"),
    ("\u2066", "LRI"),
    ("\u2067", "RLI"),
    ("\u2068", "FSI"),
    ("\u2069", "PDI"),
    ("\u200e", "L"),  # LEFT-TO-RIGHT MARK
    ("\u200f", "R"),  # RIGHT-TO-LEFT MARK
    ("\u061c", "AL"),  # ARABIC LETTER MARK
]

# Format characters (General_Category Cf, UnicodeData.txt) that render as nothing in
# running text, and two Default_Ignorable_Code_Point characters (DerivedCoreProperties.txt)
# that are not Cf: a variation selector and the combining grapheme joiner.
INVISIBLE = [
    ("\u200b", "Cf"),  # ZERO WIDTH SPACE
    ("\u200c", "Cf"),  # ZERO WIDTH NON-JOINER
    ("\u200d", "Cf"),  # ZERO WIDTH JOINER
    ("\u2060", "Cf"),  # WORD JOINER
    ("\u00ad", "Cf"),  # SOFT HYPHEN
    ("\ufeff", "Cf"),  # ZERO WIDTH NO-BREAK SPACE (byte order mark)
    ("\u180e", "Cf"),  # MONGOLIAN VOWEL SEPARATOR
    ("\U000e0041", "Cf"),  # TAG LATIN CAPITAL LETTER A (can smuggle ASCII unseen)
    ("\ufe0f", "Mn"),  # VARIATION SELECTOR-16
    ("\u034f", "Mn"),  # COMBINING GRAPHEME JOINER
]


def _id(ch: str) -> str:
    return f"U+{ord(ch):04X}"


def _placements(text: str, ch: str) -> dict[str, str]:
    """Ways a speller could bring ``ch`` into ``text``: inside a word, between words, in
    place of a space, at the start, at the end."""
    first_space = text.index(" ")
    word_end = text.index(" ", first_space + 1)
    mid = (first_space + word_end) // 2
    return {
        "inside-a-word": text[:mid] + ch + text[mid:],
        "between-words": text[:word_end] + " " + ch + text[word_end:],
        "instead-of-a-space": text[:first_space] + ch + text[first_space + 1 :],
        "at-the-start": ch + text,
        "at-the-end": text + ch,
    }


def test_the_character_tables_agree_with_unicodedata() -> None:
    for ch, bidi in BIDI_CONTROLS:
        assert unicodedata.bidirectional(ch) == bidi, _id(ch)  # UnicodeData.txt Bidi_Class
        assert unicodedata.category(ch) == "Cf", _id(ch)
    for ch, category in INVISIBLE:
        assert unicodedata.category(ch) == category, _id(ch)


# Every character in an English sentence; a few in a German one (the rule does not look
# at the language, so more would only repeat the same path).
INJECTIONS = [("en", c) for c, _ in BIDI_CONTROLS + INVISIBLE] + [
    ("de", c) for c in ("\u202e", "\u200b", "\u00ad")
]


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize(
    ("lang", "ch"), INJECTIONS, ids=[f"{lang}-{_id(c)}" for lang, c in INJECTIONS]
)
def test_an_injected_invisible_character_is_held(ruleset: str, lang: str, ch: str) -> None:
    source = SENTENCES[lang]
    for where, proposal in _placements(source, ch).items():
        report = _check(ruleset, source, proposal, lang)
        assert _held(report), (where, report.verdict)
        assert "hidden-character" in _rules(report), where
        points = [
            f.evidence.get("code_points")
            for rv in report.rewrites
            for f in rv.findings
            if f.rule == "hidden-character"
        ]
        assert (_id(ch),) in points, where
        # whatever the verdict, the strict guarded text never carries the character
        assert ch not in report.guarded_strict, where
        if report.verdict is Verdict.VETO:
            assert ch not in report.guarded, where


# ---------------------------------------------------------------- look-alike letters

# UTS #39 (Unicode Security Mechanisms), confusables.txt maps each of these to the Latin
# letter beside it, e.g. "0430 ; 0061 ; MA # ( а → a ) CYRILLIC SMALL LETTER A → LATIN
# SMALL LETTER A" (that line checked in confusables.txt; the others from memory, their
# scripts checked below against unicodedata names).
LOOKALIKES = [
    ("\u0430", "a", "warehouse", "CYRILLIC"),
    ("\u0435", "e", "send", "CYRILLIC"),
    ("\u043e", "o", "invoice", "CYRILLIC"),
    ("\u0420", "P", "Please", "CYRILLIC"),
    ("\u0441", "c", "invoice", "CYRILLIC"),
    ("\u0456", "i", "Friday", "CYRILLIC"),
    ("\u0455", "s", "send", "CYRILLIC"),
    ("\u03bf", "o", "to", "GREEK"),
    ("\u0391", "A", "Alpha", "GREEK"),
    ("\u0585", "o", "invoice", "ARMENIAN"),
]

LOOKALIKE_SOURCE = "Please send the invoice to the warehouse by Friday. Alpha dock."


def _swap(text: str, word: str, latin: str, other: str) -> str:
    """``text`` with the first ``latin`` letter of ``word`` replaced by ``other``."""
    start = text.index(word)
    i = word.index(latin)
    return text[: start + i] + other + text[start + i + 1 :]


def test_the_look_alikes_are_letters_of_another_script() -> None:
    for other, latin, _, script in LOOKALIKES:
        assert unicodedata.name(other).startswith(script), _id(other)
        assert unicodedata.name(latin).startswith("LATIN"), latin
        assert unicodedata.category(other) == unicodedata.category(latin), _id(other)


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize(
    ("other", "latin", "word"),
    [(o, latin, w) for o, latin, w, _ in LOOKALIKES],
    ids=[f"{_id(o)}-for-{latin}-in-{w}" for o, latin, w, _ in LOOKALIKES],
)
def test_a_look_alike_letter_from_another_script_is_held(
    ruleset: str, other: str, latin: str, word: str
) -> None:
    proposal = _swap(LOOKALIKE_SOURCE, word, latin, other)
    assert proposal != LOOKALIKE_SOURCE
    report = _check(ruleset, LOOKALIKE_SOURCE, proposal)
    assert _held(report), report.verdict
    assert "script-change" in _rules(report)
    assert other not in report.guarded_strict


@pytest.mark.parametrize("ruleset", RULESETS)
def test_a_typo_fixed_with_a_look_alike_letter_is_held(ruleset: str) -> None:
    """The right word, spelt with a Cyrillic о (U+043E): the speller fixed the typo and
    smuggled a look-alike in with the fix."""
    source = "Please send the invocie to the warehouse by Friday."
    proposal = "Please send the inv\u043eice to the warehouse by Friday."
    report = _check(ruleset, source, proposal)
    assert _held(report) and "script-change" in _rules(report)
    assert report.guarded_strict == source


@pytest.mark.parametrize("ruleset", RULESETS)
def test_a_latin_word_swapped_for_a_word_of_another_script_is_held(ruleset: str) -> None:
    source = LOOKALIKE_SOURCE
    proposal = source.replace("send", "\u0455\u0435nd").replace("to the", "\u03c4\u03bf the")
    report = _check(ruleset, source, proposal)
    assert _held(report) and "script-change" in _rules(report)
    assert report.guarded_strict == source


# ---------------------------------------------------------------- whole-text rewrites

REWRITES = {
    "en-paraphrase": (
        "en",
        "Please send the invoice to the warehouse by Friday.",
        "Kindly forward all billing documents to our storage facility before the weekend.",
    ),
    "en-other-message": (
        "en",
        "The pump housing ships from depot four on Monday.",
        "Our meeting has moved to Thursday morning at nine.",
    ),
    "en-short": ("en", "Ship it today.", "Cancel the order."),
    "de-paraphrase": (
        "de",
        "Bitte schicken Sie die Rechnung bis Freitag an das Lager.",
        "Leiten Sie sämtliche Unterlagen umgehend an unsere Buchhaltung weiter.",
    ),
}


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize("case", list(REWRITES))
def test_a_rewrite_of_the_whole_text_is_held(ruleset: str, case: str) -> None:
    lang, source, proposal = REWRITES[case]
    report = _check(ruleset, source, proposal, lang)
    assert _held(report), report.verdict
    assert report.guarded_strict != proposal


# ---------------------------------------------------------------- only what is added counts

TYPO_SOURCE = "Please send the invoice to the warehuose by Friday."
TYPO_FIXED = "Please send the invoice to the warehouse by Friday."


def _already(text: str, what: str) -> str:
    if what == "cyrillic-word":
        return text.replace("Please", "Please (\u0441\u043a\u043b\u0430\u0434)")  # склад
    if what == "look-alike-word":
        return text.replace("invoice", "inv\u043eice")
    return text.replace("invoice", "in" + what + "voice")


PRESENT = {
    "U+200B": "\u200b",
    "U+202E": "\u202e",
    "U+2066-U+2069": "\u2066\u2069",
    "U+00AD": "\u00ad",
    "cyrillic-word": "cyrillic-word",
    "look-alike-word": "look-alike-word",
}


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize("present", list(PRESENT))
def test_characters_already_in_the_source_do_not_count_against_a_fix_elsewhere(
    ruleset: str, present: str
) -> None:
    source = _already(TYPO_SOURCE, PRESENT[present])
    proposal = _already(TYPO_FIXED, PRESENT[present])
    report = _check(ruleset, source, proposal)
    assert [rv.rewrite.old for rv in report.rewrites] == ["warehuose"]
    assert not _rules(report) & {"hidden-character", "script-change"}
    assert report.verdict is not Verdict.VETO
    assert report.guarded == proposal


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize(
    "added", ["\u200b", "\u202e", "\u0430"], ids=["U+200B", "U+202E", "U+0430"]
)
def test_a_second_one_added_where_the_source_has_one_still_counts(ruleset: str, added: str) -> None:
    """The source already holds U+200B and a Cyrillic word; the proposal fixes the typo and
    adds one more hidden or look-alike character elsewhere: that one is the speller's."""
    source = _already(_already(TYPO_SOURCE, "\u200b"), "cyrillic-word")
    proposal = _already(_already(TYPO_FIXED, "\u200b"), "cyrillic-word")
    proposal = proposal.replace(
        "Friday", "Fri" + added + "day" if added != "\u0430" else "Frid\u0430y"
    )
    report = _check(ruleset, source, proposal)
    by_old = {rv.rewrite.old: rv for rv in report.rewrites}
    assert by_old["Friday"].verdict in (Verdict.VETO, Verdict.FLAG)
    assert {f.rule for f in by_old["Friday"].findings} & {"hidden-character", "script-change"}
    assert "Friday" in report.guarded_strict
    assert "warehouse" in report.guarded


# ---------------------------------------------------------------- same script, still disguised

# Not a change of script, yet not the word either: stacked combining marks, a dotless ı
# (UTS #39 confusables.txt maps U+0131 to 'i'; from memory), a fullwidth letter and
# mathematical or fullwidth digits (NFKC folds them to ASCII, UAX #15; checked below).
DISGUISED = {
    "stacked-marks": ("Please pay the invoice.", "Please pa\u0301\u0301\u0301y the invoice."),
    "dotless-i": ("Please send the invocie.", "Please send the invo\u0131ce."),
    "fullwidth-letter": ("Please send the invocie.", "Please send the inv\uff4fice."),
    "math-digit": ("Send 10 units.", "Send \U0001d7cf0 units."),
    "fullwidth-digit": ("Send 10 units.", "Send \uff110 units."),
}


def test_the_disguises_fold_to_plain_text() -> None:
    for ch, plain in (("\uff4f", "o"), ("\U0001d7cf", "1"), ("\uff11", "1")):
        assert unicodedata.normalize("NFKC", ch) == plain, _id(ch)


@pytest.mark.parametrize("ruleset", RULESETS)
@pytest.mark.parametrize("case", list(DISGUISED))
def test_a_disguised_letter_or_digit_of_the_same_script_is_held(ruleset: str, case: str) -> None:
    source, proposal = DISGUISED[case]
    report = _check(ruleset, source, proposal)
    assert _held(report), report.verdict


# ---------------------------------------------------------------- a wrapped speller


@pytest.mark.parametrize("ruleset", RULESETS)
def test_a_wrapped_hostile_speller_hands_back_clean_text(ruleset: str) -> None:
    """``Guard.wrap``: a speller that smuggles a bidi override gets its text back with the
    override undone; an n-best speller whose top candidate is hostile loses to the clean
    one below it."""
    source = "Please send the invocie to the warehouse by Friday."
    fixed = "Please send the invoice to the warehouse by Friday."
    hostile = fixed.replace("warehouse", "\u202ewarehouse")
    one = _guard(ruleset).wrap(lambda text: hostile, lang="en", undo_flagged=True)
    assert "\u202e" not in one(source)
    lookalike = fixed.replace("invoice", "inv\u043eice")
    nbest = _guard(ruleset).wrap(lambda text: [(lookalike, 0.9), (fixed, 0.6)], lang="en")
    result = nbest.run(source)
    assert result.text == fixed and result.report.proposal == fixed
