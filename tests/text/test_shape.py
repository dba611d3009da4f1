"""guard.text.shape: case shapes, digits, and UTS #39 script sets."""

from __future__ import annotations

import pytest
import regex
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.text.shape import (
    Shape,
    _find_shape,
    _shape_by_letters,
    all_scripts,
    has_digit,
    is_mixed_script,
    resolved_script_set,
    script_names,
    scripts_of,
    shape_of,
)

SHAPES = [
    pytest.param("pump", Shape.LOWER, id="lower"),
    pytest.param("Pump", Shape.TITLE, id="title"),
    pytest.param("A", Shape.TITLE, id="single-capital-is-title"),
    pytest.param("ZKTL", Shape.ALLCAPS, id="allcaps"),
    pytest.param("XR-220", Shape.ALLCAPS, id="allcaps-code"),
    pytest.param("U.S", Shape.ALLCAPS, id="allcaps-dotted"),
    pytest.param("iPump", Shape.INTERNAL_CAP, id="lower-then-capital"),
    pytest.param("McName", Shape.INTERNAL_CAP, id="mc-name"),
    pytest.param("camelCase", Shape.INTERNAL_CAP, id="camel"),
    pytest.param("PhD", Shape.INTERNAL_CAP, id="phd"),
    pytest.param("x-Ray", Shape.INTERNAL_CAP, id="lower-part-then-title-part"),
    pytest.param("Jean-Luc", Shape.TITLE, id="hyphenated-title"),
    pytest.param("Well-known", Shape.TITLE, id="title-then-lower-part"),
    pytest.param("42", Shape.NOCASE, id="digits"),
    pytest.param("東京", Shape.NOCASE, id="han-uncased"),
    pytest.param("שלום", Shape.NOCASE, id="hebrew-uncased"),
    # UnicodeData.txt: U+01C5 is Lt (titlecase), U+0394 Lu, U+03B4 Ll
    pytest.param("\u01c5emal", Shape.TITLE, id="titlecase-digraph"),
    pytest.param("Δέλτα", Shape.TITLE, id="greek-title"),
    pytest.param("ΔΈΛΤΑ", Shape.ALLCAPS, id="greek-allcaps"),
    pytest.param("Straße", Shape.TITLE, id="sharp-s-lower"),
]


@pytest.mark.parametrize(("text", "shape"), SHAPES)
def test_shape_of(text: str, shape: Shape) -> None:
    assert shape_of(text) is shape


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        pytest.param("XR-220", True, id="ascii-digit"),
        pytest.param("٣", True, id="arabic-indic-digit"),  # U+0663 is Nd
        pytest.param("x²", True, id="superscript"),  # U+00B2 is No
        pytest.param("Ⅻ", True, id="roman-numeral"),  # U+216B is Nl
        pytest.param("pump", False, id="letters"),
    ],
)
def test_has_digit(text: str, expected: bool) -> None:
    assert has_digit(text) is expected


# UTS #39 section 5.1 "Mixed-Script Detection", its table of examples with their
# resolved script sets (ISO 15924 codes there; our long names here, Han for Hani).
UTS39_EXAMPLES = [
    pytest.param("Circle", frozenset({"Latin"}), id="Circle-Latn"),
    pytest.param("\u0421\u0456\u0433\u0441\u04c0\u0435", frozenset({"Cyrillic"}), id="all-Cyrl"),
    pytest.param("\u0421ir\u0441l\u0435", frozenset(), id="Cyrl-Latn-mixture-empty"),
    pytest.param("Circ1e", frozenset({"Latin"}), id="digit-is-common"),
    pytest.param(
        "C\U0001d5c2\U0001d5cb\U0001d5bc\U0001d5c5\U0001d5be", frozenset({"Latin"}), id="C-math"
    ),
    pytest.param("〆切", frozenset({"Han", "Hanb", "Jpan", "Kore"}), id="han-augmented"),
    pytest.param("ねガ", frozenset({"Jpan"}), id="hiragana-katakana-jpan"),
]


@pytest.mark.parametrize(("text", "resolved"), UTS39_EXAMPLES)
def test_resolved_script_set_uts39(text: str, resolved: frozenset[str]) -> None:
    assert resolved_script_set(text) == resolved
    assert is_mixed_script(text) is (not resolved)


def test_all_common_resolves_to_all() -> None:
    # UTS #39 section 5.1 table: "𝖢𝗂𝗋𝖼𝗅𝖾" (mathematical sans-serif letters, Common) is ALL
    text = "\U0001d5a2\U0001d5c2\U0001d5cb\U0001d5bc\U0001d5c5\U0001d5be"
    assert resolved_script_set(text) == all_scripts()
    assert not is_mixed_script(text)
    assert not is_mixed_script("")


@pytest.mark.parametrize(
    ("text", "scripts"),
    [
        pytest.param("Circle", {"Latin"}, id="latin"),
        # U+0430 CYRILLIC SMALL LETTER A in a Latin word (Scripts.txt: 0430 Cyrillic)
        pytest.param("p\u0430y", {"Latin", "Cyrillic"}, id="one-cyrillic-a"),
        pytest.param("e\u0301", {"Latin"}, id="inherited-mark-ignored"),
        pytest.param("42!", set(), id="common-only"),
        pytest.param("東京タワー", {"Han", "Katakana"}, id="han-katakana"),
        pytest.param("שלום", {"Hebrew"}, id="hebrew"),
        pytest.param("مرحبا", {"Arabic"}, id="arabic"),
        pytest.param("สวัสดี", {"Thai"}, id="thai"),
    ],
)
def test_scripts_of(text: str, scripts: set[str]) -> None:
    assert scripts_of(text) == scripts


def test_latin_word_with_cyrillic_a_is_mixed() -> None:
    # UTS #39 section 5.1: a single-script look-alike substitution empties the set.
    assert is_mixed_script("p\u0430y")
    assert not is_mixed_script("pay")


def test_script_names_use_long_names() -> None:
    names = script_names()
    # PropertyValueAliases.txt long names (sc ; Hani ; Han, sc ; Zyyy ; Common, ...)
    assert {"Latin", "Cyrillic", "Greek", "Han", "Common", "Inherited", "Old_Italic"} <= names
    assert {"Tai_Tham", "New_Tai_Lue", "SignWriting", "Nko", "Phags_Pa"} <= names
    assert "Hani" not in names and "Latn" not in names


@pytest.mark.parametrize("code", range(128), ids=lambda c: f"U+{c:04X}")
def test_ascii_shortcut_agrees_with_the_script_tables(code: int) -> None:
    # Scripts.txt (UAX #24): ASCII letters are Latin, every other ASCII character Common.
    # The reference is the `regex` module's \p{sc=Latin}, which the ASCII shortcut of
    # scripts_of and resolved_script_set does not consult.
    ch = chr(code)
    latin = regex.match(r"\p{sc=Latin}", ch) is not None
    assert scripts_of(f"{ch}") == ({"Latin"} if latin else set())
    assert resolved_script_set(f"x{ch}y") == {"Latin"}
    assert (resolved_script_set(ch) == {"Latin"}) is latin


@settings(max_examples=3000, deadline=None)
@given(st.text(alphabet="aBzQ-'1. _", max_size=8))
def test_ascii_case_shortcut_agrees_with_the_letter_classes(text: str) -> None:
    # The ASCII shortcut uses str.islower/isupper/istitle; the general path reads the
    # Unicode categories Lu, Ll and Lt through the regex module.
    assert _find_shape(text) is _shape_by_letters(text)
